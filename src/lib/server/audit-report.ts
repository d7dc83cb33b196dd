/**
 * The audit report: for a range of days and optionally an area, what was inspected, the break-in
 * runs, part swaps, holds and releases, flags raised and cleared, and the fixtures overdue at the
 * range's end. Built a page at a time per section (reads in audit-report-rows.ts, rows in words
 * in audit-report-map.ts); `sectionPages` walks a whole section for the PDF, still a page per query.
 */
import { clearedByWords, openForWords } from '../domain/audit-words';
import { dayOf, rangeInstants, rangeWords } from '../domain/report-range';
import {
	REPORT_CURSOR,
	REPORT_PDF_SECTION_ROWS,
	REPORT_SECTIONS,
	reportCursor,
	type ReportQuery,
	type ReportSection
} from '../schemas/audit-report';
import type {
	AuditReport,
	FlagClearedRow,
	FlagRaisedRow,
	OverdueRow,
	ReportPage,
	ReportSections
} from '../schemas/audit-report-views';
import {
	breakInRows,
	flagBase,
	holdRow,
	inspectionRow,
	iso,
	partSwapRow
} from './audit-report-map';
import * as rows from './audit-report-rows';
import type { FlagRowData, ReportBounds } from './audit-report-rows';
import { scanOnRead } from './due-scan';
import { assertCan, type Actor } from './guard';

/** Rows per section on one page of the report. */
export const REPORT_PAGE_ROWS = 100;

const SECTION_EVENT_KINDS: Record<'inspections' | 'break-in' | 'part-swaps' | 'holds', string[]> = {
	inspections: ['inspection'],
	'break-in': ['break-in'],
	'part-swaps': ['part-swap'],
	holds: ['hold', 'release']
};
const FLAG_SELECTION = {
	'flags-raised': 'raised',
	'flags-cleared': 'cleared',
	overdue: 'overdue'
} as const;

/** One page of a section's rows, with the cursor of the row after which the next page starts. */
async function sectionRows(
	section: ReportSection,
	b: ReportBounds,
	after: rows.After | null,
	limit: number
): Promise<{ rows: ReportSections[ReportSection]['rows']; last: string | null; more: boolean }> {
	if (section in SECTION_EVENT_KINDS) {
		// One row more than the page, to know whether another page follows.
		const read = await rows.eventPage(
			SECTION_EVENT_KINDS[section as keyof typeof SECTION_EVENT_KINDS],
			b,
			after,
			limit + 1
		);
		const list = read.slice(0, limit);
		const last = list.at(-1);
		const cursor = last ? reportCursor({ at: iso(last.occurred_at), id: last.id }) : null;
		const out =
			section === 'inspections'
				? list.map(inspectionRow)
				: section === 'break-in'
					? await breakInRows(list)
					: section === 'part-swaps'
						? list.map(partSwapRow)
						: list.map(holdRow);
		return { rows: out, last: cursor, more: read.length > limit };
	}
	const which = FLAG_SELECTION[section as keyof typeof FLAG_SELECTION];
	const read = await rows.flagPage(which, b, after, limit + 1);
	const list = read.slice(0, limit);
	const last = list.at(-1);
	const at = (r: FlagRowData) => (which === 'cleared' ? r.cleared_at! : r.raised_at);
	const cursor = last ? reportCursor({ at: iso(at(last)), id: last.id }) : null;
	const out =
		which === 'raised'
			? list.map((r): FlagRaisedRow => ({
					...flagBase(r),
					clearedAt: r.cleared_at ? iso(r.cleared_at) : null
				}))
			: which === 'cleared'
				? list.map((r): FlagClearedRow => ({
						...flagBase(r),
						clearedAt: iso(r.cleared_at!),
						clearedBy: clearedByWords(
							r.cleared_by_kind ? { kind: r.cleared_by_kind, by: r.cleared_by_name ?? '?' } : null
						),
						openFor: openForWords(r.raised_at.getTime(), r.cleared_at!.getTime())
					}))
				: list.map((r): OverdueRow => ({
						...flagBase(r),
						openFor: openForWords(r.raised_at.getTime(), b.end.getTime())
					}));
	return { rows: out, last: cursor, more: read.length > limit };
}

function countOf(section: ReportSection, b: ReportBounds): Promise<number> {
	return section in SECTION_EVENT_KINDS
		? rows.eventCount(SECTION_EVENT_KINDS[section as keyof typeof SECTION_EVENT_KINDS], b)
		: rows.flagCount(FLAG_SELECTION[section as keyof typeof FLAG_SELECTION], b);
}

function parseAfter(cursor: string | null): rows.After | null {
	const m = cursor ? REPORT_CURSOR.exec(cursor) : null;
	if (!m) return null;
	return { at: new Date(m[1]), id: /^\d+$/.test(m[2]) ? Number(m[2]) : m[2].toLowerCase() };
}

/** The bounds of a query at `now`: the end never later than now, for "open at the end". */
function boundsOf(query: ReportQuery, now: Date): ReportBounds {
	const { startMs, endMs } = rangeInstants(query.from, query.to);
	return {
		start: new Date(startMs),
		end: new Date(Math.min(endMs, now.getTime())),
		areaId: query.area
	};
}

export type ReportReading =
	| { ok: true; report: AuditReport; bounds: ReportBounds }
	| { ok: false; fields: Record<string, string[]> };

/**
 * The report for a valid query: every section's first page, or on a "more" page the one section
 * continuing after the cursor. An unknown area is refused with a field message.
 */
export async function auditReport(
	actor: Actor,
	query: ReportQuery,
	{ now = new Date(), pageRows = REPORT_PAGE_ROWS }: { now?: Date; pageRows?: number } = {}
): Promise<ReportReading> {
	assertCan(actor, 'fleet.view');
	const area = query.area === null ? null : await rows.reportArea(query.area);
	if (query.area !== null && !area) {
		return {
			ok: false,
			fields: { area: [`No area has the id ${query.area}; choose one from the list.`] }
		};
	}
	// Calendar flags fall due without any entry; bring them up to date before judging "overdue now".
	if (query.to >= dayOf(now.getTime())) await scanOnRead(undefined, now);
	const bounds = boundsOf(query, now);
	const wanted = query.section ? [query.section] : REPORT_SECTIONS;
	const sections: Partial<ReportSections> = {};
	// One section at a time (its count and page side by side): a report holds at most two
	// pooled connections, however many people print one at once.
	for (const section of wanted) {
		const after = query.section === section ? parseAfter(query.after) : null;
		const [total, page] = await Promise.all([
			countOf(section, bounds),
			sectionRows(section, bounds, after, pageRows)
		]);
		(sections as Record<string, ReportPage<unknown>>)[section] = {
			total,
			rows: page.rows,
			next: page.more ? page.last : null
		};
	}
	return {
		ok: true,
		bounds,
		report: {
			from: query.from,
			to: query.to,
			rangeWords: rangeWords(query.from, query.to),
			endsAt: iso(bounds.end),
			area,
			generatedAt: iso(now),
			only: query.section,
			sections
		}
	};
}

/**
 * Every row of one section for the PDF, a page per query, at most `cap` rows; yields pages so the
 * caller can lay them out as they come.
 */
export async function* sectionPages(
	section: ReportSection,
	bounds: ReportBounds,
	{ pageRows = 500, cap = REPORT_PDF_SECTION_ROWS }: { pageRows?: number; cap?: number } = {}
): AsyncGenerator<ReportSections[ReportSection]['rows']> {
	let after: rows.After | null = null;
	let seen = 0;
	while (seen < cap) {
		const page = await sectionRows(section, bounds, after, Math.min(pageRows, cap - seen));
		if (page.rows.length) yield page.rows;
		seen += page.rows.length;
		if (!page.more || !page.last) return;
		after = parseAfter(page.last);
	}
}
