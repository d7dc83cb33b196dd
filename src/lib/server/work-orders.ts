/**
 * Work orders written: made by hand or from a flag, changed, bulk assigned and rescheduled. Each
 * call is one transaction that locks the rows it judges (SELECT … FOR UPDATE), applies the rules
 * of $lib/domain/work-orders, and appends one history row per order changed. Reads are in
 * ./work-order-reads.ts, drafts from flags in ./work-order-drafts.ts.
 */
import { and, eq, inArray } from 'drizzle-orm';
import type { PoolConnection } from 'mysql2/promise';
import {
	isOpenStatus,
	statusForPlan,
	transitionRefusal,
	type WorkOrderStatus
} from '../domain/work-orders';
import type { WorkOrderPatch, WorkOrderView } from '../schemas/work-orders';
import { type Db } from './db';
import { fixtures, flags, workOrderFlags, workOrders } from './db/schema';
import { drizzleOn, inTransaction } from './db/transaction';
import { appendWorkOrderHistory, type WorkOrderHistoryEntry } from './db/work-order-history';
import { draftFromFlag } from './work-order-drafts';
import { workOrderViews } from './work-order-reads';
import { fieldError, WorkOrderError } from './work-order-errors';
import {
	assertPlanner,
	diff,
	emailsOf,
	technicianByEmail,
	type OrderRow,
	type Shown,
	type WorkOrderActor,
	type WorkOrderInput
} from './work-order-shared';

export { WorkOrderError } from './work-order-errors';
export { draftFromFlag, type WorkOrderDraft } from './work-order-drafts';
export * from './work-order-reads';
export { bulkAssign, bulkReschedule } from './work-order-bulk';
export type { WorkOrderActor, WorkOrderInput } from './work-order-shared';

/** The open order answering flag `flagId`, if any (read while the flag row is locked). */
async function openOrderOfFlag(d: Db, flagId: number): Promise<number | null> {
	const [row] = await d
		.select({ id: workOrders.id })
		.from(workOrderFlags)
		.innerJoin(workOrders, eq(workOrders.id, workOrderFlags.workOrderId))
		.where(
			and(
				eq(workOrderFlags.flagId, flagId),
				inArray(workOrders.status, ['planned', 'scheduled', 'underway'])
			)
		)
		.limit(1);
	return row?.id ?? null;
}

const alreadyPlanned = (flagId: number, orderId: number) =>
	new WorkOrderError(
		409,
		`Flag #${flagId} already has an open work order (#${orderId}); change that one instead.`
	);

/** Locks flag `flagId` (FOR UPDATE), so two planners cannot both make an order for it. */
async function lockFlag(d: Db, flagId: number) {
	const [flag] = await d
		.select({ id: flags.id, fixtureId: flags.fixtureId, clearedAt: flags.clearedAt })
		.from(flags)
		.where(eq(flags.id, flagId))
		.for('update');
	return flag;
}

/** createWorkOrder on a connection the caller holds, inside its transaction. */
async function createOn(
	conn: PoolConnection,
	actor: WorkOrderActor,
	input: WorkOrderInput
): Promise<WorkOrderView> {
	const d = drizzleOn(conn);
	const parts = input.parts ?? [];
	const [fixture] = await d
		.select({ id: fixtures.id, code: fixtures.code })
		.from(fixtures)
		.where(eq(fixtures.code, input.fixtureCode));
	if (!fixture) {
		const message = `There is no fixture with the code ${input.fixtureCode}.`;
		throw new WorkOrderError(404, message, { fixtureCode: [message] });
	}
	const assigneeEmail = input.assigneeEmail ?? null;
	const assigneeId = assigneeEmail ? (await technicianByEmail(d, assigneeEmail)).id : null;
	if (input.flagId !== undefined) {
		const flag = await lockFlag(d, input.flagId);
		if (!flag || flag.fixtureId !== fixture.id)
			throw fieldError('flagId', `Flag #${input.flagId} is not a flag of ${fixture.code}.`);
		if (flag.clearedAt)
			throw fieldError('flagId', `Flag #${input.flagId} is closed: there is nothing to plan.`);
		const open = await openOrderOfFlag(d, input.flagId);
		if (open !== null) throw alreadyPlanned(input.flagId, open);
	}
	const dueOn = input.dueOn ?? null;
	const status = statusForPlan('planned', dueOn, assigneeId);
	const now = new Date();
	const [{ id }] = await d
		.insert(workOrders)
		.values({
			fixtureId: fixture.id,
			action: input.action,
			actionText: input.actionText ?? null,
			status,
			dueOn,
			assigneeId,
			parts,
			notes: input.notes ?? null,
			createdAt: now,
			createdBy: actor.id,
			updatedAt: now
		})
		.$returningId();
	if (input.flagId !== undefined)
		await d.insert(workOrderFlags).values({ workOrderId: id, flagId: input.flagId });
	const initial: Record<string, unknown> = {
		fixtureCode: fixture.code,
		action: input.action,
		actionText: input.actionText ?? null,
		status,
		dueOn,
		assigneeEmail,
		flags: input.flagId !== undefined ? [input.flagId] : null,
		parts: parts.length ? parts : null,
		notes: input.notes ?? null
	};
	const changes = Object.fromEntries(
		Object.entries(initial)
			.filter(([, v]) => v !== null)
			.map(([k, v]) => [k, [null, v] as [unknown, unknown]])
	);
	await appendWorkOrderHistory(conn, [
		{ workOrderId: id, at: now, userId: actor.id, what: 'created', changes }
	]);
	const [view] = await workOrderViews([id], d);
	return view;
}

/**
 * Makes a work order (planner, supervisor, admin): 404 for an unknown fixture, a field error for
 * an assignee who is not an active technician or a flag that is not open on that fixture, 409
 * when the flag already has an open order. Scheduled when it has a date and an assignee.
 */
export async function createWorkOrder(
	actor: WorkOrderActor,
	input: WorkOrderInput
): Promise<WorkOrderView> {
	assertPlanner(actor);
	return inTransaction((conn) => createOn(conn, actor, input));
}

/**
 * Makes the order a flag asks for in one step, from its draft (see draftFromFlag), with the
 * assignee, due date and notes given overriding the draft's. 404 for an unknown flag, 409 when
 * the flag is closed or already has an open order.
 */
export async function createFromFlag(
	actor: WorkOrderActor,
	flagId: number,
	opts: { assigneeEmail?: string; dueOn?: string; notes?: string } = {},
	today: string = new Date().toISOString().slice(0, 10)
): Promise<WorkOrderView> {
	assertPlanner(actor);
	return inTransaction(async (conn) => {
		const d = drizzleOn(conn);
		const flag = await lockFlag(d, flagId);
		if (!flag) throw new WorkOrderError(404, `There is no flag #${flagId}.`);
		if (flag.clearedAt)
			throw new WorkOrderError(409, `Flag #${flagId} is closed: there is nothing to plan.`);
		const open = await openOrderOfFlag(d, flagId);
		if (open !== null) throw alreadyPlanned(flagId, open);
		const draft = await draftFromFlag(flagId, today, d);
		return createOn(conn, actor, {
			fixtureCode: draft.fixtureCode,
			action: draft.action,
			dueOn: opts.dueOn ?? draft.dueOn,
			assigneeEmail: opts.assigneeEmail,
			flagId,
			parts: draft.parts,
			notes: opts.notes ?? draft.notes
		});
	});
}

const WHAT_FOR_STATUS: Partial<Record<WorkOrderStatus, WorkOrderHistoryEntry['what']>> = {
	underway: 'started',
	done: 'done',
	cancelled: 'cancelled'
};

const isPlanStatus = (s: WorkOrderStatus) => s === 'planned' || s === 'scheduled';

/** Refuses any change to a done or cancelled order: they are final (a new order is made). */
function refuseFinal(row: OrderRow): void {
	if (isOpenStatus(row.status)) return;
	throw new WorkOrderError(
		409,
		`Work order #${row.id} is ${row.status}: it cannot be changed. Make a new work order instead.`
	);
}

/** The status a patch asks for, judged against the current one and the plan's fields. */
function nextStatus(
	cur: WorkOrderStatus,
	asked: WorkOrderStatus | undefined,
	dueOn: string | null,
	assigneeId: string | null
): WorkOrderStatus {
	let status = cur;
	if (asked && asked !== cur && !(isPlanStatus(asked) && isPlanStatus(cur))) {
		const refusal = transitionRefusal(cur, asked);
		if (refusal) throw new WorkOrderError(409, refusal);
		status = asked;
	}
	status = statusForPlan(status, dueOn, assigneeId);
	if (asked && isPlanStatus(asked) && isPlanStatus(cur) && status !== asked)
		throw new WorkOrderError(
			409,
			'A work order is scheduled once it has both a due date and an assignee, and planned while either is missing; change those instead.'
		);
	return status;
}

/**
 * Changes an order (planner, supervisor, admin): dates, assignee, notes, parts, status. 404 for
 * an unknown id, 409 for a move between statuses that is not allowed and for any change to a done
 * or cancelled order. One history row with the fields that changed; a patch that changes nothing
 * writes nothing.
 */
export async function updateWorkOrder(
	actor: WorkOrderActor,
	id: number,
	patch: WorkOrderPatch
): Promise<WorkOrderView> {
	assertPlanner(actor);
	return inTransaction(async (conn) => {
		const d = drizzleOn(conn);
		const [row] = await d.select().from(workOrders).where(eq(workOrders.id, id)).for('update');
		if (!row) throw new WorkOrderError(404, `There is no work order #${id}.`);
		refuseFinal(row);
		const emails = await emailsOf(d, [row.assigneeId]);
		const before: Shown = {
			status: row.status,
			dueOn: row.dueOn,
			assigneeEmail: row.assigneeId ? (emails.get(row.assigneeId) ?? null) : null,
			notes: row.notes,
			parts: row.parts,
			cancelReason: row.cancelReason
		};
		let assigneeId = row.assigneeId;
		let assigneeEmail = before.assigneeEmail;
		if (patch.assigneeEmail !== undefined) {
			const who = patch.assigneeEmail ? await technicianByEmail(d, patch.assigneeEmail) : null;
			assigneeId = who?.id ?? null;
			assigneeEmail = who?.email ?? null;
		}
		const dueOn = patch.dueOn !== undefined ? patch.dueOn : row.dueOn;
		const status = nextStatus(row.status, patch.status, dueOn, assigneeId);
		const after: Shown = {
			status,
			dueOn,
			assigneeEmail,
			notes: patch.notes !== undefined ? patch.notes || null : row.notes,
			parts: patch.parts ?? row.parts,
			cancelReason: status === 'cancelled' ? (patch.cancelReason ?? null) : row.cancelReason
		};
		const changes = diff(before, after);
		if (Object.keys(changes).length === 0) return (await workOrderViews([id], d))[0];

		const now = new Date();
		await d
			.update(workOrders)
			.set({
				status,
				dueOn,
				assigneeId,
				notes: after.notes,
				parts: after.parts,
				cancelReason: after.cancelReason,
				updatedAt: now,
				...(status === 'underway' && !row.startedAt ? { startedAt: now } : {}),
				...(status === 'done' ? { completedAt: now, completedBy: actor.id } : {})
			})
			.where(eq(workOrders.id, id));
		const what = (status !== row.status && WHAT_FOR_STATUS[status]) || 'changed';
		await appendWorkOrderHistory(conn, [
			{ workOrderId: id, at: now, userId: actor.id, what, changes }
		]);
		return (await workOrderViews([id], d))[0];
	});
}
