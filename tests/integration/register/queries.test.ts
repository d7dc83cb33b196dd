import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { registerQuerySchema } from '$lib/schemas/fixture-form';
import * as fixtures from '$lib/server/fixtures';
import {
	closeDb,
	db,
	makeArea,
	makeFixture,
	makeFlag,
	makeLocation,
	makeSite,
	makeUser,
	resetDb,
	schema
} from '../helpers/db';

const q = (raw: Record<string, unknown> = {}) => registerQuerySchema.parse(raw);
const codesOf = (page: fixtures.RegisterPage) => page.items.map((i) => i.code);

let world: Awaited<ReturnType<typeof build>>;

/** Two sites; the first with two areas. Twelve fixtures with known names, types and statuses. */
async function build() {
	const north = await makeSite({ name: 'North works' });
	const south = await makeSite({ name: 'South works' });
	const bay = await makeArea({ siteId: north.id, name: 'Turning bay' });
	const lab = await makeArea({ siteId: north.id, name: 'Metrology lab' });
	const dock = await makeArea({ siteId: south.id, name: 'Dock' });
	const lathe = await makeLocation({ areaId: bay.id, name: 'Lathe 1' });
	const cmm = await makeLocation({ areaId: lab.id, name: 'CMM' });
	const shelf = await makeLocation({ areaId: dock.id, name: 'Shelf' });
	const made = [];
	for (let i = 0; i < 12; i++) {
		made.push(
			await makeFixture({
				name: `${['Pallet', 'Probe rack', 'Flat mount'][i % 3]} ${String(i).padStart(2, '0')}`,
				type: (['three-vee', 'plate', 'trihedral-vee-flat'] as const)[i % 3],
				status: i === 5 ? 'on-hold' : i === 7 ? 'retired' : 'in-service',
				locationId: [lathe.id, cmm.id, shelf.id][i % 3],
				updatedAt: new Date(Date.UTC(2025, 0, 1 + i))
			})
		);
	}
	await makeFlag({ fixtureId: made[0].id, kind: 'cleaning-due' });
	await makeFlag({ fixtureId: made[0].id, kind: 'drift' });
	await makeFlag({ fixtureId: made[4].id, kind: 'drift' });
	// A cleared flag is history, not an open flag.
	await makeFlag({ fixtureId: made[8].id, kind: 'drift', clearedAt: new Date() });
	return { north, south, bay, lab, dock, lathe, cmm, shelf, made };
}

beforeAll(async () => {
	await resetDb();
	world = await build();
});
afterAll(closeDb);

describe('register list', () => {
	it('pages in code order with the total of all matches', async () => {
		const all = [...world.made.map((f) => f.code)].sort();
		const p1 = await fixtures.list(q({ pageSize: '5' }));
		const p3 = await fixtures.list(q({ pageSize: '5', page: '3' }));
		expect(p1.total).toBe(12);
		expect(codesOf(p1)).toEqual(all.slice(0, 5));
		expect(codesOf(p3)).toEqual(all.slice(10));
		expect((await fixtures.list(q({ pageSize: '5', page: '4' }))).items).toEqual([]);
	});

	it('lists each fixture with its place and open flags', async () => {
		const page = await fixtures.list(q({ q: world.made[0].code }));
		expect(page.items).toHaveLength(1);
		const [item] = page.items;
		expect(item.place).toMatchObject({
			site: 'North works',
			area: 'Turning bay',
			location: 'Lathe 1'
		});
		expect(item.openFlags.sort()).toEqual(['cleaning-due', 'drift']);
	});

	it('searches names (any case) and codes (with or without the dash)', async () => {
		expect((await fixtures.list(q({ q: 'probe RACK' }))).total).toBe(4);
		const code = world.made[3].code;
		expect(codesOf(await fixtures.list(q({ q: code.toLowerCase() })))).toEqual([code]);
		expect(codesOf(await fixtures.list(q({ q: code.slice(3, 7) })))).toContain(code);
		expect(codesOf(await fixtures.list(q({ q: code.replace('-', '') })))).toEqual([code]);
		expect((await fixtures.list(q({ q: 'nothing like this' }))).total).toBe(0);
	});

	it('treats LIKE wildcards in a search as plain characters', async () => {
		expect((await fixtures.list(q({ q: '%' }))).total).toBe(0);
		expect((await fixtures.list(q({ q: '_' }))).total).toBe(0);
	});

	it('filters by site, area and location', async () => {
		expect((await fixtures.list(q({ site: String(world.north.id) }))).total).toBe(8);
		expect((await fixtures.list(q({ site: String(world.south.id) }))).total).toBe(4);
		expect((await fixtures.list(q({ area: String(world.lab.id) }))).total).toBe(4);
		const atLathe = await fixtures.list(q({ location: String(world.lathe.id) }));
		expect(atLathe.total).toBe(4);
		expect(atLathe.items.every((i) => i.place.location === 'Lathe 1')).toBe(true);
	});

	it('filters by type and status, and combines filters with search', async () => {
		expect((await fixtures.list(q({ type: 'plate' }))).total).toBe(4);
		expect(codesOf(await fixtures.list(q({ status: 'on-hold' })))).toEqual([world.made[5].code]);
		expect((await fixtures.list(q({ type: 'three-vee', q: 'pallet 0' }))).total).toBe(4);
		expect((await fixtures.list(q({ type: 'plate', q: 'pallet' }))).total).toBe(0);
	});

	it('filters by open flag: any, none, or one kind', async () => {
		expect(codesOf(await fixtures.list(q({ flag: 'any' }))).sort()).toEqual(
			[world.made[0].code, world.made[4].code].sort()
		);
		expect((await fixtures.list(q({ flag: 'none' }))).total).toBe(10);
		expect(codesOf(await fixtures.list(q({ flag: 'cleaning-due' })))).toEqual([world.made[0].code]);
		expect((await fixtures.list(q({ flag: 'drift' }))).total).toBe(2);
		expect((await fixtures.list(q({ flag: 'replace-now' }))).total).toBe(0);
	});

	it('sorts by name, location and last change, both ways', async () => {
		const byName = await fixtures.list(q({ sort: 'name', pageSize: '100' }));
		const names = byName.items.map((i) => i.name);
		expect(names).toEqual([...names].sort((a, b) => a.localeCompare(b)));
		const desc = await fixtures.list(q({ sort: 'name', dir: 'desc', pageSize: '100' }));
		expect(desc.items.map((i) => i.name)).toEqual([...names].reverse());
		const updated = await fixtures.list(q({ sort: 'updated', dir: 'desc', pageSize: '3' }));
		expect(codesOf(updated)).toEqual(
			[world.made[11], world.made[10], world.made[9]].map((f) => f.code)
		);
		const byPlace = await fixtures.list(q({ sort: 'location', pageSize: '100' }));
		expect(byPlace.items[0].place.site).toBe('North works');
		expect(byPlace.items[0].place.area).toBe('Metrology lab');
		expect(byPlace.items.at(-1)!.place.site).toBe('South works');
	});

	it('pages stably when many rows share the sort value', async () => {
		const seen: string[] = [];
		for (let page = 1; page <= 4; page++) {
			seen.push(
				...codesOf(await fixtures.list(q({ sort: 'status', pageSize: '3', page: String(page) })))
			);
		}
		expect(new Set(seen).size).toBe(12);
	});
});

describe('one fixture', () => {
	it('comes with its place, effective policy, empty state and open flags', async () => {
		const f = world.made[0];
		const d = await fixtures.getByCode(f.code.toLowerCase());
		expect(d).not.toBeNull();
		expect(d!.code).toBe(f.code);
		expect(d!.place).toMatchObject({
			site: 'North works',
			area: 'Turning bay',
			location: 'Lathe 1'
		});
		expect(d!.state).toBeNull();
		expect(d!.recentEvents).toEqual([]);
		expect(d!.openFlags.map((x) => x.kind).sort()).toEqual(['cleaning-due', 'drift']);
		const spec = d!.policy.find((p) => p.field === 'repeatabilitySpec_um')!;
		expect(spec.source.kind).toBe('default');
		expect(typeof spec.value).toBe('number');
	});

	it('takes policy values from the type policy, and the fixture’s own figures over it', async () => {
		const admin = await makeUser({ roles: ['admin'] });
		const { ensureTypePolicies } = await import('$lib/server/policies');
		expect(await ensureTypePolicies(admin)).toBeGreaterThan(0);
		await db
			.update(schema.policies)
			.set({ cleaningIntervalCycles: 777 })
			.where(eq(schema.policies.fixtureType, 'three-vee'));
		const f = await makeFixture({ type: 'three-vee', repeatabilitySpec_um: 0.8 });
		const d = (await fixtures.getByCode(f.code))!;
		const by = (field: string) => d.policy.find((p) => p.field === field)!;
		expect(by('cleaningIntervalCycles')).toMatchObject({ value: 777, source: { kind: 'type' } });
		expect(by('repeatabilitySpec_um')).toMatchObject({ value: 0.8, source: { kind: 'fixture' } });
		// A second call adds nothing and keeps the shop's change.
		expect(await ensureTypePolicies(admin)).toBe(0);
		expect(
			(await fixtures.getByCode(f.code))!.policy.find((p) => p.field === 'cleaningIntervalCycles')!
				.value
		).toBe(777);
	});

	it('shows the state row once there is one', async () => {
		const f = world.made[1];
		await db.insert(schema.fixtureState).values({
			fixtureId: f.id,
			data: {},
			eventCount: 3,
			totalCycles: 120,
			repeatability_um: 0.42
		});
		const d = (await fixtures.getByCode(f.code))!;
		expect(d.state).toMatchObject({ eventCount: 3, totalCycles: 120, repeatability_um: 0.42 });
	});

	it('is null for an unknown or malformed code', async () => {
		expect(await fixtures.getByCode('NM-22222')).toBeNull();
		expect(await fixtures.getByCode('not a code')).toBeNull();
	});
});
