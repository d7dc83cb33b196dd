/**
 * What a batch of synced events does to the work orders they carry out, as a pure plan: ingest
 * (`$lib/server/ingest-work-orders`) reads the orders, asks this module for the changes and
 * writes them in the batch's transaction. No I/O.
 */
import type { EventKind } from './events';
import {
	COMPLETING_EVENT_KINDS,
	workOrderEffect,
	type WorkOrderAction,
	type WorkOrderStatus
} from './work-orders';

/** An order as ingest locked it. */
export interface OrderAtSync {
	id: number;
	fixtureId: number;
	action: WorkOrderAction;
	status: WorkOrderStatus;
	startedAt: string | null;
	completedAt: string | null;
}

/** A new event of the batch that names an order. */
export interface EventForOrder {
	id: string;
	kind: EventKind;
	occurredAt: string;
	workOrderId: number;
}

/** One order's change: the fields to write and the history row that records it. */
export interface OrderChange {
	orderId: number;
	eventId: string;
	what: 'started' | 'done' | 'done-after-cancel';
	status: WorkOrderStatus;
	startedAt: string | null;
	completedAt: string | null;
	/** Field → [before, after], for the history row. */
	changes: Record<string, [unknown, unknown]>;
}

/** Events in the order things happened at the fixture: (occurredAt, id), as the fold orders them. */
function byOccurrence(a: EventForOrder, b: EventForOrder): number {
	if (a.occurredAt !== b.occurredAt) return a.occurredAt < b.occurredAt ? -1 : 1;
	return a.id < b.id ? -1 : a.id > b.id ? 1 : 0;
}

/**
 * The changes `events` make to `orders`, applied in the order the events happened: a completing
 * event moves an open order to done, any other moves a planned or scheduled one to underway; a
 * completing event on a cancelled order not yet done records it as done after cancel (the order
 * stays cancelled). An order gets at most one row per event; `orders` is not modified.
 */
export function planOrderChanges(
	orders: ReadonlyMap<number, OrderAtSync>,
	events: readonly EventForOrder[]
): OrderChange[] {
	const now = new Map<number, OrderAtSync>();
	const out: OrderChange[] = [];
	for (const e of [...events].sort(byOccurrence)) {
		const order = now.get(e.workOrderId) ?? orders.get(e.workOrderId);
		if (!order) continue;
		const effect = workOrderEffect(order.action, order.status, e.kind);
		let next: OrderAtSync | null = null;
		let what: OrderChange['what'] | null = null;
		if (effect === 'complete') {
			next = { ...order, status: 'done', completedAt: e.occurredAt };
			what = 'done';
		} else if (effect === 'start') {
			next = { ...order, status: 'underway', startedAt: e.occurredAt };
			what = 'started';
		} else if (
			order.status === 'cancelled' &&
			order.completedAt === null &&
			COMPLETING_EVENT_KINDS[order.action].includes(e.kind)
		) {
			next = { ...order, completedAt: e.occurredAt };
			what = 'done-after-cancel';
		}
		if (!next || !what) continue;
		now.set(order.id, next);
		const changes: OrderChange['changes'] = {};
		if (next.status !== order.status) changes.status = [order.status, next.status];
		if (next.startedAt !== order.startedAt) changes.startedAt = [order.startedAt, next.startedAt];
		if (next.completedAt !== order.completedAt)
			changes.completedAt = [order.completedAt, next.completedAt];
		out.push({
			orderId: order.id,
			eventId: e.id,
			what,
			status: next.status,
			startedAt: next.startedAt,
			completedAt: next.completedAt,
			changes
		});
	}
	return out;
}
