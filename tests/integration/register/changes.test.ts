import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createHash, randomUUID } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { generateFixtureCode, isValidFixtureCode, seededRandom } from '$lib/domain/fixture-code';
import { fixtureCreateSchema } from '$lib/schemas/fixture-form';
import { canonicalJson } from '$lib/server/canonical-json';
import * as fixtures from '$lib/server/fixtures';
import { ForbiddenError } from '$lib/server/guard';
import { rebuildStates } from '$lib/server/health';
import { ingestBatch } from '$lib/server/ingest';
import { closeDb, db, makeFixture, makeLocation, makeUser, resetDb, schema } from '../helpers/db';

const input = (locationId: number, extra: Record<string, unknown> = {}) =>
	fixtureCreateSchema.parse({
		name: 'Kinematic pallet 7',
		type: 'three-vee',
		locationId,
		...extra
	});

beforeAll(resetDb);
afterAll(closeDb);

describe('create', () => {
	it('stores the fixture under a fresh valid code, attributed to the actor', async () => {
		const sup = await makeUser({ roles: ['supervisor'] });
		const loc = await makeLocation();
		const made = await fixtures.create(
			sup,
			input(loc.id, { mass_kg: '21.5', ballMaterial: 'Si3N4' })
		);
		expect(isValidFixtureCode(made.code)).toBe(true);
		const [row] = await db.select().from(schema.fixtures).where(eq(schema.fixtures.id, made.id));
		expect(row).toMatchObject({
			code: made.code,
			name: 'Kinematic pallet 7',
			status: 'in-service',
			mass_kg: 21.5,
			ballMaterial: 'Si3N4',
			createdBy: sup.id,
			locationId: loc.id
		});
	});

	it('is for supervisors and admins only', async () => {
		const loc = await makeLocation();
		for (const roles of [['operator'], ['technician'], ['planner'], []] as const) {
			const actor = await makeUser({ roles: [...roles] });
			await expect(fixtures.create(actor, input(loc.id))).rejects.toBeInstanceOf(ForbiddenError);
		}
		const admin = await makeUser({ roles: ['admin'] });
		await expect(fixtures.create(admin, input(loc.id))).resolves.toHaveProperty('code');
	});

	it('refuses a location that does not exist', async () => {
		const sup = await makeUser({ roles: ['supervisor'] });
		await expect(fixtures.create(sup, input(999_999))).rejects.toMatchObject({
			fields: { locationId: ['That location does not exist.'] }
		});
	});

	it('draws another code when the generated one is taken', async () => {
		const sup = await makeUser({ roles: ['supervisor'] });
		const loc = await makeLocation();
		const taken = generateFixtureCode(seededRandom(7));
		await makeFixture({ code: taken, locationId: loc.id });
		// The same seed makes `taken` first; the service must move on to the next code.
		const made = await fixtures.create(sup, input(loc.id), { random: seededRandom(7) });
		expect(made.code).not.toBe(taken);
		expect(isValidFixtureCode(made.code)).toBe(true);
	});

	it('keeps a given code, and refuses it when it is already used', async () => {
		const admin = await makeUser({ roles: ['admin'] });
		const loc = await makeLocation();
		const code = generateFixtureCode(seededRandom(99));
		expect((await fixtures.create(admin, input(loc.id), { code: code.toLowerCase() })).code).toBe(
			code
		);
		await expect(fixtures.create(admin, input(loc.id), { code })).rejects.toMatchObject({
			fields: { code: [`Code ${code} is already in the register.`] }
		});
	});
});

describe('update', () => {
	it('changes fields and clears optional ones with null', async () => {
		const sup = await makeUser({ roles: ['supervisor'] });
		const f = await makeFixture({ mass_kg: 12, notes: 'old' });
		const r = await fixtures.update(sup, f.code, {
			name: 'Renamed',
			mass_kg: null,
			status: 'on-hold'
		});
		expect(r).toEqual({ code: f.code, moved: false });
		const rec = (await fixtures.getRecord(f.code))!;
		expect(rec).toMatchObject({ name: 'Renamed', mass_kg: null, notes: 'old', status: 'on-hold' });
		// No move, no event.
		expect(await db.select().from(schema.events).where(eq(schema.events.fixtureId, f.id))).toEqual(
			[]
		);
	});

	it('records a move event, attributed to the actor, when the location changes', async () => {
		const sup = await makeUser({ roles: ['supervisor'] });
		const from = await makeLocation();
		const to = await makeLocation();
		const f = await makeFixture({ locationId: from.id });
		expect(await fixtures.update(sup, f.code, { locationId: to.id })).toEqual({
			code: f.code,
			moved: true
		});
		const evs = await db.select().from(schema.events).where(eq(schema.events.fixtureId, f.id));
		expect(evs).toHaveLength(1);
		const [ev] = evs;
		expect(ev).toMatchObject({
			kind: 'move',
			userId: sup.id,
			deviceId: 'server',
			// The payload a phone sends for a move (schemas/events.ts): the new location's id.
			payload: { locationId: String(to.id), fromLocationId: String(from.id) }
		});
		expect(ev.id).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
		// Ingest's content hash (what happened, without the id), as for a phone's event.
		const canonical = canonicalJson({
			fixtureCode: f.code,
			kind: 'move',
			occurredAt: ev.occurredAt.toISOString(),
			payload: { locationId: String(to.id), fromLocationId: String(from.id) }
		});
		expect(ev.contentHash).toBe(createHash('sha256').update(canonical).digest('hex'));
		expect((await fixtures.getRecord(f.code))!.locationId).toBe(to.id);
		// The fixture page's recent events show the move with who did it.
		const d = (await fixtures.getByCode(f.code))!;
		expect(d.recentEvents[0]).toMatchObject({ kind: 'move', user: { name: sup.name } });
		// The move is folded into the derived state, so a full rebuild finds nothing to correct.
		const report = await rebuildStates({ ids: [f.id] });
		expect(report.checked).toBe(1);
		expect(report.differing).toEqual([]);
	});

	it('refolds the state when the commissioning date changes after events were logged', async () => {
		const sup = await makeUser({ roles: ['supervisor'] });
		const tech = await makeUser({ roles: ['technician'] });
		const f = await makeFixture({ commissionedOn: '2026-01-05' });
		const results = await ingestBatch(tech, 'phone-c', [
			{
				id: randomUUID(),
				fixtureCode: f.code,
				kind: 'reseat',
				occurredAt: new Date(Date.now() - 3_600_000).toISOString(),
				payload: {}
			}
		]);
		expect(results.map((r) => r.status)).toEqual(['accepted']);
		await fixtures.update(sup, f.code, { commissionedOn: '2026-02-10' });
		const [row] = await db
			.select()
			.from(schema.fixtureState)
			.where(eq(schema.fixtureState.fixtureId, f.id));
		expect(row.data).toMatchObject({ since: '2026-02-10T00:00:00.000Z' });
		expect((await rebuildStates({ ids: [f.id] })).differing).toEqual([]);
		// Cleared: the state counts from the first logged event again.
		await fixtures.update(sup, f.code, { commissionedOn: null });
		expect((await rebuildStates({ ids: [f.id] })).differing).toEqual([]);
	});

	it('writes nothing when the new location does not exist', async () => {
		const sup = await makeUser({ roles: ['supervisor'] });
		const f = await makeFixture();
		await expect(
			fixtures.update(sup, f.code, { locationId: 999_999, name: 'Should not stick' })
		).rejects.toMatchObject({ fields: { locationId: expect.any(Array) } });
		expect((await fixtures.getRecord(f.code))!.name).toBe(f.name);
		expect(await db.select().from(schema.events).where(eq(schema.events.fixtureId, f.id))).toEqual(
			[]
		);
	});

	it('rolls the change back if the move event cannot be written', async () => {
		// An actor who is not in the users table breaks the event's foreign key after the update.
		const ghost = { id: 'no-such-user', name: 'Ghost', email: 'g@x', roles: ['admin' as const] };
		const to = await makeLocation();
		const f = await makeFixture();
		await expect(
			fixtures.update(ghost, f.code, { locationId: to.id, name: 'Half' })
		).rejects.toThrow();
		const rec = (await fixtures.getRecord(f.code))!;
		expect(rec.locationId).toBe(f.locationId);
		expect(rec.name).toBe(f.name);
	});

	it('is for supervisors and admins only, and null for an unknown code', async () => {
		const f = await makeFixture();
		const op = await makeUser({ roles: ['operator', 'technician', 'planner'] });
		await expect(fixtures.update(op, f.code, { name: 'x' })).rejects.toBeInstanceOf(ForbiddenError);
		const admin = await makeUser({ roles: ['admin'] });
		expect(await fixtures.update(admin, 'NM-22222', { name: 'x' })).toBeNull();
	});
});
