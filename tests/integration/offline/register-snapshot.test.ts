import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateFixtureCode } from '$lib/domain/fixture-code';
import { DEFAULT_POLICY } from '$lib/domain/policy';
import { registerSnapshotSchema } from '$lib/schemas/register-snapshot';
import type { Actor } from '$lib/server/guard';
import { effectivePolicy, policyValues } from '$lib/server/policies';
import { etagMatches } from '$lib/server/register-snapshot';
import { GET } from '../../../src/routes/api/register-snapshot/+server';
import {
	closeDb,
	db,
	makeArea,
	makeFixture,
	makeFlag,
	makeLocation,
	makeUser,
	resetDb,
	schema
} from '../helpers/db';

// The endpoint called through its handler with the locals the auth hook would set.

beforeAll(resetDb);
afterAll(closeDb);

function get(user: Actor | null, query = '', headers: Record<string, string> = {}) {
	const request = new Request(`http://127.0.0.1/api/register-snapshot${query}`, { headers });
	const event = { locals: { user }, request, params: {}, url: new URL(request.url) };
	return GET(event as never);
}

describe('GET /api/register-snapshot', () => {
	let operator: Actor;
	let plate: Awaited<ReturnType<typeof makeFixture>>;
	let pallet: Awaited<ReturnType<typeof makeFixture>>;

	beforeAll(async () => {
		operator = await makeUser({ roles: ['operator'] });
		const area = await makeArea({ name: 'CMM lab' });
		const location = await makeLocation({ areaId: area.id, name: 'Probe rack 2' });
		plate = await makeFixture({ locationId: location.id, type: 'plate', name: 'Fixture plate 7' });
		pallet = await makeFixture({
			locationId: location.id,
			type: 'pallet',
			name: 'Zero-point pallet 3',
			mass_kg: 21.5,
			repeatabilitySpec_um: 2
		});
		await makeFlag({
			fixtureId: pallet.id,
			kind: 'cleaning-due',
			reason: '260 cycles since cleaning'
		});
		await makeFlag({ fixtureId: pallet.id, kind: 'drift', clearedAt: new Date() });
	});

	it('answers 401 in JSON without a session', async () => {
		const res = await get(null);
		expect(res.status).toBe(401);
		expect(await res.json()).toEqual({ error: expect.any(String) });
	});

	it('lists every fixture with place, open flags, caution inputs and policy figures', async () => {
		const res = await get(operator);
		expect(res.status).toBe(200);
		const body = registerSnapshotSchema.parse(await res.json());
		expect(body.fixtures.map((f) => f.code).sort()).toEqual([plate.code, pallet.code].sort());
		const p = body.fixtures.find((f) => f.code === pallet.code)!;
		expect(p.location).toEqual({ site: expect.any(String), area: 'CMM lab', name: 'Probe rack 2' });
		expect(p.mass_kg).toBe(21.5);
		// Only the open flag; the cleared one is history.
		expect(p.flags).toEqual([
			{ kind: 'cleaning-due', reason: '260 cycles since cleaning', raisedAt: expect.any(String) }
		]);
		// The fixture's own spec wins; the rest falls back to the built-in default (no policy rows here).
		expect(p.policy.repeatabilitySpec_um).toBe(2);
		expect(p.policy.cleaningIntervalCycles).toBe(DEFAULT_POLICY.cleaningIntervalCycles);
		expect(p.state.totalCycles).toBe(0);
		expect(res.headers.get('etag')).toBe(`"${body.version}"`);
		expect(res.headers.get('cache-control')).toContain('no-cache');
	});

	it('carries the same effective policy the server folds with, switched-off rules included', async () => {
		// A type policy for pallets with its own break-in length, and a fixture that switches the
		// calendar cleaning rule off (null override): both must reach the phone as the server sees them.
		await db.insert(schema.policies).values({
			name: 'Pallets (test)',
			fixtureType: 'pallet',
			...DEFAULT_POLICY,
			breakInMinCycles: 24
		});
		const quiet = await makeFixture({
			type: 'pallet',
			policyOverrides: { cleaningIntervalDays: null, settleWindow: 8 }
		});
		const res = await get(operator, `?code=${quiet.code}`);
		const body = registerSnapshotSchema.parse(await res.json());
		const server = policyValues(
			await effectivePolicy({
				type: 'pallet',
				policyId: null,
				policyOverrides: { cleaningIntervalDays: null, settleWindow: 8 },
				repeatabilitySpec_um: null,
				ratedLifeCycles: null
			})
		);
		expect(body.fixtures[0].policy).toEqual(server);
		expect(body.fixtures[0].policy).toMatchObject({
			breakInMinCycles: 24,
			settleWindow: 8,
			cleaningIntervalDays: null
		});
		await db.delete(schema.policies).where(eq(schema.policies.name, 'Pallets (test)'));
	});

	it('answers 304 to its own ETag, and a new ETag once the register changes', async () => {
		const first = await get(operator);
		const etag = first.headers.get('etag')!;
		const again = await get(operator, '', { 'If-None-Match': etag });
		expect(again.status).toBe(304);
		expect(await again.text()).toBe('');

		await db
			.update(schema.fixtures)
			.set({ status: 'on-hold' })
			.where(eq(schema.fixtures.id, plate.id));
		const changed = await get(operator, '', { 'If-None-Match': etag });
		expect(changed.status).toBe(200);
		expect(changed.headers.get('etag')).not.toBe(etag);
		const body = registerSnapshotSchema.parse(await changed.json());
		expect(body.fixtures.find((f) => f.code === plate.code)!.status).toBe('on-hold');
	});

	it('narrows to one fixture with ?code= in any spelling, 404 for an unknown one, 400 for a malformed one', async () => {
		const one = await get(operator, `?code=${plate.code.toLowerCase().replace('-', '')}`);
		expect(one.status).toBe(200);
		expect((await one.json()).fixtures.map((f: { code: string }) => f.code)).toEqual([plate.code]);

		let unknown = generateFixtureCode();
		while (unknown === plate.code || unknown === pallet.code) unknown = generateFixtureCode();
		expect((await get(operator, `?code=${unknown}`)).status).toBe(404);
		const bad = await get(operator, '?code=NM-0000');
		expect(bad.status).toBe(400);
		expect((await bad.json()).fields.code[0]).toMatch(/zero/);
	});
});

describe('etagMatches', () => {
	it('matches its tag in a list, weak or strong, and the wildcard (RFC 9110 §13.1.2)', () => {
		expect(etagMatches('"abc"', '"abc"')).toBe(true);
		expect(etagMatches('W/"abc"', '"abc"')).toBe(true);
		expect(etagMatches('"x", "abc"', '"abc"')).toBe(true);
		expect(etagMatches('*', '"abc"')).toBe(true);
		expect(etagMatches('"abd"', '"abc"')).toBe(false);
		expect(etagMatches(null, '"abc"')).toBe(false);
	});
});
