/**
 * The demo's work orders (invented, like the rest of the scenario): a handful in every status,
 * placed against the flags the demo history leaves open, with dates relative to the seed's "now".
 * One is done, tied to the seat swap already in the spare pallet's history (its break-in flag
 * stays open and has an order of its own); one is overdue; the technician has work this week;
 * the worn mount's "replace now", a plate's inspection and a plate's break-in stay unplanned, so
 * the planner has flags without orders to plan. Skipped when any demo fixture has an order.
 */
import { and, desc, eq, inArray, isNull } from 'drizzle-orm';
import { addDays, type WorkOrderAction, type WorkOrderStatus } from '$lib/domain/work-orders';
import type { FlagKind } from '$lib/domain/flag-kinds';
import type { WorkOrderPart } from '$lib/domain/work-orders';
import type { Role } from '$lib/schemas/roles';
import { db } from '$lib/server/db';
import { events, fixtures, flags, workOrderFlags, workOrders } from '$lib/server/db/schema';
import { drizzleOn, inTransaction } from '$lib/server/db/transaction';
import {
	appendWorkOrderHistory,
	type WorkOrderHistoryEntry
} from '$lib/server/db/work-order-history';
import type { Actor } from '$lib/server/guard';

/** One demo order: on which fixture, answering which of its open flags, standing where. */
interface DemoOrder {
	fixture: string;
	flag?: FlagKind;
	action: WorkOrderAction;
	status: WorkOrderStatus;
	/** Days from the seed's date; none while undated. */
	dueInDays?: number;
	assigned: boolean;
	createdDaysAgo: number;
	parts?: WorkOrderPart[];
	notes: string;
	cancelReason?: string;
	/** Done by the latest part swap in the fixture's history. */
	doneBySwap?: boolean;
}

const VEE_INSERTS: WorkOrderPart[] = [
	{ description: 'Vee insert', quantity: 3, material: 'Tungsten carbide' }
];

export const DEMO_WORK_ORDERS: DemoOrder[] = [
	{
		fixture: 'pallet-spare-1',
		action: 'replace-seats',
		status: 'done',
		dueInDays: -8,
		assigned: true,
		createdDaysAgo: 20,
		parts: VEE_INSERTS,
		notes: 'Fretting marks on all three vees at the last inspection; fit new carbide inserts.',
		doneBySwap: true
	},
	{
		fixture: 'pallet-spare-1',
		flag: 'break-in-due',
		action: 're-break-in',
		status: 'scheduled',
		dueInDays: 2,
		assigned: true,
		createdDaysAgo: 7,
		notes: 'Finish the break-in on the new inserts before the pallet goes back on DT-1.'
	},
	{
		fixture: 'dt-vise-1',
		flag: 'cleaning-due',
		action: 'clean',
		status: 'scheduled',
		dueInDays: -3,
		assigned: true,
		createdDaysAgo: 9,
		notes: 'Cleaning interval passed; the vise sat in the rack for weeks.'
	},
	{
		fixture: 'cmm2-probe-port-3',
		flag: 'cleaning-due',
		action: 'clean',
		status: 'scheduled',
		dueInDays: 1,
		assigned: true,
		createdDaysAgo: 2,
		notes: 'Heavy use this month; clean the port and its balls.'
	},
	{
		fixture: 'pallet-DT-2-B',
		flag: 'drift',
		action: 'inspect',
		status: 'underway',
		dueInDays: 0,
		assigned: true,
		createdDaysAgo: 4,
		notes: 'Readings creeping; look at the vees and balls for wear or debris.'
	},
	{
		fixture: 'cmm1-plate-450',
		flag: 'inspection-due',
		action: 'inspect',
		status: 'planned',
		dueInDays: 14,
		assigned: false,
		createdDaysAgo: 1,
		notes: 'Inspection due; pick a week when CMM 1 is quiet.'
	},
	{
		fixture: 'cmm-plate-spare',
		action: 'replace-seats',
		status: 'cancelled',
		dueInDays: 5,
		assigned: true,
		createdDaysAgo: 6,
		parts: VEE_INSERTS,
		notes: 'Replace the fretted vee insert.',
		cancelReason:
			'The plate stays on hold as a spare; replace the inserts if it goes back into use.'
	}
];

const DAY = 86_400_000;
const at = (seedTime: Date, daysAgo: number, hour: number) => {
	const d = new Date(seedTime.getTime() - daysAgo * DAY);
	d.setUTCHours(hour, 0, 0, 0);
	return d.getTime() > seedTime.getTime() ? seedTime : d;
};

/** Adds the demo orders and their history rows; returns how many were added. */
export async function seedWorkOrders(
	byRole: Partial<Record<Role, Actor>>,
	codes: Map<string, string>,
	seedTime: Date
): Promise<number> {
	const planner = byRole.planner;
	const technician = byRole.technician;
	if (!planner || !technician) return 0;
	const rows = await db
		.select({ id: fixtures.id, code: fixtures.code })
		.from(fixtures)
		.where(inArray(fixtures.code, [...codes.values()]));
	const idOf = new Map(rows.map((r) => [r.code, r.id]));
	const ids = rows.map((r) => r.id);
	if (!ids.length) return 0;
	const [any] = await db
		.select({ id: workOrders.id })
		.from(workOrders)
		.where(inArray(workOrders.fixtureId, ids))
		.limit(1);
	if (any) return 0;

	const today = seedTime.toISOString().slice(0, 10);
	let added = 0;
	for (const o of DEMO_WORK_ORDERS) {
		const fixtureId = idOf.get(codes.get(o.fixture) ?? '');
		if (fixtureId === undefined) continue;
		const [flag] = o.flag
			? await db
					.select({ id: flags.id })
					.from(flags)
					.where(
						and(eq(flags.fixtureId, fixtureId), eq(flags.kind, o.flag), isNull(flags.clearedAt))
					)
					.limit(1)
			: [];
		// An order made for a flag the history did not leave open would answer nothing.
		if (o.flag && !flag) continue;
		const [swap] = o.doneBySwap
			? await db
					.select({ id: events.id, occurredAt: events.occurredAt })
					.from(events)
					.where(and(eq(events.fixtureId, fixtureId), eq(events.kind, 'part-swap')))
					.orderBy(desc(events.occurredAt))
					.limit(1)
			: [];
		const created = at(seedTime, o.createdDaysAgo, 9);
		const dueOn = o.dueInDays === undefined ? null : addDays(today, o.dueInDays);
		const assignee = o.assigned ? technician : null;
		const doneAt = swap?.occurredAt ?? at(seedTime, 1, 15);
		const startedAt =
			o.status === 'underway' ? at(seedTime, 1, 8) : o.status === 'done' ? doneAt : null;
		const planned = dueOn && assignee ? 'scheduled' : 'planned';

		await inTransaction(async (conn) => {
			const d = drizzleOn(conn);
			const [{ id }] = await d
				.insert(workOrders)
				.values({
					fixtureId,
					action: o.action,
					status: o.status,
					dueOn,
					assigneeId: assignee?.id ?? null,
					parts: o.parts ?? [],
					notes: o.notes,
					cancelReason: o.cancelReason ?? null,
					createdAt: created,
					createdBy: planner.id,
					updatedAt: o.status === 'done' ? doneAt : (startedAt ?? created),
					startedAt,
					completedAt: o.status === 'done' ? doneAt : null,
					completedBy: o.status === 'done' ? technician.id : null,
					completedByEventId: o.status === 'done' ? (swap?.id ?? null) : null
				})
				.$returningId();
			if (flag) await d.insert(workOrderFlags).values({ workOrderId: id, flagId: flag.id });
			const history: WorkOrderHistoryEntry[] = [
				{
					workOrderId: id,
					at: created,
					userId: planner.id,
					what: 'created',
					changes: {
						fixtureCode: [null, codes.get(o.fixture)],
						action: [null, o.action],
						status: [null, planned],
						...(dueOn ? { dueOn: [null, dueOn] } : {}),
						...(assignee ? { assigneeEmail: [null, assignee.email] } : {}),
						...(flag ? { flags: [null, [flag.id]] } : {}),
						...(o.parts ? { parts: [null, o.parts] } : {}),
						notes: [null, o.notes]
					}
				}
			];
			if (o.status === 'underway')
				history.push({
					workOrderId: id,
					at: startedAt!,
					userId: technician.id,
					what: 'started',
					changes: { status: [planned, 'underway'] }
				});
			if (o.status === 'done')
				history.push({
					workOrderId: id,
					at: doneAt,
					userId: technician.id,
					what: 'done',
					changes: { status: [planned, 'done'] },
					eventId: swap?.id ?? null
				});
			if (o.status === 'cancelled')
				history.push({
					workOrderId: id,
					at: at(seedTime, 1, 11),
					userId: planner.id,
					what: 'cancelled',
					changes: { status: [planned, 'cancelled'], cancelReason: [null, o.cancelReason] }
				});
			await appendWorkOrderHistory(conn, history);
		});
		added++;
	}
	return added;
}
