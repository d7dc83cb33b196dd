/**
 * The audit report's words: section titles and the conventions each section follows, shown on the
 * page and printed in the PDF alike.
 */
import type { ReportSection } from '../schemas/audit-report';

/** Section titles, in report order. */
export const REPORT_SECTION_TITLES: Record<ReportSection, string> = {
	inspections: 'Inspections',
	'break-in': 'Break-in runs',
	'part-swaps': 'Part swaps',
	holds: 'Holds and releases',
	'flags-raised': 'Flags raised',
	'flags-cleared': 'Flags cleared',
	overdue: 'Overdue at the end of the range'
};

/** What the section counts, for "12 inspections". */
export const REPORT_SECTION_UNITS: Record<ReportSection, [string, string]> = {
	inspections: ['inspection', 'inspections'],
	'break-in': ['run', 'runs'],
	'part-swaps': ['part swap', 'part swaps'],
	holds: ['hold or release', 'holds and releases'],
	'flags-raised': ['flag raised', 'flags raised'],
	'flags-cleared': ['flag cleared', 'flags cleared'],
	overdue: ['overdue flag', 'overdue flags']
};

/** The conventions the report follows, one sentence each. */
export const REPORT_CONVENTIONS = {
	range:
		'Dates are whole days in UTC, both ends included. Entries are placed by when they happened (the device clock); flags by when the register raised or cleared them.',
	area: 'An area filter follows where each fixture is now, not where it was when the entry was made.',
	breakIn:
		'Final R is R = 4s over the last settling window of the run (worst axis), against the spec of the fixture’s current policy. “Settled” means the run cleared the fixture’s break-in-due flag.',
	overdue:
		'A fixture counts as overdue at the end of the range when a break-in-due, cleaning-due or inspection-due flag was open then: raised before the end and not cleared by it. For a range that ends today, the end is the time the report was made.'
} as const;

/** "12 inspections", "1 run". */
export function sectionCount(section: ReportSection, n: number): string {
	const [one, many] = REPORT_SECTION_UNITS[section];
	return `${n.toLocaleString('en-GB')} ${n === 1 ? one : many}`;
}

/** "2026-10-12 13:14 UTC" from an ISO time. */
export function reportStamp(iso: string): string {
	return `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC`;
}
