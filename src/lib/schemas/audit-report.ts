/**
 * The audit report's query (`/board/report` and `/board/report.pdf`): a range of calendar dates
 * (UTC, both ends included; the last 90 days when none is given), an optional area, and for the
 * "more" pages one section with the cursor after which it continues.
 */
import { z } from 'zod';
import {
	REPORT_MAX_DAYS,
	defaultRange,
	isCalendarDate,
	rangeProblems
} from '../domain/report-range';

export { REPORT_MAX_DAYS };

/** Rows per section the PDF lists; beyond them it says how many more the range holds. */
export const REPORT_PDF_SECTION_ROWS = 1000;

/** The report's sections, in the order they are shown. */
export const REPORT_SECTIONS = [
	'inspections',
	'break-in',
	'part-swaps',
	'holds',
	'flags-raised',
	'flags-cleared',
	'overdue'
] as const;
export type ReportSection = (typeof REPORT_SECTIONS)[number];

/**
 * Where a section continues: after the row with this time and id (an event's UUID or a flag's
 * number), the last one of the page before.
 */
export const REPORT_CURSOR =
	/^(\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z)~([0-9a-f-]{36}|\d{1,10})$/i;

const blank = (v: unknown) =>
	v === null || (typeof v === 'string' && v.trim() === '') ? undefined : v;
const trimmed = (v: unknown) => (typeof v === 'string' ? v.trim() : v);

const calendarDate = (what: string) =>
	z.preprocess(
		(v) => blank(trimmed(v)),
		z
			.string()
			.refine(isCalendarDate, `The ${what} must be a date written YYYY-MM-DD, such as 2026-09-01.`)
			.optional()
	);

const querySchema = z.object({
	from: calendarDate('start date'),
	to: calendarDate('end date'),
	area: z.preprocess(
		(v) => {
			const b = blank(trimmed(v));
			return typeof b === 'string' && /^\d{1,10}$/.test(b) ? Number(b) : b;
		},
		z.number({ error: 'Choose an area from the list, or all areas.' }).int().positive().optional()
	),
	section: z.preprocess(
		blank,
		z
			.enum(REPORT_SECTIONS, {
				error: `The section must be one of: ${REPORT_SECTIONS.join(', ')}.`
			})
			.optional()
	),
	after: z.preprocess(
		blank,
		z
			.string()
			.regex(REPORT_CURSOR, 'The page link is not valid; open the report again from its start.')
			.optional()
	)
});

/** A valid report query, defaults filled in. */
export interface ReportQuery {
	from: string;
	to: string;
	area: number | null;
	/** Only this section, continuing after `after` (the "more" pages). */
	section: ReportSection | null;
	after: string | null;
}

/** The query as typed, to fill the form in again. */
export interface ReportFormValues {
	from: string;
	to: string;
	area: string;
}

export type ReportQueryReading =
	| { ok: true; query: ReportQuery; values: ReportFormValues }
	| { ok: false; fields: Record<string, string[]>; values: ReportFormValues };

const one = (params: URLSearchParams, key: string) => params.get(key) ?? undefined;

/**
 * Reads a report query; `today` (YYYY-MM-DD, UTC) sets the default range and the latest end.
 * A cursor without a section (or the other way round) is refused.
 */
export function parseReportQuery(params: URLSearchParams, today: string): ReportQueryReading {
	const raw = Object.fromEntries(
		['from', 'to', 'area', 'section', 'after'].map((k) => [k, one(params, k)])
	);
	const values: ReportFormValues = {
		from: (raw.from ?? '').trim(),
		to: (raw.to ?? '').trim(),
		area: (raw.area ?? '').trim()
	};
	const parsed = querySchema.safeParse(raw);
	if (!parsed.success) {
		const fields: Record<string, string[]> = {};
		for (const issue of parsed.error.issues) {
			const key = String(issue.path[0] ?? 'query');
			(fields[key] ??= []).push(issue.message);
		}
		return { ok: false, fields, values };
	}
	const q = parsed.data;
	// Either end alone: the end defaults to today, the start to 90 days before the end.
	const to = q.to ?? today;
	const from = q.from ?? defaultRange(to).from;
	const problems = rangeProblems(from, to, today);
	const fields: Record<string, string[]> = {};
	for (const [k, m] of Object.entries(problems)) fields[k] = [m];
	if (q.after && !q.section)
		fields.after = ['A page link needs its section; open the report again.'];
	if (Object.keys(fields).length) return { ok: false, fields, values };
	return {
		ok: true,
		query: { from, to, area: q.area ?? null, section: q.section ?? null, after: q.after ?? null },
		values: { from, to, area: q.area ? String(q.area) : '' }
	};
}

/** The query string of a report (and of one section's next page), for links. */
export function reportSearch(
	q: Pick<ReportQuery, 'from' | 'to' | 'area'>,
	next?: { section: ReportSection; after: string }
): string {
	const p = new URLSearchParams({ from: q.from, to: q.to });
	if (q.area !== null) p.set('area', String(q.area));
	if (next) {
		p.set('section', next.section);
		p.set('after', next.after);
	}
	return `?${p}`;
}

/** The cursor of a row: its time and id. */
export function reportCursor(row: { at: string; id: string | number }): string {
	return `${row.at}~${row.id}`;
}
