/**
 * The planner's calendar: the orders due in the days a view shows and the open orders without a
 * date, and moving one order to another day. A move is an ordinary work-order change through
 * `updateWorkOrder`, so it writes its history row (and whatever else that service does on a
 * reschedule) like any other.
 */
import { and, eq, gte, inArray, lte } from 'drizzle-orm';
import { isOverdue, moveRefusal } from '../domain/calendar';
import { OPEN_WORK_ORDER_STATUSES, type WorkOrderStatus } from '../domain/work-orders';
import type { CalendarMove, CalendarOrder } from '../schemas/calendar';
import type { WorkOrderView } from '../schemas/work-orders';
import { db } from './db';
import { users, workOrders } from './db/schema';
import { assertPlanner, type WorkOrderActor } from './work-order-shared';
import { WorkOrderError } from './work-order-errors';
import {
	listWorkOrders,
	WORK_ORDER_PAGE_SIZE_MAX,
	workOrderViews,
	type WorkOrderFilters
} from './work-order-reads';
import { updateWorkOrder } from './work-orders';

/** The calendar's filters. */
export type CalendarFilters = Pick<WorkOrderFilters, 'assigneeEmail' | 'areaId' | 'action'>;

function calendarOrder(v: WorkOrderView, today: string): CalendarOrder {
	return {
		id: v.id,
		fixtureCode: v.fixtureCode,
		fixtureName: v.fixtureName,
		place: v.place,
		action: v.action,
		actionText: v.actionText,
		status: v.status,
		dueOn: v.dueOn,
		assigneeEmail: v.assigneeEmail,
		assigneeName: v.assigneeName,
		overdue: isOverdue(v, today)
	};
}

/** What a calendar page shows. */
export interface CalendarOrders {
	/** Every order due from `from` to `to`, whatever its status (done and cancelled shown too). */
	dated: CalendarOrder[];
	/** More were due in those days than one page holds (the first ones are shown). */
	datedTruncated: boolean;
	/** Open orders with no due date yet. */
	undated: CalendarOrder[];
	undatedTotal: number;
}

/** The orders of the days `from`–`to` and the open undated ones (four statements). */
export async function calendarOrders(
	filters: CalendarFilters,
	range: { from: string; to: string },
	today: string
): Promise<CalendarOrders> {
	const pageSize = WORK_ORDER_PAGE_SIZE_MAX;
	const [dated, undated] = await Promise.all([
		listWorkOrders({ ...filters, from: range.from, to: range.to, pageSize }, today),
		listWorkOrders(
			{ ...filters, statuses: [...OPEN_WORK_ORDER_STATUSES], undated: true, pageSize: 100 },
			today
		)
	]);
	return {
		dated: dated.items.map((v) => calendarOrder(v, today)),
		datedTruncated: dated.total > dated.items.length,
		undated: undated.items.map((v) => calendarOrder(v, today)),
		undatedTotal: undated.total
	};
}

/**
 * Moves one order to `dueOn`. When the page said which date it showed (`from`), an order that has
 * moved since is refused (409) rather than moved again from a stale picture; a done or cancelled
 * order is refused with the calendar's sentence. The change itself is `updateWorkOrder`'s.
 */
export async function moveOnCalendar(
	actor: WorkOrderActor,
	move: CalendarMove
): Promise<WorkOrderView> {
	assertPlanner(actor);
	const [current] = await workOrderViews([move.id]);
	if (!current) throw new WorkOrderError(404, `There is no work order #${move.id}.`);
	const refusal = moveRefusal(current.status);
	if (refusal) throw new WorkOrderError(409, `Work order #${move.id} cannot move. ${refusal}`);
	if (move.from !== undefined && (current.dueOn ?? '') !== move.from)
		throw new WorkOrderError(
			409,
			`Work order #${move.id} was changed meanwhile: it is now ${
				current.dueOn ? `due on ${current.dueOn}` : 'without a due date'
			}, not ${move.from ? `on ${move.from}` : 'undated'} as this page showed. The calendar now shows where it is; move it again if you still want to.`
		);
	// The service judges again under its row lock (a done or cancelled order stays refused).
	return updateWorkOrder(actor, move.id, { dueOn: move.dueOn, cancelReason: undefined });
}

/**
 * Every technician's open orders due from `from` to `to`, whatever the page's area and action
 * filters (a technician's day is full whatever the work is): due date, assignee and status only,
 * for `dayLoads` (one statement).
 */
export async function openLoadRows(
	range: { from: string; to: string },
	assigneeEmail?: string
): Promise<{ status: WorkOrderStatus; dueOn: string | null; assignee: string | null }[]> {
	return db
		.select({ status: workOrders.status, dueOn: workOrders.dueOn, assignee: users.email })
		.from(workOrders)
		.innerJoin(users, eq(users.id, workOrders.assigneeId))
		.where(
			and(
				inArray(workOrders.status, [...OPEN_WORK_ORDER_STATUSES]),
				gte(workOrders.dueOn, range.from),
				lte(workOrders.dueOn, range.to),
				assigneeEmail ? eq(users.email, assigneeEmail) : undefined
			)
		);
}
