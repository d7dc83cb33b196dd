/**
 * Bulk changes from the planner's list: one due date or one assignee for several open orders,
 * all or none, in one transaction.
 */
import { asc, inArray } from 'drizzle-orm';
import { isOpenStatus, statusForPlan, type WorkOrderStatus } from '../domain/work-orders';
import type { WorkOrderView } from '../schemas/work-orders';
import { workOrders } from './db/schema';
import { drizzleOn, inTransaction } from './db/transaction';
import { appendWorkOrderHistory, type WorkOrderHistoryEntry } from './db/work-order-history';
import { workOrderViews } from './work-order-reads';
import { fieldError, WorkOrderError } from './work-order-errors';
import {
	assertPlanner,
	diff,
	emailsOf,
	technicianByEmail,
	type WorkOrderActor
} from './work-order-shared';

/**
 * Sets the same due date or assignee on several open orders at once, in one transaction: all or
 * none. 404 when an id is unknown, 400 naming the orders that are done or cancelled. Each order's
 * status follows its plan (statusForPlan); one history row per order that changed.
 */
async function bulkChange(
	actor: WorkOrderActor,
	ids: number[],
	change: { dueOn?: string | null; assigneeEmail?: string | null }
): Promise<WorkOrderView[]> {
	assertPlanner(actor);
	const wanted = [...new Set(ids)].sort((a, b) => a - b);
	if (!wanted.length) throw fieldError('ids', 'Choose at least one work order.');
	return inTransaction(async (conn) => {
		const d = drizzleOn(conn);
		const rows = await d
			.select()
			.from(workOrders)
			.where(inArray(workOrders.id, wanted))
			.orderBy(asc(workOrders.id))
			.for('update');
		const found = new Set(rows.map((r) => r.id));
		const missing = wanted.filter((id) => !found.has(id));
		if (missing.length)
			throw new WorkOrderError(
				404,
				`There is no work order ${missing.map((id) => `#${id}`).join(', ')}.`
			);
		const closed = rows.filter((r) => !isOpenStatus(r.status));
		if (closed.length)
			throw fieldError(
				'ids',
				`Done or cancelled work orders cannot be changed: ${closed.map((r) => `#${r.id} (${r.status})`).join(', ')}.`
			);
		let newAssignee: { id: string; email: string } | null | undefined;
		if (change.assigneeEmail !== undefined)
			newAssignee = change.assigneeEmail ? await technicianByEmail(d, change.assigneeEmail) : null;
		const emails = await emailsOf(
			d,
			rows.map((r) => r.assigneeId)
		);
		const now = new Date();
		const byStatus = new Map<WorkOrderStatus, number[]>();
		const history: WorkOrderHistoryEntry[] = [];
		for (const r of rows) {
			const assigneeId = newAssignee === undefined ? r.assigneeId : (newAssignee?.id ?? null);
			const dueOn = change.dueOn === undefined ? r.dueOn : change.dueOn;
			const status = statusForPlan(r.status, dueOn, assigneeId);
			const shown = (s: WorkOrderStatus, due: string | null, email: string | null) => ({
				status: s,
				dueOn: due,
				assigneeEmail: email
			});
			const beforeEmail = r.assigneeId ? (emails.get(r.assigneeId) ?? null) : null;
			const afterEmail = newAssignee === undefined ? beforeEmail : (newAssignee?.email ?? null);
			const changes = diff(shown(r.status, r.dueOn, beforeEmail), shown(status, dueOn, afterEmail));
			if (!Object.keys(changes).length) continue;
			byStatus.set(status, [...(byStatus.get(status) ?? []), r.id]);
			history.push({ workOrderId: r.id, at: now, userId: actor.id, what: 'changed', changes });
		}
		// One UPDATE per resulting status (at most three), not one per order.
		for (const [status, group] of byStatus) {
			await d
				.update(workOrders)
				.set({
					status,
					updatedAt: now,
					...(change.dueOn !== undefined ? { dueOn: change.dueOn } : {}),
					...(newAssignee !== undefined ? { assigneeId: newAssignee?.id ?? null } : {})
				})
				.where(inArray(workOrders.id, group));
		}
		await appendWorkOrderHistory(conn, history);
		return workOrderViews(wanted, d);
	});
}

/** Assigns several open orders to one technician (or to nobody, with null). */
export function bulkAssign(
	actor: WorkOrderActor,
	ids: number[],
	assigneeEmail: string | null
): Promise<WorkOrderView[]> {
	return bulkChange(actor, ids, { assigneeEmail });
}

/** Gives several open orders one due date (or none, with null). */
export function bulkReschedule(
	actor: WorkOrderActor,
	ids: number[],
	dueOn: string | null
): Promise<WorkOrderView[]> {
	return bulkChange(actor, ids, { dueOn });
}
