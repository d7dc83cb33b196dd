import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { geometryFormSchema } from '$lib/schemas/geometry';
import * as geometry from '$lib/server/geometry';
import { ForbiddenError } from '$lib/server/guard';
import { closeDb, db, makeFixture, makeUser, resetDb, schema } from '../helpers/db';

const form = (extra: Record<string, unknown> = {}) =>
	geometryFormSchema.parse({
		kind: 'three-vee',
		ballCircleRadius_mm: '50',
		contactAngle_deg: '45',
		grooveYaw_deg: '0',
		omitBall: '',
		ballDiameter_mm: '12.7',
		preload_N: '300',
		ballMaterial: 'steel-52100',
		seatMaterial: 'silicon-nitride',
		allowableP0_MPa: '4200',
		...extra
	});

beforeAll(resetDb);
afterAll(closeDb);

describe('geometry versions', () => {
	it('saves numbered versions with contacts, cached status and who saved them', async () => {
		const sup = await makeUser({ roles: ['supervisor'], name: 'Geo Supervisor' });
		const fx = await makeFixture();
		expect(await geometry.latest(fx.id)).toBeNull();

		const first = await geometry.save(sup, fx.id, form());
		// REFERENCES §B [C]: three balls in three radial vees are exactly constrained.
		expect(first).toEqual({ version: 1, status: 'exact' });
		const second = await geometry.save(sup, fx.id, form({ omitBall: '2' }));
		// The same with one ball removed: two freedoms, nothing redundant.
		expect(second).toEqual({ version: 2, status: 'under' });

		const all = await geometry.versions(fx.id);
		expect(all.map((v) => v.version)).toEqual([2, 1]);
		expect(all[0]).toMatchObject({
			kind: 'three-vee',
			constraintStatus: 'under',
			createdBy: 'Geo Supervisor',
			ballDiameter_mm: 12.7,
			preload_N: 300,
			params: { ballCircleRadius_mm: 50, contactAngle_deg: 45, omitBall: 2, allowableP0_MPa: 4200 },
			seatMaterial: { E_GPa: 310, nu: 0.27 }
		});
		expect(all[0].contacts).toHaveLength(4);
		expect(all[1].contacts).toHaveLength(6);
		expect((await geometry.latest(fx.id))?.version).toBe(2);
	});

	it('refuses operators and stores nothing for them', async () => {
		const op = await makeUser({ roles: ['operator'] });
		const fx = await makeFixture();
		await expect(geometry.save(op, fx.id, form())).rejects.toBeInstanceOf(ForbiddenError);
		const rows = await db
			.select()
			.from(schema.couplingGeometries)
			.where(eq(schema.couplingGeometries.fixtureId, fx.id));
		expect(rows).toHaveLength(0);
	});

	it('stores table contacts and flags only fixtures whose latest version is not exact', async () => {
		const admin = await makeUser({ roles: ['admin'] });
		const [a, b, c] = [await makeFixture(), await makeFixture(), await makeFixture()];
		// Block on a flat (REFERENCES §B [C]): three vertical contacts leave three freedoms.
		const table = form({
			kind: 'table',
			rows: [
				{ px: '0', py: '40', pz: '0', nx: '0', ny: '0', nz: '1', label: 'foot 1' },
				{ px: '-35', py: '-20', pz: '0', nx: '0', ny: '0', nz: '1', label: 'foot 2' },
				{ px: '35', py: '-20', pz: '0', nx: '0', ny: '0', nz: '1', label: 'foot 3' }
			]
		});
		expect(await geometry.save(admin, a.id, table)).toEqual({ version: 1, status: 'under' });
		const [stored] = await geometry.versions(a.id);
		expect(stored.contacts[1]).toEqual({
			point: [-35, -20, 0],
			normal: [0, 0, 1],
			label: 'foot 2'
		});
		// b was under-constrained once, then fixed: its latest version is exact.
		await geometry.save(admin, b.id, form({ omitBall: '1' }));
		await geometry.save(admin, b.id, form());
		const flagged = await geometry.notExact([a.id, b.id, c.id]);
		expect([...flagged]).toEqual([a.id]);
		expect((await geometry.notExact([])).size).toBe(0);
	});
});
