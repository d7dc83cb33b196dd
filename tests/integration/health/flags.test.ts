import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Actor } from '$lib/server/guard';
import { rebuildStates } from '$lib/server/health';
import { ingestBatch } from '$lib/server/ingest';
import { GET as getHealth } from '../../../src/routes/api/fixtures/[code]/health/+server';
import { GET as getFlags } from '../../../src/routes/api/flags/+server';
import { closeDb, makeArea, makeFixture, makeLocation, makeUser, resetDb } from '../helpers/db';

// Sequences of events, ingested as the phones send them, and the flags the API then shows. The
// numbers come from the default policy (DEFAULT_POLICY: spec 1 µm, windows of 10, break-in at
// least 30 cycles, cleaning every 250 cycles, inspection every 2000, wear limit grade 3,
// forecast horizon 2000 cycles).

beforeAll(resetDb);
afterAll(closeDb);

type Handler = (event: never) => Promise<Response> | Response;
async function call(handler: Handler, user: Actor | null, path: string, params = {}) {
	const url = new URL(`http://127.0.0.1${path}`);
	const res = await handler({ locals: { user }, params, url, request: new Request(url) } as never);
	return { status: res.status, body: await res.json() };
}

let clock = Date.now() - 30 * 86_400_000;
/** Events a minute apart, starting a month ago (no calendar interval runs out on the way). */
const next = () => new Date((clock += 60_000)).toISOString();
const ev = (fixtureCode: string, kind: string, payload: object) => ({
	id: randomUUID(),
	fixtureCode,
	kind,
	occurredAt: next(),
	payload
});

/** Ten readings whose pattern repeats: every window has the same R (about 0.49 µm). */
const STEADY = [0, 0.1, 0.2, 0.1, 0, -0.1, -0.2, -0.1, 0, 0.1];
const steady = (i: number) => ({ dx: STEADY[i % 10], dy: STEADY[(i + 3) % 10] });

let tech: Actor;
async function ingest(...events: ReturnType<typeof ev>[]) {
	const results = await ingestBatch(tech, 'phone-1', events);
	expect(results.map((r) => r.status)).toEqual(events.map(() => 'accepted'));
	return events;
}

/** A 30-cycle break-in run with steady readings: settles the fixture. */
const breakInRun = (code: string) =>
	ev(code, 'break-in', { cycles: 30, readings: Array.from({ length: 30 }, (_, i) => steady(i)) });
const reseats = (code: string, readings: { dx: number; dy?: number }[]) =>
	readings.map((r) => ev(code, 'reseat', { readings: r }));

async function health(code: string) {
	const res = await call(getHealth, tech, `/api/fixtures/${code}/health`, { code });
	expect(res.status).toBe(200);
	return res.body;
}
async function openKinds(code: string): Promise<string[]> {
	return (await health(code)).flags.open.map((f: { kind: string }) => f.kind).sort();
}
async function openFlag(code: string, kind: string) {
	const flag = (await health(code)).flags.open.find((f: { kind: string }) => f.kind === kind);
	expect(flag, `${kind} open on ${code}`).toBeDefined();
	return flag;
}
async function clearedFlag(code: string, kind: string) {
	return (await health(code)).flags.recent.find((f: { kind: string }) => f.kind === kind);
}

/** A fixture that has been broken in (no flag open). */
async function settledFixture(opts: Parameters<typeof makeFixture>[0] = {}) {
	const f = await makeFixture(opts);
	await ingest(breakInRun(f.code));
	expect(await openKinds(f.code)).toEqual([]);
	return f;
}

describe('flags from ingested events', () => {
	beforeAll(async () => {
		tech = await makeUser({ roles: ['technician'] });
	});

	it('break-in due on a new fixture, cleared by a settled break-in run', async () => {
		const f = await makeFixture();
		const [first] = await ingest(ev(f.code, 'reseat', {}));
		const flag = await openFlag(f.code, 'break-in-due');
		expect(flag.reason).toMatch(/^New fixture: break-in required — 1 of at least 30 cycles run/);
		expect(flag.raisedByEventId).toBe(first.id);
		expect(flag.figures).toMatchObject({ cycles: 1, minCycles: 30, windows: 0 });

		// 20 steady cycles: two windows of equal R, but fewer cycles than the policy asks.
		await ingest(
			ev(f.code, 'break-in', {
				cycles: 20,
				readings: STEADY.concat(STEADY).map((_, i) => steady(i))
			})
		);
		expect((await openFlag(f.code, 'break-in-due')).figures).toMatchObject({
			cycles: 21,
			windows: 2
		});

		const [run] = await ingest(breakInRun(f.code));
		expect(await openKinds(f.code)).toEqual([]);
		const cleared = await clearedFlag(f.code, 'break-in-due');
		expect(cleared.clearedByEventId).toBe(run.id);
		expect((await health(f.code)).state.status).toBe('in-service');
	});

	it('cleaning due by cycles, cleared by a cleaning', async () => {
		const f = await settledFixture();
		await ingest(ev(f.code, 'reseat', { cycles: 219 }));
		expect(await openKinds(f.code)).toEqual([]);
		const [last] = await ingest(ev(f.code, 'reseat', { cycles: 1 }));
		const flag = await openFlag(f.code, 'cleaning-due');
		expect(flag.reason).toMatch(/^Cleaning due: 250 cycles since .+ \(interval 250 cycles\)\.$/);
		expect(flag.raisedByEventId).toBe(last.id);
		expect(flag.figures).toMatchObject({ cyclesSince: 250, intervalCycles: 250 });

		const [clean] = await ingest(
			ev(f.code, 'cleaning', { method: 'solvent-wipe', relubricated: false })
		);
		expect(await openKinds(f.code)).toEqual([]);
		expect((await clearedFlag(f.code, 'cleaning-due')).clearedByEventId).toBe(clean.id);
	});

	it('inspection due by cycles, cleared by an inspection', async () => {
		const f = await settledFixture();
		await ingest(ev(f.code, 'reseat', { cycles: 1970 }));
		expect(await openKinds(f.code)).toEqual(['cleaning-due', 'inspection-due']);
		expect((await openFlag(f.code, 'inspection-due')).figures).toMatchObject({
			cyclesSince: 2000,
			intervalCycles: 2000
		});
		const [insp] = await ingest(
			ev(f.code, 'inspection', {
				contacts: [{ contact: 'ball 1', grade: 1 }],
				verdict: 'serviceable'
			})
		);
		expect(await openKinds(f.code)).toEqual(['cleaning-due']);
		expect((await clearedFlag(f.code, 'inspection-due')).clearedByEventId).toBe(insp.id);
	});

	it('out of spec when R over the last 10 seatings exceeds the spec; cleared when it is back', async () => {
		const f = await settledFixture();
		// dx alternating ±1 µm: s = 1.054, R = 4s = 4.22 µm against a 1 µm spec.
		const wide = Array.from({ length: 10 }, (_, i) => ({ dx: i % 2 ? 1 : -1 }));
		await ingest(...reseats(f.code, wide.slice(0, 9)));
		expect(await openKinds(f.code)).toEqual([]);
		const [tenth] = await ingest(...reseats(f.code, wide.slice(9)));
		const flag = await openFlag(f.code, 'out-of-spec');
		expect(flag.raisedByEventId).toBe(tenth.id);
		expect(flag.figures.R_um).toBeCloseTo(4 * Math.sqrt(10 / 9), 9);
		expect(flag.figures).toMatchObject({ axis: 'x', seatings: 10, spec_um: 1 });
		expect(flag.reason).toBe('R = 4.22 µm (x axis) over the last 10 seatings; spec 1 µm.');

		await ingest(
			...reseats(
				f.code,
				STEADY.map((_, i) => steady(i))
			)
		);
		expect(await openKinds(f.code)).not.toContain('out-of-spec');
		expect(await clearedFlag(f.code, 'out-of-spec')).toBeDefined();
	});

	it('drift when a reading leaves the 3σ limits of the baseline; cleared once it is past', async () => {
		const f = await settledFixture();
		// 20 baseline readings (phase I), then one far outside: Western Electric rule 1.
		await ingest(
			...reseats(
				f.code,
				Array.from({ length: 20 }, (_, i) => steady(i))
			)
		);
		expect(await openKinds(f.code)).toEqual([]);
		const [jump] = await ingest(...reseats(f.code, [{ dx: 2, dy: 0 }]));
		const flag = await openFlag(f.code, 'drift');
		expect(flag.raisedByEventId).toBe(jump.id);
		expect(flag.figures).toMatchObject({ axis: 'x', rule: 'WE1', value_um: 2, reading: 21 });
		expect(flag.reason).toMatch(/^Drift on the x axis: .* \(rule WE1\), ending at reading 21/);

		// The hit is remembered for 5 readings, then the drift flag clears (readings near the centre).
		await ingest(
			...reseats(
				f.code,
				[0, 0.02, 0, 0.02, 0].map((dx) => ({ dx }))
			)
		);
		expect(await openKinds(f.code)).not.toContain('drift');
		expect(await clearedFlag(f.code, 'drift')).toBeDefined();
	});

	it('replace soon, then now, by rated life; a swap of balls and seats clears it', async () => {
		const f = await settledFixture({ ratedLifeCycles: 5000 });
		// 30 break-in cycles + 2969 leave 2001 cycles of life: one more than the horizon.
		await ingest(ev(f.code, 'reseat', { cycles: 2969 }));
		expect(await openKinds(f.code)).not.toContain('replace-soon');
		await ingest(ev(f.code, 'reseat', { cycles: 1 }));
		const soon = await openFlag(f.code, 'replace-soon');
		expect(soon.reason).toContain('2,000 cycles left of the rated life of 5,000');
		expect(soon.figures).toMatchObject({ cyclesSinceRenewal: 3000, ratedLifeCycles: 5000 });

		const [worn] = await ingest(ev(f.code, 'reseat', { cycles: 2000 }));
		const now = await openFlag(f.code, 'replace-now');
		expect(now.raisedByEventId).toBe(worn.id);
		expect(now.reason).toContain('5,000 cycles reached the rated life of 5,000');
		expect(await openKinds(f.code)).not.toContain('replace-soon');

		const [swap] = await ingest(ev(f.code, 'part-swap', { replaced: ['balls', 'seats'] }));
		const kinds = await openKinds(f.code);
		expect(kinds).not.toContain('replace-now');
		expect(kinds).toContain('break-in-due');
		expect((await clearedFlag(f.code, 'replace-now')).clearedByEventId).toBe(swap.id);
	});

	it('replace now by wear grade at the limit; a ball swap clears it', async () => {
		const f = await settledFixture();
		await ingest(
			ev(f.code, 'inspection', {
				contacts: [
					{ contact: 'ball 1', grade: 1 },
					{ contact: 'ball 2', grade: 3, marks: ['fretting'] }
				],
				verdict: 'watch'
			})
		);
		const flag = await openFlag(f.code, 'replace-now');
		expect(flag.reason).toBe('Replace now: last inspection found wear grade 3 (limit 3).');
		expect(flag.figures).toMatchObject({ wearGrade: 3, wearLimitGrade: 3 });
		const [swap] = await ingest(ev(f.code, 'part-swap', { replaced: ['balls'] }));
		expect(await openKinds(f.code)).toEqual(['break-in-due']);
		expect((await clearedFlag(f.code, 'replace-now')).clearedByEventId).toBe(swap.id);
	});

	it('leaves every stored state equal to a rebuild', async () => {
		expect((await rebuildStates()).differing).toEqual([]);
	});
});

describe('GET /api/flags and GET /api/fixtures/[code]/health', () => {
	it('answers 401 without a session and 400 on a bad kind or area', async () => {
		expect((await call(getFlags, null, '/api/flags')).status).toBe(401);
		const bad = await call(getFlags, tech, '/api/flags?kind=rusty&area=north');
		expect(bad.status).toBe(400);
		expect(bad.body.fields).toEqual({
			kind: [expect.stringContaining('kind must be one of: break-in-due')],
			area: ['area must be a numeric area id.']
		});
		expect((await call(getHealth, null, '/api/fixtures/x/health', { code: 'x' })).status).toBe(401);
		const missing = await call(getHealth, tech, '/api/fixtures/NM-0000/health', {
			code: 'NM-0000'
		});
		expect(missing.status).toBe(404);
	});

	it('lists open flags with fixture and place, by kind and by area', async () => {
		const area = await makeArea({ name: 'Metrology bay' });
		const loc = await makeLocation({ areaId: area.id, name: 'Bench 4' });
		const f = await makeFixture({ locationId: loc.id, name: 'Interferometer nest' });
		await ingest(ev(f.code, 'reseat', {}));
		const inArea = await call(getFlags, tech, `/api/flags?area=${area.id}`);
		expect(inArea.status).toBe(200);
		expect(inArea.body.flags).toEqual([
			expect.objectContaining({
				kind: 'break-in-due',
				fixture: expect.objectContaining({ code: f.code, name: 'Interferometer nest' }),
				location: { id: loc.id, name: 'Bench 4', area: { id: area.id, name: 'Metrology bay' } }
			})
		]);
		const breakIn = await call(getFlags, tech, '/api/flags?kind=break-in-due');
		expect(breakIn.body.flags.length).toBeGreaterThan(0);
		expect(breakIn.body.flags.every((x: { kind: string }) => x.kind === 'break-in-due')).toBe(true);
		expect(breakIn.body.flags.map((x: { fixture: { code: string } }) => x.fixture.code)).toContain(
			f.code
		);
		const none = await call(getFlags, tech, `/api/flags?kind=out-of-spec&area=${area.id}`);
		expect(none).toEqual({ status: 200, body: { flags: [] } });
	});

	it('gives the series for the charts: windows, both trend lines, readings and I-MR charts', async () => {
		const f = await settledFixture();
		// R grows window by window: 4 windows of 10 readings with a widening spread.
		const growing = Array.from({ length: 40 }, (_, i) => ({
			dx: (i % 2 ? 1 : -1) * (0.05 + 0.04 * Math.floor(i / 10))
		}));
		await ingest(...reseats(f.code, growing));
		const h = await health(f.code);
		expect(h.series.repeatability).toHaveLength(4);
		expect(h.series.repeatability.map((w: { cycle: number }) => w.cycle)).toEqual([40, 50, 60, 70]);
		const [ols, ts] = h.series.forecasts;
		expect(ols).toMatchObject({ method: 'ols', convention: null });
		expect(ts).toMatchObject({ method: 'theil-sen', convention: 'separate' });
		expect(ols.slope).toBeGreaterThan(0);
		expect(h.series.readings).toHaveLength(70);
		expect(h.series.readings.at(-1)).toMatchObject({ n: 70, dx: growing[39].dx, dy: null });
		// The I-MR chart takes the 40 service readings only: the 30 before them were settling.
		const x = h.series.spc.find((c: { axis: string }) => c.axis === 'x');
		expect(x.values).toHaveLength(40);
		expect(x.values).toEqual(growing.map((r) => r.dx));
		expect(x.at[0]).toBe(31);
		expect(x.baseline).toBe(20);
		expect(x.ucl).toBeGreaterThan(x.center);
		expect(x.movingRanges[0]).toBeNull();
		expect(h.figures.spec_um).toBe(1);
		expect(h.policy.repeatabilityWindow).toBe(10);
	});
});
