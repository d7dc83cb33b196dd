/**
 * The work-order step of ingest (./ingest.ts): events that carry a `workOrderId` move their order
 * to underway or done in the batch's own transaction, and flags the batch raises link to the open
 * orders that answer them. A constant number of statements per batch, whatever its size: one
 * locking read of the named orders, one update, one history insert; for flag links one read and
 * two inserts. Everything runs on the batch's connection.
 */
import type { PoolConnection, RowDataPacket } from 'mysql2/promise';
import type { FlagKind } from '../domain/flag-kinds';
import { planOrderChanges, type OrderAtSync, type OrderChange } from '../domain/work-order-sync';
import {
	OPEN_WORK_ORDER_STATUSES,
	orderAnswersFlag,
	type WorkOrderAction
} from '../domain/work-orders';
import { can } from '../permissions';
import { appendWorkOrderHistory } from './db/work-order-history';
import type { Item, Sender } from './ingest-insert';

/** An order locked for the batch, with its fixture's code for messages. */
export type LockedOrder = OrderAtSync & { fixtureCode: string };

const iso = (d: Date | null) => (d ? d.toISOString() : null);

/** The order id an event carries, if any. */
export function workOrderIdOf(item: Item): number | undefined {
	const id = (item.event?.payload as { workOrderId?: number } | undefined)?.workOrderId;
	return typeof id === 'number' ? id : undefined;
}

/**
 * Locks the orders the candidates name, in one `SELECT … FOR UPDATE` in id order (so two batches
 * naming the same orders wait rather than deadlock). No statement when none names an order.
 */
export async function lockOrders(
	conn: PoolConnection,
	candidates: Item[]
): Promise<Map<number, LockedOrder>> {
	const ids = [...new Set(candidates.map(workOrderIdOf).filter((id) => id !== undefined))];
	const out = new Map<number, LockedOrder>();
	if (!ids.length) return out;
	// The fixture's code comes from a subquery, which a locking read does not lock.
	const [rows] = await conn.query<RowDataPacket[]>(
		`SELECT wo.id, wo.fixture_id, wo.action, wo.status, wo.started_at, wo.completed_at,
		   (SELECT f.code FROM fixtures f WHERE f.id = wo.fixture_id) AS fixture_code
		 FROM work_orders wo WHERE wo.id IN (?) ORDER BY wo.id FOR UPDATE`,
		[ids.sort((a, b) => a - b)]
	);
	for (const r of rows) {
		out.set(r.id as number, {
			id: r.id as number,
			fixtureId: r.fixture_id as number,
			action: r.action as WorkOrderAction,
			status: r.status as OrderAtSync['status'],
			startedAt: iso(r.started_at as Date | null),
			completedAt: iso(r.completed_at as Date | null),
			fixtureCode: r.fixture_code as string
		});
	}
	return out;
}

/**
 * Why a candidate's order reference is refused, or undefined: the order must exist, be the
 * event's fixture's, and the sender must be one who carries out work orders.
 */
export function orderReferenceRefusal(
	item: Item,
	orders: Map<number, LockedOrder>,
	sender: Sender
): string | undefined {
	const id = workOrderIdOf(item);
	if (id === undefined) return undefined;
	if (!can(sender.actor, 'work-order.carry-out'))
		return `Your account may not carry out work orders; send the entry without work order #${id}.`;
	const order = orders.get(id);
	if (!order) return `Work order #${id} does not exist.`;
	if (order.fixtureId !== item.fixture!.id)
		return `Work order #${id} is for fixture ${order.fixtureCode}, not ${item.fixture!.code}.`;
	return undefined;
}

/** Applies the new events' effects to their orders: one update and one history insert. */
export async function applyOrderEffects(
	conn: PoolConnection,
	sender: Sender,
	fresh: Item[],
	orders: Map<number, LockedOrder>
): Promise<OrderChange[]> {
	const events = fresh.flatMap((item) => {
		const workOrderId = workOrderIdOf(item);
		if (workOrderId === undefined) return [];
		const e = item.event!;
		return [{ id: e.id, kind: e.kind, occurredAt: e.occurredAt, workOrderId }];
	});
	const changes = planOrderChanges(orders, events);
	if (!changes.length) return changes;
	// The last change of each order holds its final fields; completion names its event.
	const last = new Map<number, OrderChange>();
	const completedBy = new Map<number, string>();
	for (const c of changes) {
		last.set(c.orderId, c);
		if (c.what !== 'started') completedBy.set(c.orderId, c.eventId);
	}
	const cases = (column: string, values: [number, unknown][]) =>
		values.length
			? {
					sql: `${column} = CASE id ${values.map(() => 'WHEN ? THEN ?').join(' ')} ELSE ${column} END`,
					params: values.flat()
				}
			: null;
	const date = (s: string | null) => (s ? new Date(s) : null);
	const sets = [
		cases(
			'status',
			[...last.values()].map((c) => [c.orderId, c.status])
		),
		cases(
			'started_at',
			[...last.values()].map((c) => [c.orderId, date(c.startedAt)])
		),
		cases(
			'completed_at',
			[...last.values()].map((c) => [c.orderId, date(c.completedAt)])
		),
		cases(
			'completed_by',
			[...completedBy.keys()].map((id) => [id, sender.actor.id])
		),
		cases('completed_by_event_id', [...completedBy.entries()])
	].filter((s) => s !== null);
	await conn.query(
		`UPDATE work_orders SET ${sets.map((s) => s.sql).join(', ')}, updated_at = ? WHERE id IN (?)`,
		[...sets.flatMap((s) => s.params), sender.now, [...last.keys()]]
	);
	await appendWorkOrderHistory(
		conn,
		changes.map((c) => ({
			workOrderId: c.orderId,
			at: sender.now,
			userId: sender.actor.id,
			what: c.what,
			changes: c.changes,
			eventId: c.eventId
		}))
	);
	return changes;
}

/**
 * Links flags just raised on `raised` (fixture, kind) to the open orders of their fixtures that
 * answer them (orderAnswersFlag), with a 'flag-linked' history row per link. One read, and two
 * inserts when anything links; nothing when no flag was raised.
 */
export async function linkRaisedFlags(
	conn: PoolConnection,
	raised: { fixtureId: number; kind: FlagKind }[],
	userId: string | null,
	now: Date
): Promise<number> {
	if (!raised.length) return 0;
	const [rows] = await conn.query<RowDataPacket[]>(
		`SELECT wo.id AS order_id, wo.action, f.id AS flag_id, f.kind
		 FROM flags f
		 JOIN work_orders wo ON wo.fixture_id = f.fixture_id AND wo.status IN (?)
		 WHERE (f.fixture_id, f.kind) IN (${raised.map(() => '(?, ?)').join(', ')})
		   AND f.cleared_at IS NULL
		   AND NOT EXISTS (SELECT 1 FROM work_order_flags l
		     WHERE l.work_order_id = wo.id AND l.flag_id = f.id)
		 ORDER BY wo.id, f.id`,
		[OPEN_WORK_ORDER_STATUSES, ...raised.flatMap((r) => [r.fixtureId, r.kind])]
	);
	const links = rows
		.filter((r) => orderAnswersFlag(r.action as WorkOrderAction, r.kind as FlagKind))
		.map((r) => ({
			orderId: r.order_id as number,
			flagId: r.flag_id as number,
			kind: r.kind as FlagKind
		}));
	if (!links.length) return 0;
	await conn.query('INSERT IGNORE INTO work_order_flags (work_order_id, flag_id) VALUES ?', [
		links.map((l) => [l.orderId, l.flagId])
	]);
	await appendWorkOrderHistory(
		conn,
		links.map((l) => ({
			workOrderId: l.orderId,
			at: now,
			userId,
			what: 'flag-linked' as const,
			changes: { flagId: [null, l.flagId], flagKind: [null, l.kind] }
		}))
	);
	return links.length;
}
