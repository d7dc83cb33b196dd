import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, count, eq, isNull } from 'drizzle-orm';
import { isValidFixtureCode } from '$lib/domain/fixture-code';
import { HEAVY_LIFT_KG } from '$lib/content/cautions';
import { demoCodes, seedDemo } from '../../../scripts/seed';
import { DEMO_FIXTURES, DEMO_STORIES } from '../../../scripts/demo-scenario';
import { showsIntendedFlags } from '../../../scripts/demo-history';
import type { FlagKind } from '$lib/domain/flag-kinds';
import { rebuildStates } from '$lib/server/health';
import { readPhoto } from '$lib/server/attachments';
import { closeDb, db, makeFixture, resetDb, schema } from '../helpers/db';
import { useS3 } from '../helpers/s3';

async function counts() {
	const n = async (
		t:
			| typeof schema.fixtures
			| typeof schema.users
			| typeof schema.locations
			| typeof schema.policies
			| typeof schema.events
	) => (await db.select({ n: count() }).from(t))[0].n;
	return {
		events: await n(schema.events),
		fixtures: await n(schema.fixtures),
		users: await n(schema.users),
		locations: await n(schema.locations),
		policies: await n(schema.policies)
	};
}

// The demo's inspection photos go through the real storage path, to the S3 fake.
let stopS3: () => Promise<void>;
beforeAll(async () => {
	await resetDb();
	stopS3 = await useS3();
});
afterAll(async () => {
	await stopS3();
	await closeDb();
});

describe('demo codes', () => {
	it('are valid, unique and the same on every run', () => {
		const a = demoCodes(DEMO_FIXTURES);
		const b = demoCodes([...DEMO_FIXTURES].reverse());
		expect(a.size).toBe(DEMO_FIXTURES.length);
		expect(new Set(a.values()).size).toBe(DEMO_FIXTURES.length);
		for (const [key, code] of a) {
			expect(isValidFixtureCode(code)).toBe(true);
			// A code depends on its fixture's key only, not on the order of the list.
			expect(b.get(key)).toBe(code);
		}
	});
});

describe('demo seed', () => {
	// A year of history for 39 fixtures goes through ingest: seconds, not milliseconds.
	it('builds the scenario: about 40 fixtures in three areas, five accounts, a policy per type', async () => {
		const first = await seedDemo();
		expect(first.fixtures.added).toBe(DEMO_FIXTURES.length);
		expect(DEMO_FIXTURES.length).toBeGreaterThanOrEqual(36);
		expect(DEMO_FIXTURES.length).toBeLessThanOrEqual(44);
		expect(await counts()).toEqual({
			events: first.history.events,
			fixtures: DEMO_FIXTURES.length,
			users: 5,
			locations: 10,
			policies: 6
		});
		const areas = await db.select({ name: schema.areas.name }).from(schema.areas);
		expect(areas.map((a) => a.name).sort()).toEqual([
			'CMM lab',
			'Diamond-turning bay',
			'Interferometry room'
		]);
		const all = await db.select().from(schema.fixtures);
		expect(all.filter((f) => (f.mass_kg ?? 0) >= HEAVY_LIFT_KG).length).toBeGreaterThanOrEqual(3);
		expect(all.filter((f) => f.status === 'breaking-in')).toHaveLength(2);
		expect(all.filter((f) => f.status === 'on-hold')).toHaveLength(1);
		expect(first.history.fixtures).toBe(DEMO_FIXTURES.length - 1);
		expect(first.history.events).toBeGreaterThan(3000);
		for (const f of all) {
			expect(f.repeatabilitySpec_um).toBeGreaterThanOrEqual(0.5);
			expect(f.repeatabilitySpec_um).toBeLessThanOrEqual(2);
		}
	}, 120_000);

	it('ends each fixture’s year of history in its story’s flags, with no state to rebuild', async () => {
		const codes = demoCodes(DEMO_FIXTURES);
		const open = await db
			.select({ code: schema.fixtures.code, kind: schema.flags.kind })
			.from(schema.fixtures)
			.leftJoin(
				schema.flags,
				and(eq(schema.flags.fixtureId, schema.fixtures.id), isNull(schema.flags.clearedAt))
			);
		const kindsOf = (code: string) =>
			open.filter((r) => r.code === code && r.kind !== null).map((r) => r.kind as FlagKind);
		const shown = new Map<string, FlagKind[]>();
		for (const f of DEMO_FIXTURES) {
			const condition = DEMO_STORIES[f.key]?.condition ?? 'healthy';
			const kinds = kindsOf(codes.get(f.key)!);
			shown.set(f.key, kinds);
			expect(showsIntendedFlags(condition, kinds), `${f.key} (${condition}): ${kinds}`).toBe(true);
		}
		// BRIEF.md's demo: most healthy, a few due, two breaking in, one drifting, one past its life.
		const withKind = (k: FlagKind) => [...shown.values()].filter((ks) => ks.includes(k)).length;
		expect([...shown.values()].filter((ks) => ks.length === 0).length).toBeGreaterThanOrEqual(28);
		expect(withKind('cleaning-due')).toBe(2);
		expect(withKind('inspection-due')).toBe(2);
		expect(withKind('break-in-due')).toBe(2);
		expect(withKind('drift')).toBe(1);
		expect(withKind('replace-now')).toBe(1);

		const report = await rebuildStates({ fix: false });
		expect(report.differing).toEqual([]);
	});

	it('has work orders in every status: one overdue, one done by a part swap, the technician’s week', async () => {
		const { listWorkOrders, openFlagsWithoutOrder, getWorkOrder } =
			await import('$lib/server/work-orders');
		const today = new Date().toISOString().slice(0, 10);
		const { items } = await listWorkOrders({}, today);
		expect(new Set(items.map((o) => o.status))).toEqual(
			new Set(['planned', 'scheduled', 'underway', 'done', 'cancelled'])
		);
		// Overdue first.
		expect(items[0].status).toBe('scheduled');
		expect(items[0].dueOn! < today).toBe(true);
		expect(
			items.filter(
				(o) => o.dueOn && o.dueOn < today && o.status !== 'done' && o.status !== 'cancelled'
			)
		).toHaveLength(1);
		const done = items.find((o) => o.status === 'done')!;
		const doneHistory = (await getWorkOrder(done.id))!.history;
		const [swap] = await db
			.select({ id: schema.events.id })
			.from(schema.events)
			.where(eq(schema.events.id, doneHistory.at(-1)!.eventId!));
		expect(swap).toBeDefined();
		expect(doneHistory.map((h) => h.what)).toEqual(['created', 'done']);
		const weekEnd = new Date(Date.now() + 7 * 86_400_000).toISOString().slice(0, 10);
		const techWeek = items.filter(
			(o) =>
				o.assigneeEmail &&
				/tech/i.test(o.assigneeEmail) &&
				o.dueOn &&
				o.dueOn <= weekEnd &&
				['scheduled', 'underway'].includes(o.status)
		);
		expect(techWeek.length).toBeGreaterThanOrEqual(3);
		const unplanned = (await openFlagsWithoutOrder()).map((f) => f.kind);
		expect(unplanned).toEqual(
			expect.arrayContaining(['replace-now', 'inspection-due', 'break-in-due'])
		);
		expect(items.some((o) => o.flags.length > 0)).toBe(true);
	});

	it('attaches a generated photo to each inspection that found wear worth a picture', async () => {
		const inspections = await db
			.select({ id: schema.events.id, payload: schema.events.payload })
			.from(schema.events)
			.where(eq(schema.events.kind, 'inspection'));
		const named = inspections.flatMap((e) =>
			((e.payload as { photoIds?: string[] }).photoIds ?? []).map((id) => ({ id, e }))
		);
		expect(named.length).toBeGreaterThan(0);
		const rows = await db.select().from(schema.attachments);
		expect(rows.map((r) => r.id).sort()).toEqual(named.map((n) => n.id).sort());
		for (const r of rows.slice(0, 3)) {
			expect(r.contentType).toBe('image/png');
			expect([r.width, r.height]).toEqual([640, 480]);
			expect(named.find((n) => n.id === r.id)!.e.id).toBe(r.eventId);
		}
		// Readable back through the same path the photo route uses.
		const back = await readPhoto(rows[0].id, 'full');
		expect(Buffer.from(back!.bytes.subarray(1, 4)).toString('ascii')).toBe('PNG');
	});

	it('changes nothing on a second run and keeps what people added or changed', async () => {
		const code = demoCodes(DEMO_FIXTURES).get(DEMO_FIXTURES[0].key)!;
		await db
			.update(schema.fixtures)
			.set({ name: 'Renamed by the shop' })
			.where(eq(schema.fixtures.code, code));
		const [loc] = await db.select().from(schema.locations).limit(1);
		const added = await makeFixture({ locationId: loc.id, name: 'Added by the shop' });
		const before = await counts();

		const second = await seedDemo();
		expect(second.users.added).toBe(0);
		expect(second.policies).toBe(0);
		expect(second.fixtures.added).toBe(0);
		expect(second.history).toEqual({ fixtures: 0, events: 0, photos: 0 });
		expect(second.workOrders).toBe(0);
		expect(await counts()).toEqual(before);
		const [renamed] = await db.select().from(schema.fixtures).where(eq(schema.fixtures.code, code));
		expect(renamed.name).toBe('Renamed by the shop');
		const [kept] = await db
			.select()
			.from(schema.fixtures)
			.where(eq(schema.fixtures.code, added.code));
		expect(kept.name).toBe('Added by the shop');
	});
});
