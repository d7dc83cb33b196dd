/**
 * The audit report as pages and the PDF show it: plain types, no I/O (built in
 * $lib/server/audit-report). Times are ISO strings (UTC).
 */
import type { RunOutcome } from '../domain/audit-words';
import type { ReportSection } from './audit-report';

/** The fixture a row is about, with where it lives now. */
export interface ReportFixture {
	code: string;
	name: string;
	area: string;
	location: string;
}

/** What every event row carries: the entry, its fixture and who logged it. */
export interface ReportEventRow {
	eventId: string;
	occurredAt: string;
	fixture: ReportFixture;
	by: string;
}

/** One graded contact of an inspection, in words. */
export interface ReportContactGrade {
	contact: string;
	grade: number | null;
	/** "grade 2 (Dulled), fretting" */
	words: string;
}

export interface InspectionRow extends ReportEventRow {
	verdict: string | null;
	/** "Verdict: watch — worst grade 2 (Dulled)" */
	summary: string;
	contacts: ReportContactGrade[];
	note: string | null;
	photoIds: string[];
}

export interface BreakInRow extends ReportEventRow {
	cycles: number;
	readings: number;
	/** R = 4s of the run's last settling window (µm), worst axis; null with too few readings. */
	finalR_um: number | null;
	spec_um: number;
	window: number;
	finalRWords: string;
	outcome: RunOutcome;
	outcomeWords: string;
	note: string | null;
}

export interface PartSwapRow extends ReportEventRow {
	/** "Replaced balls and seats" */
	summary: string;
	details: string[];
}

export interface HoldRow extends ReportEventRow {
	kind: 'hold' | 'release';
	/** The hold's reason or the release's note, in words. */
	reason: string;
}

/** A flag raised in the range. */
export interface FlagRaisedRow {
	id: number;
	kind: string;
	kindWords: string;
	fixture: ReportFixture;
	raisedAt: string;
	reason: string;
	/** When it was cleared (possibly after the range); null when still open. */
	clearedAt: string | null;
}

/** A flag cleared in the range. */
export interface FlagClearedRow {
	id: number;
	kind: string;
	kindWords: string;
	fixture: ReportFixture;
	raisedAt: string;
	clearedAt: string;
	/** Why it was raised (its last stated reason). */
	reason: string;
	/** What cleared it, in words. */
	clearedBy: string;
	openFor: string;
}

/** A due flag open at the end of the range: its fixture was overdue then. */
export interface OverdueRow {
	id: number;
	kind: string;
	kindWords: string;
	fixture: ReportFixture;
	raisedAt: string;
	reason: string;
	/** "open 12 days" at the end of the range */
	openFor: string;
}

/** One page of a section: the rows, how many the range holds, and where the next page starts. */
export interface ReportPage<T> {
	total: number;
	rows: T[];
	/** Cursor of the next page of this section; null on the last. */
	next: string | null;
}

export interface ReportSections {
	inspections: ReportPage<InspectionRow>;
	'break-in': ReportPage<BreakInRow>;
	'part-swaps': ReportPage<PartSwapRow>;
	holds: ReportPage<HoldRow>;
	'flags-raised': ReportPage<FlagRaisedRow>;
	'flags-cleared': ReportPage<FlagClearedRow>;
	overdue: ReportPage<OverdueRow>;
}

/** The report: its range, area, when it was made, and its sections (all, or the one asked for). */
export interface AuditReport {
	from: string;
	to: string;
	rangeWords: string;
	/** The range's end as an instant (midnight after `to`, or now when that is later than now). */
	endsAt: string;
	area: { id: number; name: string } | null;
	generatedAt: string;
	/** Set on a "more" page: the one section shown. */
	only: ReportSection | null;
	sections: Partial<ReportSections>;
}
