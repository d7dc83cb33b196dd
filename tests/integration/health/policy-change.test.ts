import { randomUUID } from 'node:crypto';
import { and, eq, isNull } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEFAULT_POLICY } from '$lib/domain/policy';
import { policyValuesSchema, type PolicyValues } from '$lib/schemas/policy-form';
import { ForbiddenError, type Actor } from '$lib/server/guard';
import { ingestBatch } from '$lib/server/ingest';
import { saveFixtureOverrides, saveTypePolicy, typePolicies } from '$lib/server/policy-admin';
import { closeDb, db, makeFixture, makeUser, resetDb, schema } from '../helpers/db';

beforeAll(resetDb);
afterAll(closeDb);

let clock = Date.now() - 86_400_000;
const ev = (fixtureCode: string, kind: string, payload: object) => ({
	id: randomUUID(),
	fixtureCode,
	kind,
	occurredAt: new Date((clock += 60_000)).toISOString(),
	payload
});
// Ten repeating readings: R = 4s = 0.479 µm on x (s = 0.1197, the sample SD, n − 1, of the ten values).
const STEADY = [0, 0.1, 0.2, 0.1, 0, -0.1, -0.2, -0.1, 0, 0.1];

async function openFlags(fixtureId: number) {
	return db
		.select()
		.from(schema.flags)
		.where(and(eq(schema.flags.fixtureId, fixtureId), isNull(schema.flags.clearedAt)));
}

describe('changing a policy re-evaluates the affected fixtures', () => {
	let supervisor: Actor;
	let tech: Actor;
	const policy = (patch: Partial<PolicyValues>) =>
		({ ...DEFAULT_POLICY, ...patch }) as PolicyValues;

	/** A settled fixture with ten steady seatings after its break-in. */
	async function measured(type: 'three-vee' | 'pallet') {
		const f = await makeFixture({ type });
		const readings = Array.from({ length: 30 }, (_, i) => ({ dx: STEADY[i % 10] }));
		const results = await ingestBatch(tech, 'phone-1', [
			ev(f.code, 'break-in', { cycles: 30, readings }),
			...STEADY.map((dx) => ev(f.code, 'reseat', { readings: { dx } }))
		]);
		expect(results.every((r) => r.status === 'accepted')).toBe(true);
		expect(await openFlags(f.id)).toEqual([]);
		return f;
	}

	beforeAll(async () => {
		supervisor = await makeUser({ roles: ['supervisor'] });
		tech = await makeUser({ roles: ['technician'] });
	});

	it('tightening the spec of a type raises out-of-spec where R is above it; loosening clears it', async () => {
		const f = await measured('three-vee');
		const other = await measured('pallet');

		const changes = await saveTypePolicy(
			supervisor,
			'three-vee',
			policy({ repeatabilitySpec_um: 0.4 })
		);
		expect(changes.find((c) => c.fixtureId === f.id)?.raised).toEqual(['out-of-spec']);
		const [flag] = await openFlags(f.id);
		expect(flag.kind).toBe('out-of-spec');
		expect(flag.reason).toBe('R = 0.479 µm (x axis) over the last 10 seatings; spec 0.4 µm.');
		expect(flag.raisedByEventId).toBeNull();
		// Another type's fixture is not touched.
		expect(changes.find((c) => c.fixtureId === other.id)).toBeUndefined();
		expect(await openFlags(other.id)).toEqual([]);

		const view = (await typePolicies(supervisor)).find((t) => t.type === 'three-vee')!;
		const spec = view.fields.find((x) => x.field === 'repeatabilitySpec_um')!;
		expect(spec).toMatchObject({ value: 0.4, basis: null, defaultValue: 1, unit: 'µm' });
		const window = view.fields.find((x) => x.field === 'repeatabilityWindow')!;
		expect(window.basis?.basis).toBe('common practice');

		await saveTypePolicy(supervisor, 'three-vee', policy({ repeatabilitySpec_um: 0.6 }));
		expect(await openFlags(f.id)).toEqual([]);
	});

	it('a per-fixture override is applied to that fixture alone', async () => {
		const a = await measured('three-vee');
		const b = await measured('three-vee');
		const changes = await saveFixtureOverrides(supervisor, a.code, {
			repeatabilitySpec_um: 0.45,
			cleaningIntervalDays: null
		});
		expect(changes).toEqual([
			{ fixtureId: a.id, raised: ['out-of-spec'], cleared: [], updated: [] }
		]);
		expect(await openFlags(b.id)).toEqual([]);
		const [row] = await db.select().from(schema.fixtures).where(eq(schema.fixtures.id, a.id));
		expect(row.repeatabilitySpec_um).toBe(0.45);
		expect(row.policyOverrides).toEqual({ cleaningIntervalDays: null });
	});

	it('only supervisors and admins may change policies; the form says what is wrong', async () => {
		await expect(saveTypePolicy(tech, 'three-vee', policy({}))).rejects.toBeInstanceOf(
			ForbiddenError
		);
		await expect(typePolicies(tech)).rejects.toBeInstanceOf(ForbiddenError);
		const bad = policyValuesSchema.safeParse({
			...Object.fromEntries(Object.entries(DEFAULT_POLICY).map(([k, v]) => [k, String(v ?? '')])),
			repeatabilitySpec_um: '0',
			repeatabilityWindow: '2.5',
			wearLimitGrade: 'x',
			cleaningIntervalDays: ''
		});
		expect(bad.success).toBe(false);
		const messages = Object.fromEntries(bad.error!.issues.map((i) => [i.path[0], i.message]));
		expect(messages).toEqual({
			repeatabilitySpec_um: 'Repeatability spec must be more than 0.',
			repeatabilityWindow: 'Reseats per window must be a whole number.',
			wearLimitGrade: 'Wear grade limit: enter a whole number.'
		});
	});
});
