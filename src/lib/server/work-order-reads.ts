/**
 * Work orders read: one order with its history, the planner's list, open flags that nothing
 * answers yet, and the "planned for DATE · ASSIGNEE" labels shown beside flags. Every function
 * costs a fixed number of statements whatever the number of rows, and takes an optional Drizzle
 * handle so a caller inside a transaction can pass its own connection (never the pool's).
 * The writes are in ./work-orders.ts.
 */
import { and, asc, eq, exists, gte, inArray, isNull, lte, ne, sql, type SQL } from 'drizzle-orm';
import { alias, type MySqlSelect } from 'drizzle-orm/mysql-core';
import { FLAG_URGENCY } from '../domain/flag-urgency';
import type { FlagKind } from '../domain/flag-kinds';
import {
	OPEN_WORK_ORDER_STATUSES,
	type WorkOrderAction,
	type WorkOrderStatus
} from '../domain/work-orders';
import type {
	WorkOrderHistoryView,
	WorkOrderView,
	WorkOrderWithHistory
} from '../schemas/work-orders';
import { db, type Db } from './db';
import { withPlace } from './db/place-join';
import {
	areas,
	fixtures,
	flags,
	locations,
	sites,
	users,
	workOrderFlags,
	workOrderHistory,
	workOrders
} from './db/schema';

const assignee = alias(users, 'assignee');
const creator = alias(users, 'creator');
const completer = alias(users, 'completer');

const openStatuses = [...OPEN_WORK_ORDER_STATUSES];

/** The columns of an order's view, minus its flags. */
const viewColumns = {
	id: workOrders.id,
	fixtureId: workOrders.fixtureId,
	fixtureCode: fixtures.code,
	fixtureName: fixtures.name,
	site: sites.name,
	area: areas.name,
	location: locations.name,
	action: workOrders.action,
	actionText: workOrders.actionText,
	status: workOrders.status,
	dueOn: workOrders.dueOn,
	assigneeId: workOrders.assigneeId,
	assigneeEmail: assignee.email,
	assigneeName: assignee.name,
	parts: workOrders.parts,
	notes: workOrders.notes,
	cancelReason: workOrders.cancelReason,
	createdAt: workOrders.createdAt,
	createdByEmail: creator.email,
	updatedAt: workOrders.updatedAt,
	startedAt: workOrders.startedAt,
	completedAt: workOrders.completedAt,
	completedByEmail: completer.email
};

/**
 * Joins a select from work_orders to the fixture, its place and the people named on the order:
 * `viewFrom(q.select(cols).from(workOrders).$dynamic())`.
 */
function viewFrom<T extends MySqlSelect>(qb: T): T {
	const joined = (qb as unknown as MySqlSelect).innerJoin(
		fixtures,
		eq(fixtures.id, workOrders.fixtureId)
	);
	return withPlace(joined)
		.leftJoin(assignee, eq(assignee.id, workOrders.assigneeId))
		.leftJoin(creator, eq(creator.id, workOrders.createdBy))
		.leftJoin(completer, eq(completer.id, workOrders.completedBy)) as unknown as T;
}

type ViewRow = {
	[K in keyof typeof viewColumns]: (typeof viewColumns)[K]['_']['data'] | null;
};

const isoOrNull = (d: Date | null) => (d ? d.toISOString() : null);

/** The flags of these orders, by order id (one statement). */
async function flagsOf(q: Db, ids: number[]): Promise<Map<number, WorkOrderView['flags']>> {
	const out = new Map<number, WorkOrderView['flags']>();
	if (!ids.length) return out;
	const rows = await q
		.select({
			workOrderId: workOrderFlags.workOrderId,
			id: flags.id,
			kind: flags.kind,
			reason: flags.reason,
			clearedAt: flags.clearedAt
		})
		.from(workOrderFlags)
		.innerJoin(flags, eq(flags.id, workOrderFlags.flagId))
		.where(inArray(workOrderFlags.workOrderId, ids))
		.orderBy(asc(flags.id));
	for (const r of rows) {
		const list = out.get(r.workOrderId) ?? [];
		list.push({ id: r.id, kind: r.kind, reason: r.reason, open: r.clearedAt === null });
		out.set(r.workOrderId, list);
	}
	return out;
}

function toView(r: ViewRow, orderFlags: WorkOrderView['flags']): WorkOrderView {
	return {
		id: r.id!,
		fixtureCode: r.fixtureCode!,
		fixtureName: r.fixtureName!,
		place: `${r.site} / ${r.area} / ${r.location}`,
		action: r.action!,
		actionText: r.actionText ?? null,
		status: r.status!,
		dueOn: r.dueOn ?? null,
		assigneeEmail: r.assigneeEmail ?? null,
		assigneeName: r.assigneeName ?? r.assigneeEmail ?? null,
		parts: r.parts ?? [],
		notes: r.notes ?? null,
		cancelReason: r.cancelReason ?? null,
		flags: orderFlags,
		createdAt: r.createdAt!.toISOString(),
		createdByEmail: r.createdByEmail ?? null,
		updatedAt: r.updatedAt!.toISOString(),
		startedAt: isoOrNull(r.startedAt ?? null),
		completedAt: isoOrNull(r.completedAt ?? null),
		completedByEmail: r.completedByEmail ?? null,
		doneAfterCancel: r.status === 'cancelled' && r.completedAt !== null
	};
}

/** Views of these orders, in the order of `ids` (two statements); missing ids are left out. */
export async function workOrderViews(ids: number[], q: Db = db): Promise<WorkOrderView[]> {
	if (!ids.length) return [];
	const [rows, orderFlags] = await Promise.all([
		viewFrom(q.select(viewColumns).from(workOrders).$dynamic()).where(inArray(workOrders.id, ids)),
		flagsOf(q, ids)
	]);
	const byId = new Map(rows.map((r) => [r.id, r]));
	return ids
		.filter((id) => byId.has(id))
		.map((id) => toView(byId.get(id)!, orderFlags.get(id) ?? []));
}

/** One order with its history (oldest change first), or null. */
export async function getWorkOrder(id: number, q: Db = db): Promise<WorkOrderWithHistory | null> {
	const [[view], rows] = await Promise.all([
		workOrderViews([id], q),
		q
			.select({
				at: workOrderHistory.at,
				byEmail: users.email,
				byName: users.name,
				what: workOrderHistory.what,
				changes: workOrderHistory.changes,
				eventId: workOrderHistory.eventId
			})
			.from(workOrderHistory)
			.leftJoin(users, eq(users.id, workOrderHistory.userId))
			.where(eq(workOrderHistory.workOrderId, id))
			.orderBy(asc(workOrderHistory.at), asc(workOrderHistory.id))
	]);
	if (!view) return null;
	const history: WorkOrderHistoryView[] = rows.map((r) => ({
		at: r.at.toISOString(),
		byEmail: r.byEmail,
		byName: r.byName ?? r.byEmail,
		what: r.what,
		changes: r.changes,
		eventId: r.eventId
	}));
	return { ...view, history };
}

/** The planner's filters (all optional; every one given must hold). */
export interface WorkOrderFilters {
	statuses?: WorkOrderStatus[];
	assigneeId?: string;
	/** Orders of the person with this e-mail address (the API's `assignee=EMAIL`). */
	assigneeEmail?: string;
	fixtureCode?: string;
	areaId?: number;
	action?: WorkOrderAction;
	/** Due on or after (YYYY-MM-DD). */
	from?: string;
	/** Due on or before (YYYY-MM-DD). */
	to?: string;
	/** Only orders without a due date (the calendar's "not on the calendar yet"). */
	undated?: boolean;
	/** 1-based. */
	page?: number;
	pageSize?: number;
}

export const WORK_ORDER_PAGE_SIZE = 100;
export const WORK_ORDER_PAGE_SIZE_MAX = 500;

function listWhere(f: WorkOrderFilters): SQL | undefined {
	return and(
		f.statuses?.length ? inArray(workOrders.status, f.statuses) : undefined,
		f.assigneeId ? eq(workOrders.assigneeId, f.assigneeId) : undefined,
		f.assigneeEmail ? eq(assignee.email, f.assigneeEmail) : undefined,
		f.fixtureCode ? eq(fixtures.code, f.fixtureCode) : undefined,
		f.areaId ? eq(areas.id, f.areaId) : undefined,
		f.action ? eq(workOrders.action, f.action) : undefined,
		f.from ? gte(workOrders.dueOn, f.from) : undefined,
		f.to ? lte(workOrders.dueOn, f.to) : undefined,
		f.undated ? isNull(workOrders.dueOn) : undefined
	);
}

/**
 * The planner's list: overdue first (open, due before `today`), then by due date with undated
 * orders last, then by id; one page, with the number of matches (two statements).
 */
export async function listWorkOrders(
	filters: WorkOrderFilters,
	today: string,
	q: Db = db
): Promise<{ items: WorkOrderView[]; total: number }> {
	const pageSize = Math.min(
		Math.max(1, Math.floor(filters.pageSize ?? WORK_ORDER_PAGE_SIZE)),
		WORK_ORDER_PAGE_SIZE_MAX
	);
	const page = Math.max(1, Math.floor(filters.page ?? 1));
	const overdue = sql`CASE WHEN ${inArray(workOrders.status, openStatuses)} AND ${workOrders.dueOn} < ${today} THEN 0 ELSE 1 END`;
	const rows = await viewFrom(
		q
			.select({
				...viewColumns,
				// Window functions run before LIMIT: the number of matches, in the same statement.
				total: sql<number>`COUNT(*) OVER ()`
			})
			.from(workOrders)
			.$dynamic()
	)
		.where(listWhere(filters))
		.orderBy(
			asc(overdue),
			asc(sql`${workOrders.dueOn} IS NULL`),
			asc(workOrders.dueOn),
			asc(workOrders.id)
		)
		.limit(pageSize)
		.offset((page - 1) * pageSize);
	const orderFlags = await flagsOf(
		q,
		rows.map((r) => r.id)
	);
	return {
		items: rows.map((r) => toView(r, orderFlags.get(r.id) ?? [])),
		total: rows.length ? Number(rows[0].total) : 0
	};
}

/** An open flag that no open work order answers yet. */
export interface UnplannedFlag {
	flagId: number;
	kind: FlagKind;
	reason: string;
	raisedAt: string;
	fixtureId: number;
	fixtureCode: string;
	fixtureName: string;
	place: string;
	areaId: number;
}

/** Whether an open order answers the flag in `flagId` (for NOT EXISTS). */
function openOrderFor(q: Db, flagId: SQL | typeof flags.id) {
	return q
		.select({ one: sql`1` })
		.from(workOrderFlags)
		.innerJoin(workOrders, eq(workOrders.id, workOrderFlags.workOrderId))
		.where(and(eq(workOrderFlags.flagId, flagId), inArray(workOrders.status, openStatuses)));
}

const urgencyList = sql.join(
	FLAG_URGENCY.map((k) => sql`${k}`),
	sql`, `
);

/**
 * Open flags of fixtures in service (not retired) that no open work order answers, so nothing
 * falls between the chairs: most urgent first, then the oldest (one statement).
 */
export async function openFlagsWithoutOrder(
	filter: { areaId?: number; kind?: FlagKind } = {},
	q: Db = db
): Promise<UnplannedFlag[]> {
	const rows = await withPlace(
		q
			.select({
				flagId: flags.id,
				kind: flags.kind,
				reason: flags.reason,
				raisedAt: flags.raisedAt,
				fixtureId: fixtures.id,
				fixtureCode: fixtures.code,
				fixtureName: fixtures.name,
				site: sites.name,
				area: areas.name,
				areaId: areas.id,
				location: locations.name
			})
			.from(flags)
			.innerJoin(fixtures, eq(fixtures.id, flags.fixtureId))
			.$dynamic()
	)
		.where(
			and(
				isNull(flags.clearedAt),
				ne(fixtures.status, 'retired'),
				filter.areaId ? eq(areas.id, filter.areaId) : undefined,
				filter.kind ? eq(flags.kind, filter.kind) : undefined,
				sql`NOT ${exists(openOrderFor(q, flags.id))}`
			)
		)
		.orderBy(asc(sql`FIELD(${flags.kind}, ${urgencyList})`), asc(flags.raisedAt), asc(flags.id));
	return rows.map((r) => ({
		flagId: r.flagId,
		kind: r.kind,
		reason: r.reason,
		raisedAt: r.raisedAt.toISOString(),
		fixtureId: r.fixtureId,
		fixtureCode: r.fixtureCode,
		fixtureName: r.fixtureName,
		place: `${r.site} / ${r.area} / ${r.location}`,
		areaId: r.areaId
	}));
}

/** An open order as the label beside a flag shows it: "planned for DATE · ASSIGNEE". */
export interface OpenOrderLabel {
	id: number;
	status: WorkOrderStatus;
	dueOn: string | null;
	assigneeName: string | null;
}

const labelColumns = {
	id: workOrders.id,
	status: workOrders.status,
	dueOn: workOrders.dueOn,
	assigneeName: sql<string | null>`COALESCE(${assignee.name}, ${assignee.email})`
};
/** Soonest due first, undated last: the first label is the one to show when space is short. */
const labelOrder = [
	asc(sql`${workOrders.dueOn} IS NULL`),
	asc(workOrders.dueOn),
	asc(workOrders.id)
];

/** Per flag, the open order that answers it (the soonest due, if several; one statement). */
export async function openOrdersByFlag(
	flagIds: number[],
	q: Db = db
): Promise<Map<number, OpenOrderLabel>> {
	const out = new Map<number, OpenOrderLabel>();
	if (!flagIds.length) return out;
	const rows = await q
		.select({ flagId: workOrderFlags.flagId, ...labelColumns })
		.from(workOrderFlags)
		.innerJoin(workOrders, eq(workOrders.id, workOrderFlags.workOrderId))
		.leftJoin(assignee, eq(assignee.id, workOrders.assigneeId))
		.where(and(inArray(workOrderFlags.flagId, flagIds), inArray(workOrders.status, openStatuses)))
		.orderBy(...labelOrder);
	for (const { flagId, ...label } of rows) if (!out.has(flagId)) out.set(flagId, label);
	return out;
}

/** Per fixture, its open orders, soonest due first (one statement). */
export async function openOrdersByFixture(
	fixtureIds: number[],
	q: Db = db
): Promise<Map<number, OpenOrderLabel[]>> {
	const out = new Map<number, OpenOrderLabel[]>();
	if (!fixtureIds.length) return out;
	const rows = await q
		.select({ fixtureId: workOrders.fixtureId, ...labelColumns })
		.from(workOrders)
		.leftJoin(assignee, eq(assignee.id, workOrders.assigneeId))
		.where(and(inArray(workOrders.fixtureId, fixtureIds), inArray(workOrders.status, openStatuses)))
		.orderBy(...labelOrder);
	for (const { fixtureId, ...label } of rows) {
		const list = out.get(fixtureId) ?? [];
		list.push(label);
		out.set(fixtureId, list);
	}
	return out;
}

/** Today as a UTC calendar date (YYYY-MM-DD): the server's "today" for due dates. */
export function todayUtc(now: Date = new Date()): string {
	return now.toISOString().slice(0, 10);
}
