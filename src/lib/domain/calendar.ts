/**
 * The planner's calendar as plain rules: which days a month or week view shows (weeks start on
 * Monday, ISO 8601), the previous and next period, how many open orders each technician has on a
 * day against the office's capacity, and which orders may be moved. Dates are calendar dates
 * (YYYY-MM-DD) counted in UTC, as due dates are stored. No I/O.
 */
import { isoWeek, mondayOf } from './fleet-stats';
import { addDays, isOpenStatus, isOverdue, type WorkOrderStatus } from './work-orders';

export { isOverdue };

/** The calendar's two views. */
export const CALENDAR_VIEWS = ['month', 'week'] as const;
export type CalendarView = (typeof CALENDAR_VIEWS)[number];

/** One day of a grid. */
export interface GridDay {
	/** YYYY-MM-DD. */
	date: string;
	/** Monday = 1 … Sunday = 7 (ISO 8601). */
	weekday: number;
	/** False for the neighbouring months' days that pad a month view to whole weeks. */
	inPeriod: boolean;
}

/** One row of a grid: an ISO week. */
export interface GridWeek {
	/** "2026-W49". */
	label: string;
	days: GridDay[];
}

/** The days a view shows, the period it stands for, and the dates either side of it. */
export interface CalendarGrid {
	view: CalendarView;
	weeks: GridWeek[];
	/** First and last day shown (inclusive), padding included. */
	from: string;
	to: string;
	/** First and last day of the period itself: the month, or the week. */
	periodStart: string;
	periodEnd: string;
	/** A date in the previous and the next period (its first day). */
	previous: string;
	next: string;
}

const ms = (date: string) => Date.parse(`${date}T00:00:00Z`);

/** Whether `s` is a real calendar date written YYYY-MM-DD. */
export function isIsoDate(s: string): boolean {
	if (!/^\d{4}-\d{2}-\d{2}$/.test(s)) return false;
	const t = ms(s);
	return !Number.isNaN(t) && new Date(t).toISOString().slice(0, 10) === s;
}

/** Monday = 1 … Sunday = 7 of a date (ISO 8601). */
export function isoWeekday(date: string): number {
	const day = Math.floor(ms(date) / 86_400_000);
	// 1970-01-01 (day 0) was a Thursday (4).
	return ((((day + 3) % 7) + 7) % 7) + 1;
}

/** The ISO week label of a date: "2026-W49". */
export function isoWeekLabel(date: string): string {
	return isoWeek(ms(date)).label;
}

/** The Monday of the ISO week holding `date`. */
export function weekStart(date: string): string {
	return mondayOf(ms(date));
}

/** The first day of the month holding `date`. */
export function monthStart(date: string): string {
	return `${date.slice(0, 7)}-01`;
}

/** The last day of the month holding `date`. */
export function monthEnd(date: string): string {
	const y = Number(date.slice(0, 4));
	const m = Number(date.slice(5, 7));
	// Day 0 of the next month is the last day of this one.
	return new Date(Date.UTC(y, m, 0)).toISOString().slice(0, 10);
}

/** The first day of the month `months` away from the one holding `date`. */
export function addMonths(date: string, months: number): string {
	const y = Number(date.slice(0, 4));
	const m = Number(date.slice(5, 7)) - 1 + months;
	return new Date(Date.UTC(y, m, 1)).toISOString().slice(0, 10);
}

function weeksBetween(from: string, to: string, start: string, end: string): GridWeek[] {
	const weeks: GridWeek[] = [];
	for (let monday = from; monday <= to; monday = addDays(monday, 7)) {
		const days: GridDay[] = [];
		for (let i = 0; i < 7; i++) {
			const date = addDays(monday, i);
			days.push({ date, weekday: i + 1, inPeriod: date >= start && date <= end });
		}
		weeks.push({ label: isoWeekLabel(monday), days });
	}
	return weeks;
}

/**
 * The grid of a view around `date`: for a month, every ISO week that holds one of its days (four
 * to six rows, padded with the neighbouring months' days); for a week, its seven days.
 */
export function calendarGrid(view: CalendarView, date: string): CalendarGrid {
	if (!isIsoDate(date)) throw new RangeError(`not a date: ${date}`);
	if (view === 'week') {
		const start = weekStart(date);
		const end = addDays(start, 6);
		return {
			view,
			weeks: weeksBetween(start, start, start, end),
			from: start,
			to: end,
			periodStart: start,
			periodEnd: end,
			previous: addDays(start, -7),
			next: addDays(start, 7)
		};
	}
	const start = monthStart(date);
	const end = monthEnd(date);
	const from = weekStart(start);
	const lastMonday = weekStart(end);
	return {
		view,
		weeks: weeksBetween(from, lastMonday, start, end),
		from,
		to: addDays(lastMonday, 6),
		periodStart: start,
		periodEnd: end,
		previous: addMonths(date, -1),
		next: addMonths(date, 1)
	};
}

/** What the keyboard asks of a picked-up order: a day either way, or a week. */
export type TargetKey = 'ArrowLeft' | 'ArrowRight' | 'ArrowUp' | 'ArrowDown';

const STEP: Record<TargetKey, number> = {
	ArrowLeft: -1,
	ArrowRight: 1,
	ArrowUp: -7,
	ArrowDown: 7
};

/**
 * The target day after an arrow key, or null when it would leave the days shown (the calendar
 * then says to page first; crossing periods by keyboard is not offered).
 */
export function stepTarget(
	target: string,
	key: TargetKey,
	shown: { from: string; to: string }
): string | null {
	const next = addDays(target, STEP[key]);
	return next < shown.from || next > shown.to ? null : next;
}

/** An order as the calendar counts it. */
export interface CountedOrder {
	status: WorkOrderStatus;
	dueOn: string | null;
	/** Whom it is assigned to (any stable key: an id or an e-mail address); null if nobody. */
	assignee: string | null;
}

/** One technician's load on one day. */
export interface DayLoad {
	assignee: string;
	/** Open orders (planned, scheduled, under way) due that day. */
	count: number;
	over: boolean;
}

/** Whether `count` orders on one day are more than one technician can take on. */
export function isOverCapacity(count: number, capacity: number): boolean {
	return count > capacity;
}

/**
 * Per day, per technician, the open orders due that day and whether that is over the capacity.
 * Done and cancelled orders, undated ones and unassigned ones are not counted. Days are keyed by
 * date; within a day the technicians are in the order of their keys.
 */
export function dayLoads(orders: CountedOrder[], capacity: number): Map<string, DayLoad[]> {
	const counts = new Map<string, Map<string, number>>();
	for (const o of orders) {
		if (!o.dueOn || !o.assignee || !isOpenStatus(o.status)) continue;
		const day = counts.get(o.dueOn) ?? new Map<string, number>();
		day.set(o.assignee, (day.get(o.assignee) ?? 0) + 1);
		counts.set(o.dueOn, day);
	}
	const out = new Map<string, DayLoad[]>();
	for (const [date, day] of counts) {
		out.set(
			date,
			[...day.keys()].sort().map((assignee) => ({
				assignee,
				count: day.get(assignee)!,
				over: isOverCapacity(day.get(assignee)!, capacity)
			}))
		);
	}
	return out;
}

/**
 * Null when an order standing at `status` may be moved to another day, else the sentence that
 * says why not (shown beside the order; the service refuses the same with 409).
 */
export function moveRefusal(status: WorkOrderStatus): string | null {
	if (status === 'done') return 'Done: a finished work order keeps its date.';
	if (status === 'cancelled') return 'Cancelled: a cancelled work order keeps its date.';
	return null;
}
