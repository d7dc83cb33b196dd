/**
 * The date range of the audit report: whole calendar days in UTC, both ends included, so
 * "2026-09-01 to 2026-09-30" covers every event from 2026-09-01T00:00Z up to, but not including,
 * 2026-10-01T00:00Z. Dates are written YYYY-MM-DD (ISO 8601 calendar dates).
 */

export const DAY_MS = 86_400_000;
/** The range shown when none is asked for: the last 90 days, today included. */
export const REPORT_DEFAULT_DAYS = 90;
/** The longest range one report covers: three years (one of them a leap year). */
export const REPORT_MAX_DAYS = 3 * 365 + 1;

const DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

/** Whether `s` is a real calendar date written YYYY-MM-DD (no 2026-02-30). */
export function isCalendarDate(s: string): boolean {
	const m = DATE.exec(s);
	if (!m) return false;
	const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
	const t = new Date(Date.UTC(y, mo - 1, d));
	return t.getUTCFullYear() === y && t.getUTCMonth() === mo - 1 && t.getUTCDate() === d;
}

/** Midnight UTC at the start of a calendar date, in ms since the epoch. */
export function dayStartMs(day: string): number {
	return Date.parse(`${day}T00:00:00.000Z`);
}

/** The calendar date (UTC) of an instant in ms. */
export function dayOf(ms: number): string {
	return new Date(ms).toISOString().slice(0, 10);
}

/** The date `n` days after `day` (before it when `n` is negative). */
export function addDays(day: string, n: number): string {
	return dayOf(dayStartMs(day) + n * DAY_MS);
}

/** Days in the range, both ends counted (the same day twice is one day). */
export function daysInRange(from: string, to: string): number {
	return Math.round((dayStartMs(to) - dayStartMs(from)) / DAY_MS) + 1;
}

/** The default range ending `today`: the last REPORT_DEFAULT_DAYS days. */
export function defaultRange(today: string): { from: string; to: string } {
	return { from: addDays(today, -(REPORT_DEFAULT_DAYS - 1)), to: today };
}

/** The instants a range covers: start included, end excluded (midnight after the last day). */
export function rangeInstants(from: string, to: string): { startMs: number; endMs: number } {
	return { startMs: dayStartMs(from), endMs: dayStartMs(to) + DAY_MS };
}

/**
 * What is wrong with a range of valid dates, by field, in words a person can act on; empty when
 * nothing is. The end may not be after `today` (nothing is logged in the future).
 */
export function rangeProblems(
	from: string,
	to: string,
	today: string
): { from?: string; to?: string } {
	if (to > today) return { to: `The end date is after today (${today}); choose today or earlier.` };
	if (from > to) return { from: `The start date (${from}) is after the end date (${to}).` };
	const days = daysInRange(from, to);
	if (days > REPORT_MAX_DAYS) {
		return {
			from: `The range covers ${days} days; one report covers at most ${REPORT_MAX_DAYS} days (three years). Start on ${addDays(to, -(REPORT_MAX_DAYS - 1))} or later.`
		};
	}
	return {};
}

const MONTHS = [
	'January',
	'February',
	'March',
	'April',
	'May',
	'June',
	'July',
	'August',
	'September',
	'October',
	'November',
	'December'
];

/** "7 September 2026" for a calendar date. */
export function dayWords(day: string): string {
	const [y, m, d] = day.split('-').map(Number);
	return `${d} ${MONTHS[m - 1]} ${y}`;
}

/** "7 September 2026 to 5 December 2026 (90 days)" for a range. */
export function rangeWords(from: string, to: string): string {
	const days = daysInRange(from, to);
	const span = from === to ? dayWords(from) : `${dayWords(from)} to ${dayWords(to)}`;
	return `${span} (${days} ${days === 1 ? 'day' : 'days'})`;
}
