import { randomUUID } from 'node:crypto';
import { eq } from 'drizzle-orm';
import type { RowDataPacket } from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FLAG_URGENCY } from '$lib/domain/flag-urgency';
import { getPool } from '$lib/server/db';
import { dueWork, fleetSummary } from '$lib/server/fleet';
import type { Actor } from '$lib/server/guard';
import { ingestBatch } from '$lib/server/ingest';
import { GET as getSummary } from '../../../src/routes/api/fleet/summary/+server';
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

// Fixtures taken through sequences of entries on the real ingest path (the default policy: spec
// 1 µm, windows of 10, break-in at least 30 cycles, cleaning every 250 cycles), then the board.

beforeAll(resetDb);
afterAll(closeDb);

let clock = Date.now() - 30 * 86_400_000;
const next = () => new Date((clock += 60_000)).toISOString();
const ev = (fixtureCode: string, kind: string, payload: object) => ({
	id: randomUUID(),
	fixtureCode,
	kind,
	occurredAt: next(),
	payload
});
const STEADY = [0, 0.1, 0.2, 0.1, 0, -0.1, -0.2, -0.1, 0, 0.1];
const steady = (i: number) => ({ dx: STEADY[i % 10], dy: STEADY[(i + 3) % 10] });
const breakInRun = (code: string) =>
	ev(code, 'break-in', { cycles: 30, readings: Array.from({ length: 30 }, (_, i) => steady(i)) });

let tech: Actor;
let boss: Actor;
/** Ingests as the technician's phone; `now` is the server's clock (when flags are raised). */
async function ingest(now: Date, ...events: ReturnType<typeof ev>[]) {
	const results = await ingestBatch(tech, 'phone-1', events, { now });
	expect(results.map((r) => r.status)).toEqual(events.map(() => 'accepted'));
}
const daysAgo = (d: number) => new Date(Date.now() - d * 86_400_000);

type Handler = (event: never) => Promise<Response> | Response;
async function call(handler: Handler, user: Actor | null, path: string) {
	const url = new URL(`http://127.0.0.1${path}`);
	const res = await handler({
		locals: { user },
		params: {},
		url,
		request: new Request(url)
	} as never);
	return { status: res.status, body: await res.json() };
}

/** What the flags table holds: fixtures with an open flag of each kind. */
async function openCountsInTable(): Promise<Record<string, number>> {
	const [rows] = await getPool().query<RowDataPacket[]>(
		`SELECT kind, COUNT(DISTINCT fixture_id) AS n FROM flags WHERE cleared_at IS NULL GROUP BY kind`
	);
	return Object.fromEntries(rows.map((r) => [r.kind, Number(r.n)]));
}

describe('the fleet summary', () => {
	const f: Record<string, Awaited<ReturnType<typeof makeFixture>>> = {};
	let bay: { id: number };
	let lab: { id: number };

	beforeAll(async () => {
		tech = await makeUser({ roles: ['technician'] });
		boss = await makeUser({ roles: ['supervisor'] });
		bay = await makeArea({ name: 'Turning bay' });
		lab = await makeArea({ name: 'CMM lab' });
		const lathe = await makeLocation({ areaId: bay.id, name: 'Lathe 2' });
		const rack = await makeLocation({ areaId: lab.id, name: 'Probe rack' });
		f.newA = await makeFixture({ locationId: lathe.id, name: 'Spindle pallet A' });
		f.newB = await makeFixture({ locationId: rack.id, name: 'Probe mount B', type: 'plate' });
		f.dirty = await makeFixture({ locationId: lathe.id, name: 'Lathe pallet', type: 'pallet' });
		f.wide = await makeFixture({ locationId: rack.id, name: 'Reference flat mount' });
		f.held = await makeFixture({ locationId: rack.id, name: 'Held vise', type: 'vise' });
		f.fine = await makeFixture({ locationId: lathe.id, name: 'Healthy pallet' });

		// Break-in due on two new fixtures, raised ten and two days ago.
		await ingest(daysAgo(10), ev(f.newA.code, 'reseat', {}));
		await ingest(daysAgo(2), ev(f.newB.code, 'reseat', {}));
		// Settled, then 250 cycles: cleaning due.
		await ingest(daysAgo(5), breakInRun(f.dirty.code), ev(f.dirty.code, 'reseat', { cycles: 220 }));
		// Settled, then ten wide readings: out of spec (R = 4.22 µm against 1 µm).
		await ingest(
			daysAgo(1),
			breakInRun(f.wide.code),
			...Array.from({ length: 10 }, (_, i) =>
				ev(f.wide.code, 'reseat', { readings: { dx: i % 2 ? 1 : -1 } })
			)
		);
		// Put on hold (its break-in due stays open).
		await ingest(
			daysAgo(3),
			ev(f.held.code, 'reseat', {}),
			ev(f.held.code, 'hold', { reason: 'Chipped seat' })
		);
		// Healthy: settled, nothing open.
		await ingest(daysAgo(4), breakInRun(f.fine.code));
		// Cleaning falls due on the settled one through more entries.
		await ingest(daysAgo(5), ev(f.dirty.code, 'reseat', { cycles: 30 }));
	});

	it('counts what the flags table holds, every kind in urgency order', async () => {
		const s = await fleetSummary(boss, {});
		expect(s.today.map((t) => t.kind)).toEqual([...FLAG_URGENCY]);
		const table = await openCountsInTable();
		expect(
			Object.fromEntries(s.today.filter((t) => t.count).map((t) => [t.kind, t.count]))
		).toEqual(table);
		expect(table).toMatchObject({ 'break-in-due': 3, 'cleaning-due': 1, 'out-of-spec': 1 });
		expect(s.onHold).toBe(1);
		expect(s.notExact).toBe(0);
		const [[distinct]] = await getPool().query<RowDataPacket[]>(
			`SELECT COUNT(DISTINCT fixture_id) AS n FROM flags WHERE cleared_at IS NULL`
		);
		expect(s.attention.total).toBe(Number(distinct.n));
		expect(s.attention.rows.map((r) => r.code)).not.toContain(f.fine.code);
	});

	it('lists the most urgent flag first, then the one open longest', async () => {
		const s = await fleetSummary(boss, {});
		expect(s.attention.rows.map((r) => r.code)).toEqual([
			f.wide.code, // out of spec
			f.newA.code, // break-in due, 10 days
			f.held.code, // break-in due, 3 days
			f.newB.code, // break-in due, 2 days
			f.dirty.code // cleaning due
		]);
		const wide = s.attention.rows[0];
		expect(wide.flags[0]).toMatchObject({
			kind: 'out-of-spec',
			reason: 'R = 4.22 µm (x axis) over the last 10 seatings; spec 1 µm.'
		});
		expect(wide.flags[0].figures).toMatchObject({ axis: 'x', seatings: 10, spec_um: 1 });
		expect(wide.area).toEqual({ id: lab.id, name: 'CMM lab' });
		expect(wide.location).toBe('Probe rack');
		// The last entry is the tenth wide reseat, logged by the technician.
		expect(wide.lastEntry).toMatchObject({ kind: 'reseat', by: tech.name });
		expect(Date.parse(s.attention.rows[1].oldestRaisedAt)).toBeLessThan(
			Date.parse(s.attention.rows[2].oldestRaisedAt)
		);
	});

	it('narrows by area, flag kind, fixture type, status and text', async () => {
		const codes = async (q: Parameters<typeof fleetSummary>[1]) =>
			(await fleetSummary(boss, q)).attention.rows.map((r) => r.code).sort();
		expect(await codes({ area: bay.id })).toEqual([f.newA.code, f.dirty.code].sort());
		expect(await codes({ kind: 'break-in-due' })).toEqual(
			[f.newA.code, f.newB.code, f.held.code].sort()
		);
		expect(await codes({ type: 'plate' })).toEqual([f.newB.code]);
		expect(await codes({ status: 'on-hold' })).toEqual([f.held.code]);
		expect(await codes({ q: 'reference flat' })).toEqual([f.wide.code]);
		expect(await codes({ q: f.dirty.code.toLowerCase() })).toEqual([f.dirty.code]);
		expect(await codes({ area: lab.id, kind: 'cleaning-due' })).toEqual([]);

		// The tiles follow the fixture filters (not the kind filter: they show every kind).
		const inBay = await fleetSummary(boss, { area: bay.id, kind: 'cleaning-due' });
		expect(inBay.today.find((t) => t.kind === 'break-in-due')!.count).toBe(1);
		expect(inBay.today.find((t) => t.kind === 'out-of-spec')!.count).toBe(0);
		expect(inBay.onHold).toBe(0);
		expect(inBay.attention.rows.map((r) => r.code)).toEqual([f.dirty.code]);
	});

	it('leaves retired fixtures out unless asked for', async () => {
		await db
			.update(schema.fixtures)
			.set({ status: 'retired' })
			.where(eq(schema.fixtures.id, f.newB.id));
		expect((await fleetSummary(boss, {})).attention.rows.map((r) => r.code)).not.toContain(
			f.newB.code
		);
		expect(
			(await fleetSummary(boss, { status: 'retired' })).attention.rows.map((r) => r.code)
		).toEqual([f.newB.code]);
	});

	it('gives a technician the due work, the one due longest first', async () => {
		const due = await dueWork(tech);
		expect(due.rows.map((r) => r.code)).toEqual([f.newA.code, f.dirty.code, f.held.code]);
		expect(due.rows.flatMap((r) => r.flags.map((x) => x.kind))).not.toContain('out-of-spec');
	});

	it('counts geometry that is not exact by its latest saved version', async () => {
		const version = (fixtureId: number, v: number, constraintStatus: string) => ({
			fixtureId,
			version: v,
			kind: 'table',
			contacts: [],
			constraintStatus
		});
		await db.insert(schema.couplingGeometries).values([
			// Fixed since: not counted.
			version(f.newA.id, 1, 'under'),
			version(f.newA.id, 2, 'exact'),
			// Changed for the worse: counted.
			version(f.wide.id, 1, 'exact'),
			version(f.wide.id, 2, 'over')
		]);
		expect((await fleetSummary(boss, {})).notExact).toBe(1);
		expect((await fleetSummary(boss, { area: lab.id })).notExact).toBe(1);
		expect((await fleetSummary(boss, { area: bay.id })).notExact).toBe(0);
	});

	it('answers GET /api/fleet/summary: JSON, 400 with field messages, 401, 403', async () => {
		const ok = await call(getSummary, boss, `/api/fleet/summary?area=${bay.id}`);
		expect(ok.status).toBe(200);
		expect(ok.body.attention.rows.map((r: { code: string }) => r.code).sort()).toEqual(
			[f.newA.code, f.dirty.code].sort()
		);
		const bad = await call(getSummary, boss, '/api/fleet/summary?area=x&kind=nope');
		expect(bad.status).toBe(400);
		expect(Object.keys(bad.body.fields).sort()).toEqual(['area', 'kind']);
		expect((await call(getSummary, null, '/api/fleet/summary')).status).toBe(401);
		const operator = await makeUser({ roles: ['operator'] });
		const refused = await call(getSummary, operator, '/api/fleet/summary');
		expect(refused.status).toBe(403);
		expect(refused.body.error).toMatch(/fleet board/);
	});
});
