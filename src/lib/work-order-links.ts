/**
 * How the phone carries out a work order with the forms it already has: `/work` links each order
 * to the form for its action on the fixture's card (`?wo=ID&do=KIND`), and the card and the
 * break-in run add the order's id to the entry they log. Pure and shared by pages; relative
 * imports only.
 */
import { SWAPPABLE_PARTS, type EventKind } from './domain/events';
import { COMPLETING_EVENT_KINDS, type WorkOrderAction } from './domain/work-orders';

/** What the order-carrying pages read from their address. */
export interface OrderRef {
	workOrderId: number;
	/** The form the order asked for; null when the person chooses ("other"). */
	kind: EventKind | null;
	/** Parts a part swap starts ticked. */
	parts: string[];
}

/** The parts a part swap for each replacing action starts ticked. */
export const PARTS_FOR_ACTION: Partial<Record<WorkOrderAction, string[]>> = {
	'replace-balls': ['balls'],
	'replace-seats': ['seats'],
	'replace-fixture': ['whole-fixture']
};

/** Words for each action, as /work and the card's banner say them. */
export const ACTION_WORDS: Record<WorkOrderAction, string> = {
	'replace-balls': 'replace balls',
	'replace-seats': 'replace seats or vee inserts',
	'replace-fixture': 'replace the whole fixture',
	're-break-in': 'break-in run',
	inspect: 'wear inspection',
	clean: 'cleaning',
	other: 'other work'
};

/** The action in words, with the planner's text for "other". */
export function actionWords(o: { action: WorkOrderAction; actionText?: string | null }): string {
	return o.action === 'other' && o.actionText ? o.actionText : ACTION_WORDS[o.action];
}

/** Where "Complete" leads for an order: the guided break-in run, or the card's form for it. */
export function completionHref(o: { id: number; fixtureCode: string; action: WorkOrderAction }) {
	const code = encodeURIComponent(o.fixtureCode);
	if (o.action === 're-break-in') return `/f/${code}/break-in?wo=${o.id}`;
	const kinds = COMPLETING_EVENT_KINDS[o.action];
	const kind = kinds.length === 1 ? kinds[0] : null;
	const parts = PARTS_FOR_ACTION[o.action];
	return `/f/${code}?wo=${o.id}${kind ? `&do=${kind}` : ''}${parts ? `&parts=${parts.join(',')}` : ''}`;
}

/** The order an address names (`?wo=ID`, optional `&do=KIND&parts=a,b`), or null. */
export function orderRefFrom(url: URL): OrderRef | null {
	const raw = url.searchParams.get('wo');
	if (!raw || !/^[1-9]\d{0,9}$/.test(raw)) return null;
	const workOrderId = Number(raw);
	if (workOrderId > 2_147_483_647) return null;
	const kind = url.searchParams.get('do');
	const known = (COMPLETING_EVENT_KINDS.other as readonly string[]).includes(kind ?? '');
	const parts = (url.searchParams.get('parts') ?? '')
		.split(',')
		.filter((p) => (SWAPPABLE_PARTS as readonly string[]).includes(p));
	return { workOrderId, kind: known ? (kind as EventKind) : null, parts };
}

/**
 * Adds the order's id to an entry of `kind` when that entry carries the order out: the kind the
 * order asked for, or (when the person chooses) any kind that completes "other" work.
 */
export function withOrder(
	ref: OrderRef | null,
	kind: EventKind,
	payload: Record<string, unknown>
): Record<string, unknown> {
	if (!ref) return payload;
	const carries = ref.kind ? ref.kind === kind : COMPLETING_EVENT_KINDS.other.includes(kind);
	return carries ? { ...payload, workOrderId: ref.workOrderId } : payload;
}

/** The text of the note that starts an order from the phone. */
export function startNoteText(o: {
	id: number;
	action: WorkOrderAction;
	actionText?: string | null;
}): string {
	return `Started work order #${o.id}: ${actionWords(o)}`;
}

/** A calendar date (YYYY-MM-DD) in words, "2 March 2026" (UTC calendar, as stored). */
export function dayWords(isoDate: string): string {
	const d = new Date(`${isoDate}T00:00:00Z`);
	if (Number.isNaN(d.getTime())) return isoDate;
	return d.toLocaleDateString('en-GB', {
		day: 'numeric',
		month: 'long',
		year: 'numeric',
		timeZone: 'UTC'
	});
}
