import { randomUUID } from 'node:crypto';
import type { RowDataPacket } from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FLAG_KINDS, type FlagKind } from '$lib/domain/flag-kinds';
import { fleetTrendsQuerySchema } from '$lib/schemas/fleet-trends';
import { getPool } from '$lib/server/db';
import { fleetTrends, type FleetTrends } from '$lib/server/fleet-trends';
import type { Actor } from '$lib/server/guard';
import { ingestBatch } from '$lib/server/ingest';
import { GET } from '../../../src/routes/api/fleet/trends/+server';
import {
	closeDb,
	db,
	makeArea,
	makeFixture,
	makeLocation,
	makeUser,
	resetDb,
	schema
} from '../helpers/db';

// A small fleet whose figures are known by construction, built through the real ingest path, and
// the fleet charts' figures checked against it and against what the tables hold.

beforeAll(resetDb);
afterAll(closeDb);

const DAY = 86_400_000;
const T0 = Date.now();
// An hour past each whole day, so no entry sits on the 30-day edge whichever "now" counts it.
const at = (daysAgo: number) => new Date(T0 - daysAgo * DAY + 3_600_000).toISOString();

/** Ten readings whose values repeat in every window (as in the flags tests). */
const STEADY = [0, 0.1, 0.2, 0.1, 0, -0.1, -0.2, -0.1, 0, 0.1];
/** R = 4s of STEADY (ISO 230-2 style R = 4s, sample s with n − 1) [computed]. */
const R1 = (() => {
	const mean = STEADY.reduce((s, x) => s + x, 0) / STEADY.length;
	const ss = STEADY.reduce((s, x) => s + (x - mean) ** 2, 0);
	return 4 * Math.sqrt(ss / (STEADY.length - 1));
})();
/** Cycles per reseat while trending. */
const C = 5;

let tech: Actor;
let supervisor: Actor;
const ev = (fixtureCode: string, kind: string, occurredAt: string, payload: object) => ({
	id: randomUUID(),
	fixtureCode,
	kind,
	occurredAt,
	payload
});
async function ingest(events: ReturnType<typeof ev>[]) {
	const results = await ingestBatch(tech, 'phone-fleet', events);
	expect(results.map((r) => r.status)).toEqual(events.map(() => 'accepted'));
}

/**
 * A fixture broken in 42 days ago and inspected 41 days ago, then 40 reseats of C cycles, one a
 * day up to yesterday, in four windows of ten whose R is k·R1 (k = 1…4, or 2 throughout when
 * flat). Its spec is m·R1. Theil–Sen of R against cycles: slope R1/(10C); it meets the spec
 * 10C(m − 4) cycles after the last window; at C cycles a day (40C cycles over the 40 days since
 * the inspection) that is 10(m − 4) days after yesterday [computed].
 */
async function trending(locationId: number, m: number, flat = false) {
	const f = await makeFixture({ locationId, repeatabilitySpec_um: m * R1 });
	const events = [
		ev(f.code, 'break-in', at(42), {
			cycles: 30,
			readings: Array.from({ length: 30 }, (_, i) => ({
				dx: STEADY[i % 10],
				dy: STEADY[(i + 3) % 10]
			}))
		}),
		ev(f.code, 'inspection', at(41), {
			contacts: [{ contact: 'Ball 1', grade: 0 }],
			verdict: 'serviceable'
		})
	];
	for (let j = 0; j < 40; j++) {
		const k = flat ? 2 : Math.floor(j / 10) + 1;
		const i = j % 10;
		events.push(
			ev(f.code, 'reseat', at(40 - j), {
				cycles: C,
				readings: { dx: STEADY[i] * k, dy: STEADY[(i + 3) % 10] * k }
			})
		);
	}
	await ingest(events);
	return f;
}

type Fx = Awaited<ReturnType<typeof makeFixture>>;
const made: Record<string, Fx> = {};
let areaA: { id: number; name: string };
let areaB: { id: number; name: string };

async function trends(query: Record<string, string | undefined> = {}): Promise<FleetTrends> {
	const t = await fleetTrends(supervisor, fleetTrendsQuerySchema().parse(query));
	expect(t).not.toBeNull();
	return t!;
}

beforeAll(async () => {
	tech = await makeUser({ roles: ['technician'] });
	supervisor = await makeUser({ roles: ['supervisor'] });
	areaA = await makeArea({ name: 'A bay' });
	areaB = await makeArea({ name: 'B lab' });
	const locA = (await makeLocation({ areaId: areaA.id })).id;
	const locB = (await makeLocation({ areaId: areaB.id })).id;
	made.soon = await trending(locA, 4.5); // 5 days after yesterday; R/spec 4/4.5
	made.ninety = await trending(locA, 9.5); // 55 days; 4/9.5
	made.flat = await trending(locA, 9, true); // not rising; 2/9
	made.breaking = await makeFixture({ locationId: locA });
	await ingest([ev(made.breaking.code, 'reseat', at(2), { readings: { dx: 0.1 } })]);
	made.unlogged = await makeFixture({ locationId: locA });
	made.half = await trending(locB, 19); // 150 days; 4/19
	made.later = await trending(locB, 30); // 260 days; 4/30
	made.above = await trending(locB, 3.5); // latest window 4·R1 above 3.5·R1
	made.retired = await makeFixture({ locationId: locB, status: 'retired' });

	// Flags of other times, written as the history would hold them: one inside the last year,
	// one that ended before it, one raised before it and cleared inside it.
	const flagAt = (kind: FlagKind, raisedDaysAgo: number, clearedDaysAgo: number) => ({
		fixtureId: made.later.id,
		kind,
		reason: 'Earlier flag',
		raisedAt: new Date(T0 - raisedDaysAgo * DAY),
		clearedAt: new Date(T0 - clearedDaysAgo * DAY)
	});
	await db
		.insert(schema.flags)
		.values([
			flagAt('cleaning-due', 200, 190),
			flagAt('inspection-due', 420, 400),
			flagAt('drift', 380, 100)
		]);
}, 60_000);

describe('the fleet charts after real ingests', () => {
	it('bins every settled fixture by R ÷ spec and lists those past 0.8 × spec', async () => {
		const t = await trends();
		expect(t.repeatability.rated).toBe(6);
		// Breaking in (one reseat, no break-in run) and never logged: left out; retired: not counted.
		expect(t.repeatability.unrated).toBe(2);
		const counts = Object.fromEntries(
			t.repeatability.bins.filter((b) => b.count).map((b) => [b.label, b.count])
		);
		// 4/30 = 0.13, 2/9 = 0.22, 4/19 = 0.21, 4/9.5 = 0.42, 4/4.5 = 0.89, 4/3.5 = 1.14 [computed]
		expect(counts).toEqual({
			'0.1–0.2': 1,
			'0.2–0.3': 2,
			'0.4–0.5': 1,
			'0.8–0.9': 1,
			'1.1–1.2': 1
		});
		expect(t.repeatability.watch.map((w) => [w.code, w.areaName])).toEqual([
			[made.above.code, 'B lab'],
			[made.soon.code, 'A bay']
		]);
		expect(t.repeatability.watch[0].ratio).toBeCloseTo(4 / 3.5, 9);
	});

	it('histogram agrees with what fixture_state and the specs hold', async () => {
		const [rows] = await getPool().query<RowDataPacket[]>(
			`SELECT s.repeatability_um, f.repeatability_spec_um
			   FROM fixture_state s JOIN fixtures f ON f.id = s.fixture_id
			  WHERE f.status <> 'retired' AND JSON_EXTRACT(s.data, '$.breakIn.required') = 'false'`
		);
		const t = await trends();
		expect(t.repeatability.rated).toBe(rows.length);
		for (const r of rows) {
			const ratio = r.repeatability_um / r.repeatability_spec_um;
			const bin = t.repeatability.bins.find(
				(b) => ratio >= b.from && (b.to === null || ratio < b.to)
			);
			expect(bin!.count, `ratio ${ratio}`).toBeGreaterThan(0);
		}
	});

	it('counts the forecast within 30 / 90 / 180 days, cumulatively, and names the fixtures', async () => {
		const t = await trends();
		expect(t.forecast.aboveSpec).toBe(1);
		expect(t.forecast.within).toEqual([
			{ days: 30, count: 1 },
			{ days: 90, count: 2 },
			{ days: 180, count: 3 }
		]);
		expect(t.forecast.later).toBe(1);
		expect(t.forecast.notRising).toBe(1);
		expect(t.forecast.noForecast).toBe(2);
		const rows = t.forecast.fixtures;
		expect(rows.map((r) => r.code)).toEqual([
			made.above.code,
			made.soon.code,
			made.ninety.code,
			made.half.code
		]);
		// 10(m − 4) days after the last entry, which was 23 hours ago [computed].
		const sinceLast = (Date.now() - (T0 - DAY + 3_600_000)) / DAY;
		expect(Math.abs(rows[1].days! - (5 - sinceLast))).toBeLessThan(0.01);
		expect(Math.abs(rows[2].days! - (55 - sinceLast))).toBeLessThan(0.01);
		expect(Math.abs(rows[3].days! - (150 - sinceLast))).toBeLessThan(0.01);
		expect(rows[1].basis).toBe('inspection');
	});

	it('counts flags raised and cleared per ISO week by kind exactly as the flags table holds them', async () => {
		const t = await trends();
		const fromMs = Date.parse(`${t.query.from}T00:00:00Z`);
		const toMs = Date.parse(`${t.query.to}T00:00:00Z`) + DAY;
		const [flags] = await getPool().query<RowDataPacket[]>(
			'SELECT kind, raised_at, cleared_at FROM flags'
		);
		// The Monday of a time's week, from the calendar (getUTCDay: 0 is Sunday).
		const monday = (d: Date) => {
			const back = (d.getUTCDay() + 6) % 7;
			return new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate() - back))
				.toISOString()
				.slice(0, 10);
		};
		const want = new Map<string, number>();
		const add = (key: string) => want.set(key, (want.get(key) ?? 0) + 1);
		for (const f of flags) {
			const raised = f.raised_at as Date;
			const cleared = f.cleared_at as Date | null;
			if (raised.getTime() >= fromMs && raised.getTime() < toMs)
				add(`${monday(raised)} raised ${f.kind}`);
			if (cleared && cleared.getTime() >= fromMs && cleared.getTime() < toMs)
				add(`${monday(cleared)} cleared ${f.kind}`);
		}
		const got = new Map<string, number>();
		for (const w of t.flags.weeks) {
			for (const k of FLAG_KINDS) {
				if (w.raised[k]) got.set(`${w.start} raised ${k}`, w.raised[k]);
				if (w.cleared[k]) got.set(`${w.start} cleared ${k}`, w.cleared[k]);
			}
		}
		expect(got).toEqual(want);
		// The earlier flags: one raised and cleared inside the year, one cleared inside it only.
		expect(t.flags.raised['cleaning-due']).toBeGreaterThanOrEqual(1);
		expect(t.flags.cleared.drift).toBeGreaterThanOrEqual(1);
		expect(t.flags.raised['inspection-due'] + t.flags.cleared['inspection-due']).toBe(
			[...want.entries()]
				.filter(([k]) => k.endsWith(' inspection-due'))
				.reduce((n, [, v]) => n + v, 0)
		);
		// 53 or 54 weeks: every ISO week touched by the last 12 months, none skipped.
		expect(t.flags.weeks.length).toBeGreaterThanOrEqual(53);
		for (let i = 1; i < t.flags.weeks.length; i++) {
			const gap = Date.parse(t.flags.weeks[i].start) - Date.parse(t.flags.weeks[i - 1].start);
			expect(gap).toBe(7 * DAY);
		}
	});

	it('gives per area its fixtures, open flags, median R ÷ spec and entries of the last 30 days', async () => {
		const t = await trends();
		const [open] = await getPool().query<RowDataPacket[]>(
			`SELECT g.fixture_id FROM flags g WHERE g.cleared_at IS NULL`
		);
		const [events] = await getPool().query<RowDataPacket[]>(
			'SELECT fixture_id, occurred_at FROM events'
		);
		const areaOf = new Map(Object.values(made).map((f) => [f.id, f.locationId]));
		const [locations] = await getPool().query<RowDataPacket[]>('SELECT id, area_id FROM locations');
		const locArea = new Map(locations.map((l) => [l.id as number, l.area_id as number]));
		const inArea = (fixtureId: number, areaId: number) =>
			locArea.get(areaOf.get(fixtureId)!) === areaId;
		const cutoff = Date.now() - 30 * DAY;

		const a = t.areas.find((x) => x.areaId === areaA.id)!;
		const b = t.areas.find((x) => x.areaId === areaB.id)!;
		expect(t.areas.map((x) => x.areaName)).toEqual(['A bay', 'B lab']);
		expect(a.fixtures).toBe(5);
		expect(b.fixtures).toBe(3);
		// median(2/9, 4/9.5, 4/4.5) = 4/9.5; median(4/30, 4/19, 4/3.5) = 4/19 [computed]
		expect(a.medianRatio).toBeCloseTo(4 / 9.5, 9);
		expect(b.medianRatio).toBeCloseTo(4 / 19, 9);
		for (const [row, id] of [
			[a, areaA.id],
			[b, areaB.id]
		] as const) {
			expect(row.openFlags).toBe(open.filter((f) => inArea(f.fixture_id, id)).length);
			expect(row.entries30d).toBe(
				events.filter(
					(e) => inArea(e.fixture_id, id) && (e.occurred_at as Date).getTime() >= cutoff
				).length
			);
		}
		// 30 reseats in the last 30 days for each trending fixture, plus the breaking-in one's.
		expect(a.entries30d).toBe(3 * 30 + 1);
		expect(b.entries30d).toBe(3 * 30);
		expect(a.openFlags).toBeGreaterThanOrEqual(2); // break-in due on the two not broken in
	});

	it('narrows every chart to one area', async () => {
		const t = await trends({ area: String(areaB.id) });
		expect(t.query.area).toEqual({ id: areaB.id, name: 'B lab' });
		expect(t.areas.map((x) => x.areaName)).toEqual(['B lab']);
		expect(t.repeatability.rated).toBe(3);
		expect(t.repeatability.watch.map((w) => w.code)).toEqual([made.above.code]);
		expect(t.forecast.within.map((w) => w.count)).toEqual([0, 0, 1]);
		const everywhere = await trends();
		const onlyB = t.flags.weeks.reduce((n, w) => n + w.raised['cleaning-due'], 0);
		expect(onlyB).toBeLessThanOrEqual(
			everywhere.flags.weeks.reduce((n, w) => n + w.raised['cleaning-due'], 0)
		);
		expect(
			await fleetTrends(supervisor, fleetTrendsQuerySchema().parse({ area: '999999' }))
		).toBeNull();
	});
});

describe('GET /api/fleet/trends', () => {
	type Handler = (event: never) => Promise<Response> | Response;
	async function call(user: Actor | null, search: string) {
		const url = new URL(`http://127.0.0.1/api/fleet/trends${search}`);
		const res = await (GET as Handler)({
			locals: { user },
			url,
			request: new Request(url)
		} as never);
		return { status: res.status, body: await res.json() };
	}

	it('answers the figures to a supervisor, 401 to nobody and 403 to an operator', async () => {
		const ok = await call(supervisor, `?area=${areaA.id}`);
		expect(ok.status).toBe(200);
		expect(ok.body.query.area.name).toBe('A bay');
		expect(ok.body.repeatability.rated).toBe(3);
		expect((await call(null, '')).status).toBe(401);
		const operator = await makeUser({ roles: ['operator'] });
		const refused = await call(operator, '');
		expect(refused.status).toBe(403);
		expect(refused.body.error).toMatch(/fleet board/);
	});

	it('answers 400 with a message per field for a bad query', async () => {
		const bad = await call(supervisor, '?from=2026-02-30&area=abc');
		expect(bad.status).toBe(400);
		expect(bad.body.error).toBe('Invalid query.');
		expect(bad.body.fields.from[0]).toMatch(/from must be a date as YYYY-MM-DD/);
		expect(bad.body.fields.area[0]).toMatch(/area must be a numeric area id/);
		const backwards = await call(supervisor, '?from=2026-06-01&to=2026-05-01');
		expect(backwards.body.fields.from).toEqual(['from must not be after to.']);
		const long = await call(supervisor, '?from=2020-01-01&to=2026-01-01');
		expect(long.status).toBe(400);
		expect(long.body.fields.from[0]).toMatch(/at most three years/);
		const nowhere = await call(supervisor, '?area=999999');
		expect(nowhere.status).toBe(400);
		expect(nowhere.body.fields.area).toEqual(['There is no area with id 999999.']);
	});
});
