import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { count, eq } from 'drizzle-orm';
import { isValidFixtureCode } from '$lib/domain/fixture-code';
import { HEAVY_LIFT_KG } from '$lib/content/cautions';
import { demoCodes, seedDemo } from '../../../scripts/seed';
import { DEMO_FIXTURES } from '../../../scripts/demo-scenario';
import { closeDb, db, makeFixture, resetDb, schema } from '../helpers/db';

async function counts() {
	const n = async (
		t:
			| typeof schema.fixtures
			| typeof schema.users
			| typeof schema.locations
			| typeof schema.policies
	) => (await db.select({ n: count() }).from(t))[0].n;
	return {
		fixtures: await n(schema.fixtures),
		users: await n(schema.users),
		locations: await n(schema.locations),
		policies: await n(schema.policies)
	};
}

beforeAll(resetDb);
afterAll(closeDb);

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
	it('builds the scenario: about 40 fixtures in three areas, five accounts, a policy per type', async () => {
		const first = await seedDemo();
		expect(first.fixtures.added).toBe(DEMO_FIXTURES.length);
		expect(DEMO_FIXTURES.length).toBeGreaterThanOrEqual(36);
		expect(DEMO_FIXTURES.length).toBeLessThanOrEqual(44);
		expect(await counts()).toEqual({
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
		for (const f of all) {
			expect(f.repeatabilitySpec_um).toBeGreaterThanOrEqual(0.5);
			expect(f.repeatabilitySpec_um).toBeLessThanOrEqual(2);
		}
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
