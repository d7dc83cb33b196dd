import { randomUUID } from 'node:crypto';
import type { RowDataPacket } from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseReportQuery, type ReportQuery } from '$lib/schemas/audit-report';
import type { AuditReport, ReportSections } from '$lib/schemas/audit-report-views';
import { auditReport } from '$lib/server/audit-report';
import { getPool } from '$lib/server/db';
import type { Actor } from '$lib/server/guard';
import { ingestBatch } from '$lib/server/ingest';
import { GET as getPdf } from '../../../src/routes/(app)/board/report.pdf/+server';
import { closeDb, makeArea, makeFixture, makeLocation, makeUser, resetDb } from '../helpers/db';

// A fortnight of entries on two fixtures in two areas, ingested as the phones send them (each
// batch at its own server time, so the flags carry the times a real day would give them), with
// entries just before and after the range that the report must leave out.

beforeAll(resetDb);
afterAll(closeDb);

const DAY = 86_400_000;
const day = (n: number) => new Date(Date.UTC(2026, 5, 1) + n * DAY); // 2026-06-01 + n days
const at = (n: number, hour: number) => new Date(day(n).getTime() + hour * 3_600_000);
/** The range: 2026-06-10 to 2026-06-19 (days 9 to 18). */
const RANGE = { from: '2026-06-10', to: '2026-06-19' };

/** Ten readings whose pattern repeats: every window has the same R (about 0.49 µm). */
const STEADY = [0, 0.1, 0.2, 0.1, 0, -0.1, -0.2, -0.1, 0, 0.1];
const steady = (i: number) => ({ dx: STEADY[i % 10], dy: STEADY[(i + 3) % 10] });
const run = (cycles: number) => ({
	cycles,
	readings: Array.from({ length: cycles }, (_, i) => steady(i))
});

let tech: Actor;
let supervisor: Actor;
let operator: Actor;
let areaA: { id: number; name: string };
let fA: { id: number; code: string };
let fB: { id: number; code: string };
const ids: Record<string, string> = {};

/** Ingests one entry at `when` (the device clock), its batch arriving a minute later. */
async function log(key: string, code: string, kind: string, payload: object, when: Date) {
	const id = randomUUID();
	ids[key] = id;
	const event = { id, fixtureCode: code, kind, occurredAt: when.toISOString(), payload };
	const now = new Date(when.getTime() + 60_000);
	const [result] = await ingestBatch(tech, 'phone-1', [event], { now });
	expect(result.status, `${key}: ${JSON.stringify(result)}`).toBe('accepted');
}

async function report(q: Partial<ReportQuery> = {}, pageRows?: number): Promise<AuditReport> {
	const query: ReportQuery = { ...RANGE, area: null, section: null, after: null, ...q };
	const r = await auditReport(supervisor, query, { now: new Date(), pageRows });
	if (!r.ok) throw new Error(JSON.stringify(r.fields));
	return r.report;
}

async function sql<T = RowDataPacket>(text: string, params: unknown[] = []): Promise<T[]> {
	const [rows] = await getPool().query<RowDataPacket[]>(text, params);
	return rows as T[];
}

const eventIds = (s: ReportSections[keyof ReportSections] | undefined) =>
	(s?.rows as { eventId: string }[]).map((r) => r.eventId);
const flagIds = (s: ReportSections[keyof ReportSections] | undefined) =>
	(s?.rows as { id: number }[]).map((r) => r.id).sort((a, b) => a - b);

beforeAll(async () => {
	tech = await makeUser({ roles: ['technician'], name: 'Tessa Bench' });
	supervisor = await makeUser({ roles: ['supervisor'] });
	operator = await makeUser({ roles: ['operator'] });
	areaA = await makeArea({ name: 'Bay A' });
	const areaB = await makeArea({ name: 'Bay B' });
	fA = await makeFixture({ locationId: (await makeLocation({ areaId: areaA.id })).id });
	fB = await makeFixture({ locationId: (await makeLocation({ areaId: areaB.id })).id });

	const ball = [
		{ contact: 'Ball 1', grade: 2, marks: ['fretting'] },
		{ contact: 'Vee 1', grade: 1 }
	];
	// Before the range: a first reseat (break-in falls due on both) and an inspection.
	await log('reseatA', fA.code, 'reseat', { cycles: 1 }, at(2, 8));
	await log('reseatB', fB.code, 'reseat', { cycles: 1 }, at(2, 9));
	await log(
		'inspectBefore',
		fA.code,
		'inspection',
		{ contacts: ball, verdict: 'serviceable' },
		at(5, 13)
	);
	// In the range.
	await log('runA', fA.code, 'break-in', run(30), at(9, 9)); // settles fA
	await log('noteA', fA.code, 'note', { text: 'Indicator re-zeroed on the master.' }, at(9, 10));
	const photo = randomUUID();
	ids.photo = photo;
	await log(
		'inspectA',
		fA.code,
		'inspection',
		{ contacts: ball, verdict: 'watch', photoIds: [photo], note: 'Matt band on ball 1.' },
		at(10, 13)
	);
	await log(
		'inspectB',
		fB.code,
		'inspection',
		{ contacts: ball, verdict: 'serviceable' },
		at(11, 13)
	);
	await log('runB', fB.code, 'break-in', run(10), at(12, 9)); // too few cycles: not settled
	await log(
		'swapA',
		fA.code,
		'part-swap',
		{ replaced: ['balls'], description: 'Three new balls' },
		at(13, 8)
	);
	await log(
		'holdB',
		fB.code,
		'hold',
		{ reason: 'Vee insert chipped; waiting for inspection.' },
		at(14, 8)
	);
	await log('releaseB', fB.code, 'release', { note: 'Insert replaced.' }, at(16, 15));
	await log('inspectA2', fA.code, 'inspection', { contacts: ball, verdict: 'watch' }, at(18, 23.5));
	// After the range: fA settles again (its break-in-due flag is cleared after the end).
	await log(
		'inspectAfter',
		fA.code,
		'inspection',
		{ contacts: ball, verdict: 'watch' },
		at(19, 0.25)
	);
	await log('runAfter', fA.code, 'break-in', run(30), at(21, 9));
});

describe('the audit report after real ingests', () => {
	it('lists exactly the inspections of the range, oldest first, with grades, verdict and photos', async () => {
		const r = await report();
		expect(eventIds(r.sections.inspections)).toEqual([ids.inspectA, ids.inspectB, ids.inspectA2]);
		expect(r.sections.inspections!.total).toBe(3);
		const first = r.sections.inspections!.rows[0];
		expect(first).toMatchObject({
			fixture: { code: fA.code, area: 'Bay A' },
			by: 'Tessa Bench',
			verdict: 'watch',
			summary: 'Verdict: watch — worst grade 2 (Dulled)',
			contacts: [
				{ contact: 'Ball 1', grade: 2, words: 'grade 2 (Dulled), fretting' },
				{ contact: 'Vee 1', grade: 1, words: 'grade 1 (Tracked)' }
			],
			note: 'Matt band on ball 1.',
			photoIds: [ids.photo]
		});
	});

	it('lists break-in runs with cycles, final R and whether they settled', async () => {
		const runs = (await report()).sections['break-in']!;
		expect(runs.rows.map((x) => [x.eventId, x.outcome])).toEqual([
			[ids.runA, 'settled'],
			[ids.runB, 'not-settled']
		]);
		const a = runs.rows[0];
		expect(a.cycles).toBe(30);
		expect(a.readings).toBe(30);
		// The STEADY window (0, ±0.1, ±0.2 µm): mean 0.01, Σ(x − x̄)² = 0.129, sample
		// s = √(0.129 / 9) = 0.11972, R = 4s = 0.47889 µm (computed by hand).
		expect(a.finalR_um).toBeCloseTo(0.47889, 4);
		expect(a.finalRWords).toBe('0.479 µm (within the 1 µm spec)');
		expect(runs.rows[1].cycles).toBe(10);
	});

	it('lists part swaps, holds and releases with their reasons', async () => {
		const r = await report();
		expect(r.sections['part-swaps']!.rows).toMatchObject([
			{ eventId: ids.swapA, summary: 'Replaced balls', details: ['Three new balls'] }
		]);
		expect(r.sections.holds!.rows).toMatchObject([
			{ eventId: ids.holdB, kind: 'hold', reason: 'Vee insert chipped; waiting for inspection.' },
			{ eventId: ids.releaseB, kind: 'release', reason: 'Insert replaced.' }
		]);
	});

	it('lists exactly the flags raised and cleared in the range, with what cleared them', async () => {
		const r = await report();
		const start = new Date('2026-06-10T00:00:00Z');
		const end = new Date('2026-06-20T00:00:00Z');
		const raised = await sql<{ id: number }>(
			'SELECT id FROM flags WHERE raised_at >= ? AND raised_at < ? ORDER BY id',
			[start, end]
		);
		const cleared = await sql<{ id: number }>(
			'SELECT id FROM flags WHERE cleared_at >= ? AND cleared_at < ? ORDER BY id',
			[start, end]
		);
		expect(flagIds(r.sections['flags-raised'])).toEqual(raised.map((x) => x.id));
		expect(flagIds(r.sections['flags-cleared'])).toEqual(cleared.map((x) => x.id));
		// The part swap raised break-in-due on fA; the first run cleared the one from before the range.
		expect(r.sections['flags-raised']!.rows).toContainEqual(
			expect.objectContaining({
				kind: 'break-in-due',
				fixture: expect.objectContaining({ code: fA.code }),
				reason: expect.stringMatching(/part swap/i)
			})
		);
		expect(r.sections['flags-cleared']!.rows).toContainEqual(
			expect.objectContaining({
				kind: 'break-in-due',
				fixture: expect.objectContaining({ code: fA.code }),
				clearedBy: 'Cleared by a break-in run logged by Tessa Bench'
			})
		);
	});

	it('lists the fixtures overdue at the end of the range, even if cleared since', async () => {
		const overdue = (await report()).sections.overdue!;
		const end = new Date('2026-06-20T00:00:00Z');
		const open = await sql<{ id: number }>(
			`SELECT id FROM flags WHERE kind IN ('break-in-due', 'cleaning-due', 'inspection-due')
			   AND raised_at < ? AND (cleared_at IS NULL OR cleared_at >= ?) ORDER BY id`,
			[end, end]
		);
		expect(flagIds(overdue)).toEqual(open.map((x) => x.id));
		const breakIn = overdue.rows.filter((x) => x.kind === 'break-in-due');
		expect(breakIn.map((x) => x.fixture.code).sort()).toEqual([fA.code, fB.code].sort());
		// fA's flag was cleared by the run after the range: overdue at the end all the same.
		const [a] = await sql<{ cleared_at: Date | null }>(
			"SELECT cleared_at FROM flags WHERE id = ? AND kind = 'break-in-due'",
			[breakIn.find((x) => x.fixture.code === fA.code)!.id]
		);
		expect(a.cleared_at!.getTime()).toBeGreaterThan(end.getTime());
		// The end of the range moved back past the swap: fA is no longer overdue then.
		const earlier = await report({ to: '2026-06-13' });
		const earlierBreakIn = earlier.sections.overdue!.rows.filter((x) => x.kind === 'break-in-due');
		expect(earlierBreakIn.map((x) => x.fixture.code)).toEqual([fB.code]);
	});

	it('keeps to one area when asked', async () => {
		const r = await report({ area: areaA.id });
		expect(r.area).toEqual({ id: areaA.id, name: expect.stringMatching(/· Bay A$/) });
		expect(eventIds(r.sections.inspections)).toEqual([ids.inspectA, ids.inspectA2]);
		expect(r.sections.inspections!.total).toBe(2);
		expect(eventIds(r.sections['break-in'])).toEqual([ids.runA]);
		expect(eventIds(r.sections.holds)).toEqual([]);
		for (const s of ['flags-raised', 'flags-cleared', 'overdue'] as const) {
			for (const row of r.sections[s]!.rows) expect(row.fixture.code).toBe(fA.code);
		}
	});

	it('pages through a section with a cursor, each row once', async () => {
		const first = await report({}, 2);
		const page1 = first.sections.inspections!;
		expect(page1.rows).toHaveLength(2);
		expect(page1.total).toBe(3);
		expect(page1.next).toBeTruthy();
		const more = await report({ section: 'inspections', after: page1.next }, 2);
		expect(Object.keys(more.sections)).toEqual(['inspections']);
		expect(more.only).toBe('inspections');
		expect(eventIds(more.sections.inspections)).toEqual([ids.inspectA2]);
		expect(more.sections.inspections!.next).toBeNull();
	});

	it('refuses an unknown area, and a query that does not hold', async () => {
		const r = await auditReport(supervisor, {
			...RANGE,
			area: 999_999,
			section: null,
			after: null
		});
		expect(r).toEqual({
			ok: false,
			fields: { area: [expect.stringMatching(/No area has the id 999999/)] }
		});
		const q = parseReportQuery(new URLSearchParams('from=2026-06-20&to=2026-06-10'), '2026-12-05');
		expect(q.ok).toBe(false);
		await expect(
			auditReport(operator, { ...RANGE, area: null, section: null, after: null })
		).rejects.toThrow(/permission|role/i);
	});
});

describe('GET /board/report.pdf', () => {
	type Handler = (event: never) => Promise<Response>;
	const call = (user: Actor, search: string) => {
		const url = new URL(`http://127.0.0.1/board/report.pdf${search}`);
		return (getPdf as Handler)({ locals: { user }, url, request: new Request(url) } as never);
	};

	it('answers a PDF named after the range', async () => {
		const res = await call(supervisor, `?from=${RANGE.from}&to=${RANGE.to}&area=${areaA.id}`);
		expect(res.status).toBe(200);
		expect(res.headers.get('content-type')).toBe('application/pdf');
		expect(res.headers.get('content-disposition')).toBe(
			`attachment; filename="nestmark-audit-2026-06-10-2026-06-19-area-${areaA.id}.pdf"`
		);
		const bytes = new Uint8Array(await res.arrayBuffer());
		expect(new TextDecoder().decode(bytes.subarray(0, 5))).toBe('%PDF-');
		expect(Number(res.headers.get('content-length'))).toBe(bytes.length);
	});

	it('answers 400 with the reasons to a query that does not hold, and 403 to an operator', async () => {
		const bad = await call(supervisor, '?from=2026-06-20&to=2026-06-10');
		expect(bad.status).toBe(400);
		expect(await bad.text()).toMatch(/start date \(2026-06-20\) is after the end date/);
		const unknown = await call(supervisor, `?from=${RANGE.from}&to=${RANGE.to}&area=999999`);
		expect(unknown.status).toBe(400);
		await expect(call(operator, '')).rejects.toMatchObject({ status: 403 });
	});
});
