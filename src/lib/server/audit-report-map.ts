/** The audit report's rows in words: database rows of audit-report-rows.ts as the views show them. */
import { RUN_OUTCOME_WORDS, finalRWords, runOutcome } from '../domain/audit-words';
import { breakInCurve, type CurveReading } from '../domain/break-in-curves';
import { eventDetails, gradeWords } from '../domain/event-details';
import { FLAG_LABELS, type FlagKind } from '../schemas/fixture';
import type {
	BreakInRow,
	HoldRow,
	InspectionRow,
	PartSwapRow,
	ReportFixture
} from '../schemas/audit-report-views';
import * as rows from './audit-report-rows';
import type { EventRowData, FixtureColumns, FlagRowData } from './audit-report-rows';
import { loadHealthFixtures } from './health';
import { policiesFor } from './state-store';

/** An instant as the views carry it. */
export const iso = (d: Date) => d.toISOString();
const fixtureOf = (r: FixtureColumns): ReportFixture => ({
	code: r.code,
	name: r.name,
	area: r.area,
	location: r.location
});
const text = (v: unknown) => (typeof v === 'string' && v.trim() ? v.trim() : null);
const kindWords = (k: string) => FLAG_LABELS[k as FlagKind] ?? k;
const noPlace = (id: string) => `location ${id}`;

/** An inspection with its graded contacts in words and its photo ids. */
export function inspectionRow(r: EventRowData): InspectionRow {
	const p = r.payload;
	const d = eventDetails('inspection', p, noPlace);
	const contacts = Array.isArray(p.contacts) ? (p.contacts as Record<string, unknown>[]) : [];
	return {
		eventId: r.id,
		occurredAt: iso(r.occurred_at),
		fixture: fixtureOf(r),
		by: r.by_name,
		verdict: text(p.verdict),
		summary: d.summary,
		contacts: contacts.map((c) => {
			const grade = typeof c?.grade === 'number' ? c.grade : null;
			const marks = Array.isArray(c?.marks) ? (c.marks as unknown[]).filter(text) : [];
			return {
				contact: text(c?.contact) ?? 'Contact',
				grade,
				words: [grade === null ? 'not graded' : gradeWords(grade), ...marks].join(', ')
			};
		}),
		note: text(p.note),
		photoIds: d.photoIds
	};
}

/** Break-in runs with their final R and outcome (reads the fixtures' policies and flags). */
export async function breakInRows(list: EventRowData[]): Promise<BreakInRow[]> {
	const ids = [...new Set(list.map((r) => r.fixture_id))];
	// Reads one after the other: each takes its own pooled connection and gives it back.
	const fixtures = await loadHealthFixtures(ids);
	const policies = await policiesFor(fixtures);
	const flags = await rows.breakInFlags(ids);
	return list.map((r) => {
		const policy = policies.get(r.fixture_id);
		const spec = policy?.repeatabilitySpec_um ?? 1;
		const window = policy?.settleWindow ?? 10;
		const readings = Array.isArray(r.payload.readings)
			? (r.payload.readings as CurveReading[])
			: [];
		const cycles = typeof r.payload.cycles === 'number' ? r.payload.cycles : readings.length;
		let finalR: number | null = null;
		try {
			const points = breakInCurve(
				readings,
				Math.max(cycles, readings.length, 1),
				window,
				spec
			).points;
			finalR = points.length ? points[points.length - 1].R : null;
		} catch {
			// A payload the curve cannot read (stored under an older shape) has no final R.
		}
		const outcome = runOutcome(
			{ id: r.id, receivedAtMs: r.received_at.getTime() },
			flags
				.filter((f) => f.fixture_id === r.fixture_id)
				.map((f) => ({
					raisedAtMs: f.raised_at.getTime(),
					clearedAtMs: f.cleared_at?.getTime() ?? null,
					clearedByEventId: f.cleared_by_event_id
				}))
		);
		return {
			eventId: r.id,
			occurredAt: iso(r.occurred_at),
			fixture: fixtureOf(r),
			by: r.by_name,
			cycles,
			readings: readings.length,
			finalR_um: finalR,
			spec_um: spec,
			window,
			finalRWords: finalRWords(finalR, spec, readings.length, window),
			outcome,
			outcomeWords: RUN_OUTCOME_WORDS[outcome],
			note: text(r.payload.note)
		};
	});
}

/** A part swap in words. */
export function partSwapRow(r: EventRowData): PartSwapRow {
	const d = eventDetails('part-swap', r.payload, noPlace);
	const base = { eventId: r.id, occurredAt: iso(r.occurred_at), fixture: fixtureOf(r) };
	return { ...base, by: r.by_name, summary: d.summary, details: d.lines };
}

/** A hold with its reason, or a release with its note. */
export function holdRow(r: EventRowData): HoldRow {
	const kind = r.kind === 'release' ? 'release' : 'hold';
	const reason =
		kind === 'hold'
			? (text(r.payload.reason) ?? 'No reason given')
			: (text(r.payload.note) ?? 'Back in service (no note)');
	const base = { eventId: r.id, occurredAt: iso(r.occurred_at), fixture: fixtureOf(r) };
	return { ...base, by: r.by_name, kind, reason };
}

/** What every flag row carries. */
export function flagBase(r: FlagRowData) {
	return {
		id: r.id,
		kind: r.kind,
		kindWords: kindWords(r.kind),
		fixture: fixtureOf(r),
		raisedAt: iso(r.raised_at),
		reason: r.reason
	};
}
