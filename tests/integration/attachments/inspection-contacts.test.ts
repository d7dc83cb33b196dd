import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { geometryFormSchema } from '$lib/schemas/geometry';
import * as geometry from '$lib/server/geometry';
import { snapshotFixtures } from '$lib/server/register-snapshot';
import { closeDb, makeFixture, makeUser, resetDb } from '../helpers/db';

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
		seatMaterial: 'steel-52100',
		allowableP0_MPa: '4200',
		...extra
	});

beforeAll(resetDb);
afterAll(closeDb);

describe('inspection contacts in the device’s register copy', () => {
	it('come from the latest saved geometry, and are null without one', async () => {
		const sup = await makeUser({ roles: ['supervisor'] });
		const fx = await makeFixture({ type: 'three-vee' });
		const other = await makeFixture({ type: 'vise' });

		let [entry] = await snapshotFixtures(sup, fx.code);
		expect(entry.inspectionContacts).toBeNull();

		await geometry.save(sup, fx.id, form());
		// The latest version counts: one ball taken out of the design leaves two balls, two vees.
		await geometry.save(sup, fx.id, form({ omitBall: '2' }));
		[entry] = await snapshotFixtures(sup, fx.code);
		expect(entry.inspectionContacts).toEqual(['Ball 1', 'Ball 3', 'Vee 1', 'Vee 3']);

		const all = await snapshotFixtures(sup);
		expect(all.find((f) => f.code === fx.code)?.inspectionContacts).toEqual(
			entry.inspectionContacts
		);
		expect(all.find((f) => f.code === other.code)?.inspectionContacts).toBeNull();
	});
});
