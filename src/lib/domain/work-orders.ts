/**
 * Work orders as plain rules: what an order may ask for, where it stands, which moves between
 * statuses are allowed, and what a flag turns into when a planner plans it. No I/O: the server
 * (`$lib/server/work-orders*`) stores and the UI shows what these functions decide.
 */
import type { EventKind } from './events';
import type { FlagKind } from './flag-kinds';

/** What a work order asks for. */
export const WORK_ORDER_ACTIONS = [
	'replace-balls',
	'replace-seats',
	'replace-fixture',
	're-break-in',
	'inspect',
	'clean',
	'other'
] as const;
export type WorkOrderAction = (typeof WORK_ORDER_ACTIONS)[number];

/** Where a work order stands. */
export const WORK_ORDER_STATUSES = [
	'planned',
	'scheduled',
	'underway',
	'done',
	'cancelled'
] as const;
export type WorkOrderStatus = (typeof WORK_ORDER_STATUSES)[number];

/** Statuses of an order that still has work to do. */
export const OPEN_WORK_ORDER_STATUSES = ['planned', 'scheduled', 'underway'] as const;
export type OpenWorkOrderStatus = (typeof OPEN_WORK_ORDER_STATUSES)[number];

export function isOpenStatus(s: WorkOrderStatus): s is OpenWorkOrderStatus {
	return s === 'planned' || s === 'scheduled' || s === 'underway';
}

/** Limits on a work order's text, shared by the forms, the API and the sync contract. */
export const WORK_ORDER_LIMITS = {
	otherActionText: 200,
	notes: 4000,
	cancelReason: 1000,
	partDescription: 200,
	partSize: 60,
	partMaterial: 60,
	partQuantityMax: 10_000,
	partsMax: 30
} as const;

/** One line of parts an order needs (part 2 of the plan links these to a stock list). */
export interface WorkOrderPart {
	/** The stock line this part is drawn from; quantities are reserved on it while the order is open. */
	stockPartId?: number;
	description: string;
	quantity: number;
	size?: string;
	material?: string;
}

/**
 * Before work starts, the status follows from the order's own fields: it is "scheduled" once it
 * has both a due date and an assignee, "planned" while either is missing. Later statuses stand.
 */
export function statusForPlan(
	current: WorkOrderStatus,
	dueOn: string | null,
	assigneeId: string | null
): WorkOrderStatus {
	if (current !== 'planned' && current !== 'scheduled') return current;
	return dueOn && assigneeId ? 'scheduled' : 'planned';
}

/**
 * Moves a person may ask for. Planned ↔ scheduled is not asked for: it follows from the date and
 * the assignee (statusForPlan). Done and cancelled are final: nothing is deleted or reopened, a
 * new order is made instead.
 */
const ALLOWED: Record<WorkOrderStatus, readonly WorkOrderStatus[]> = {
	planned: ['underway', 'done', 'cancelled'],
	scheduled: ['underway', 'done', 'cancelled'],
	underway: ['done', 'cancelled'],
	done: [],
	cancelled: []
};

/** Words for a status, for messages; the UI has its own labels next to its badges. */
const STATUS_WORDS: Record<WorkOrderStatus, string> = {
	planned: 'planned',
	scheduled: 'scheduled',
	underway: 'under way',
	done: 'done',
	cancelled: 'cancelled'
};

/**
 * Null when `from → to` is allowed, else a sentence that says why not (shown to the person as it
 * is, and sent as the API's 409 message).
 */
export function transitionRefusal(from: WorkOrderStatus, to: WorkOrderStatus): string | null {
	if (from === to) return null;
	if (ALLOWED[from].includes(to)) return null;
	if (from === 'done' || from === 'cancelled')
		return `This work order is ${STATUS_WORDS[from]}: it cannot become ${STATUS_WORDS[to]}. Make a new work order instead.`;
	if (to === 'planned' || to === 'scheduled')
		return `A work order that is ${STATUS_WORDS[from]} cannot go back to ${STATUS_WORDS[to]}.`;
	return `A work order cannot go from ${STATUS_WORDS[from]} to ${STATUS_WORDS[to]}.`;
}

/** The action that answers each kind of flag. */
export const ACTION_FOR_FLAG: Record<FlagKind, WorkOrderAction> = {
	'replace-now': 'replace-balls',
	'replace-soon': 'replace-balls',
	'break-in-due': 're-break-in',
	'inspection-due': 'inspect',
	'cleaning-due': 'clean',
	drift: 'inspect',
	'out-of-spec': 'inspect'
};

/**
 * A replace flag asks for balls and seats together: contacts wear as pairs (common practice), so
 * an order from one lists both in its parts and notes; the order's action is "replace-balls".
 */
export function answersBallsAndSeats(kind: FlagKind): boolean {
	return kind === 'replace-now' || kind === 'replace-soon';
}

/** Days from `isoDate` (YYYY-MM-DD, UTC calendar), as YYYY-MM-DD. */
export function addDays(isoDate: string, days: number): string {
	const t = Date.parse(`${isoDate}T00:00:00Z`);
	if (Number.isNaN(t)) throw new RangeError(`not a date: ${isoDate}`);
	return new Date(t + days * 86_400_000).toISOString().slice(0, 10);
}

/**
 * The due date of an order made from a flag: today for "replace now"; otherwise the end of the
 * planning horizon (the policy's planningHorizonDays), so the planner has the whole horizon to
 * fit it in and nothing is planned past it.
 */
export function dueOnForFlag(kind: FlagKind, today: string, planningHorizonDays: number): string {
	if (kind === 'replace-now') return today;
	return addDays(today, Math.max(0, Math.floor(planningHorizonDays)));
}

/**
 * Which event kinds carry out an action when the phone sends them with the order's id. Any other
 * kind sent with the id is accepted as part of the work and moves the order to underway: the
 * phone's "Start" is a note event carrying the id, so starting works offline like every entry.
 */
export const COMPLETING_EVENT_KINDS: Record<WorkOrderAction, readonly EventKind[]> = {
	'replace-balls': ['part-swap'],
	'replace-seats': ['part-swap'],
	'replace-fixture': ['part-swap'],
	're-break-in': ['break-in'],
	inspect: ['inspection'],
	clean: ['cleaning'],
	other: ['part-swap', 'break-in', 'inspection', 'cleaning']
};

/** What an event carrying an order's id does to that order. */
export type WorkOrderEffect = 'complete' | 'start' | 'none';

/**
 * The effect of an event of `kind` on an order standing at `status` that asks for `action`. A
 * cancelled order stays cancelled (the event is still accepted: the work happened; the planner
 * sees it as done after cancel); a done order stays done.
 */
export function workOrderEffect(
	action: WorkOrderAction,
	status: WorkOrderStatus,
	kind: EventKind
): WorkOrderEffect {
	if (status === 'done' || status === 'cancelled') return 'none';
	if (COMPLETING_EVENT_KINDS[action].includes(kind)) return 'complete';
	return status === 'underway' ? 'none' : 'start';
}

/**
 * Whether an order asking for `action` is the one a newly raised flag of `kind` should link to:
 * the order answers that kind of flag (the same action a planner would choose for it), or it
 * replaces the contacts, which answers every flag about their wear and repeatability. The
 * break-in a replacement starts is separate work with its own flag.
 */
export function orderAnswersFlag(action: WorkOrderAction, kind: FlagKind): boolean {
	if (ACTION_FOR_FLAG[kind] === action) return true;
	if (action === 'replace-balls' || action === 'replace-seats' || action === 'replace-fixture')
		return (
			kind === 'replace-now' ||
			kind === 'replace-soon' ||
			kind === 'drift' ||
			kind === 'out-of-spec'
		);
	return false;
}

/** Orders overdue on `today`: open, with a due date before it. */
export function isOverdue(
	o: { status: WorkOrderStatus; dueOn: string | null },
	today: string
): boolean {
	return isOpenStatus(o.status) && o.dueOn !== null && o.dueOn < today;
}
