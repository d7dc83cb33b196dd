/**
 * The planner's calendar at the boundary: its URL (`/plan/calendar?view=&date=&assignee=&area=
 * &action=`) and the move form (`?/move`: id, dueOn, and the date the page showed, to catch a
 * stale page).
 */
import { z } from 'zod';
import { CALENDAR_VIEWS, type CalendarView } from '../domain/calendar';
import { parseQueryDroppingBad, planQuerySchema } from './plan';
import { isoDateSchema, type WorkOrderAction, type WorkOrderStatus } from './work-orders';

const blank = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);

/** The calendar's URL query; `date` defaults to today, filled in by the caller. */
export const calendarQuerySchema = z.object({
	view: z.preprocess(
		blank,
		z.enum(CALENDAR_VIEWS, { error: 'view is month or week.' }).default('month')
	),
	date: z.preprocess(blank, isoDateSchema('date').optional()),
	assignee: planQuerySchema.shape.assignee,
	area: planQuerySchema.shape.area,
	action: planQuerySchema.shape.action
});
export type CalendarQuery = Omit<z.output<typeof calendarQuerySchema>, 'date'> & { date: string };

/** Reads the calendar's URL; a bad value is dropped and named, so a shared link still opens. */
export function parseCalendarQuery(
	params: URLSearchParams,
	today: string
): { query: CalendarQuery; errors: Record<string, string> | null } {
	const { query, errors } = parseQueryDroppingBad(calendarQuerySchema, params);
	return { query: { ...query, date: query.date ?? today }, errors };
}

/** The calendar's URL for `q` (defaults left out; `date` kept only when it is not today). */
export function calendarHref(q: Partial<CalendarQuery> & { view?: CalendarView }, today?: string) {
	const p = new URLSearchParams();
	if (q.view && q.view !== 'month') p.set('view', q.view);
	if (q.date && q.date !== today) p.set('date', q.date);
	if (q.assignee) p.set('assignee', q.assignee);
	if (q.area) p.set('area', String(q.area));
	if (q.action) p.set('action', q.action);
	const s = p.toString();
	return `/plan/calendar${s ? `?${s}` : ''}`;
}

/** `?/move`: one order to a new day. */
export const calendarMoveSchema = z.object({
	id: z.coerce
		.number({ error: 'That is not a work order.' })
		.int('That is not a work order.')
		.positive('That is not a work order.'),
	dueOn: isoDateSchema('The new due date'),
	/** The due date the page showed ("" for none), to refuse a move made on a stale page. */
	from: z.union([z.literal(''), isoDateSchema('from')]).optional()
});
export type CalendarMove = z.output<typeof calendarMoveSchema>;

/** A work order as the calendar shows it. */
export interface CalendarOrder {
	id: number;
	fixtureCode: string;
	fixtureName: string;
	place: string;
	action: WorkOrderAction;
	actionText: string | null;
	status: WorkOrderStatus;
	dueOn: string | null;
	assigneeEmail: string | null;
	assigneeName: string | null;
	overdue: boolean;
}
