import { describe, expect, it } from 'vitest';
import { threeVeeContacts, trihedralVeeFlatContacts } from './coupling-geometry';
import {
	ballCentres,
	checkGeometry,
	conditionReading,
	contactLoads,
	projectLine,
	twistToWords
} from './geometry-check';

const steel = { E_GPa: 210, nu: 0.3 };

describe('twistToWords', () => {
	it('names vertical and horizontal rotation axes with their point and direction', () => {
		expect(twistToWords({ kind: 'rotation', direction: [0, 0, 1], point: [0, -100, 0] })).toBe(
			'rotation about a vertical axis through (0.0, -100.0, 0.0) mm along (0.000, 0.000, 1.000)'
		);
		expect(twistToWords({ kind: 'rotation', direction: [1, 0, 0], point: [0, -25, 0] })).toBe(
			'rotation about a horizontal axis through (0.0, -25.0, 0.0) mm along (1.000, 0.000, 0.000)'
		);
	});
	it('names translations and screws', () => {
		expect(twistToWords({ kind: 'translation', direction: [0, 2, 0] })).toBe(
			'translation along (0.000, 1.000, 0.000) (horizontal)'
		);
		expect(
			twistToWords({ kind: 'screw', direction: [0, 1, 1], point: [1, 0, 0], pitch: 0.5 })
		).toMatch(/^screw motion about an inclined axis .* advancing 0\.500 mm per radian$/);
	});
});

describe('conditionReading (bands: common practice)', () => {
	it('reads the three bands', () => {
		expect(conditionReading(3)).toMatch(/^well conditioned/);
		expect(conditionReading(10)).toMatch(/^fair/);
		expect(conditionReading(100)).toMatch(/^fair/);
		expect(conditionReading(101)).toMatch(/^nearly singular/);
	});
});

describe('load sharing', () => {
	// Computed from the contact geometry: vee flank N = F / (2 cos θ); each ball of a three-vee
	// carries a third (common practice for an equilateral layout).
	it('gives each vee flank (P/3) / (2 cos 45°) in a three-vee coupling', () => {
		const contacts = threeVeeContacts({
			ballCircleRadius_mm: 50,
			contactAngle_deg: 45,
			ballDiameter_mm: 12.7
		});
		const loads = contactLoads(contacts, 12.7, 600);
		for (const n of loads) expect(n).toBeCloseTo(200 / (2 * Math.SQRT1_2), 9);
	});
	it('shares the preload between the two balls left when one is omitted', () => {
		const contacts = threeVeeContacts({
			ballCircleRadius_mm: 50,
			contactAngle_deg: 45,
			ballDiameter_mm: 12.7,
			omitBall: 0
		});
		expect(ballCentres(contacts, 12.7)).toHaveLength(2);
		for (const n of contactLoads(contacts, 12.7, 600)) expect(n).toBeCloseTo(300 / Math.SQRT2, 9);
	});
	it('loads trihedral faces F/(3 cos θ) and the flat F', () => {
		const contacts = trihedralVeeFlatContacts({
			ballCircleRadius_mm: 50,
			contactAngle_deg: 45,
			ballDiameter_mm: 12.7
		});
		const loads = contactLoads(contacts, 12.7, 300);
		expect(loads.slice(0, 3).every((n) => Math.abs(n! - 100 / (3 * Math.SQRT1_2)) < 1e-9)).toBe(
			true
		);
		expect(loads[5]).toBeCloseTo(100, 9);
	});
	it('leaves a horizontal contact unloaded', () => {
		const loads = contactLoads(
			[
				{ point: [0, 0, 0], normal: [0, 0, 1] },
				{ point: [10, 0, 0], normal: [1, 0, 0] }
			],
			10,
			50
		);
		expect(loads[1]).toBeNull();
	});
});

describe('checkGeometry', () => {
	it('finds two rotations for a three-vee with one ball removed (screw-theory rank count after Blanding 1999 and Hale 1999 §2.6, computed)', () => {
		const r = checkGeometry({
			contacts: threeVeeContacts({
				ballCircleRadius_mm: 50,
				contactAngle_deg: 45,
				ballDiameter_mm: 12.7,
				omitBall: 0
			}),
			ballDiameter_mm: 12.7,
			preload_N: 300,
			ball: steel,
			seat: steel,
			allowableP0_MPa: 4200
		});
		expect(r).toMatchObject({ status: 'under', dof: 2, redundant: 0, contactCount: 4 });
		expect(r.freedoms.map((f) => f.kind)).toEqual(['rotation', 'rotation']);
		const words = r.freedoms.map((f) => f.words).sort();
		// Line through the two remaining balls (y = −25) and the vertical axis where the
		// groove-perpendicular lines meet (0, −100).
		expect(words).toContain(
			'rotation about a horizontal axis through (0.0, -25.0, 0.0) mm along (1.000, 0.000, 0.000)'
		);
		expect(words).toContain(
			'rotation about a vertical axis through (0.0, -100.0, 0.0) mm along (0.000, 0.000, 1.000)'
		);
	});
	it('reports the Hertz figures of a Ø12.7 mm ball on a flat at 100 N per flank', () => {
		// Ø12.7 mm 52100 ball on a steel flat, 100 N: a = 0.16041 mm, p₀ = 1855.6 MPa, δ = 4.052 µm,
		// k = 37.02 N/µm, computed from Johnson, Contact Mechanics (1985) §3.4. A flat-normal contact
		// on each of three balls at 300 N carries 100 N.
		const contacts = [0, 1, 2].map((i) => ({
			point: [50 * Math.cos(i * 2.1), 50 * Math.sin(i * 2.1), 0] as [number, number, number],
			normal: [0, 0, 1] as [number, number, number]
		}));
		const r = checkGeometry({
			contacts,
			ballDiameter_mm: 12.7,
			preload_N: 300,
			ball: steel,
			seat: steel,
			allowableP0_MPa: 4200
		});
		expect(r.stresses).toHaveLength(3);
		const s = r.stresses![0];
		expect(s.a_mm).toBeCloseTo(0.16041, 4);
		expect(s.p0_MPa).toBeCloseTo(1855.6, 0);
		expect(s.approach_um).toBeCloseTo(4.052, 2);
		expect(s.stiffness_N_per_um).toBeCloseTo(37.02, 1);
		expect(s.margin_MPa).toBeCloseTo(4200 - 1855.6, 0);
		// Block on a flat: three freedoms (Blanding 1999; common practice).
		expect(r.dof).toBe(3);
	});
	it('is exact for the full three-vee and the trihedral-vee-flat coupling', () => {
		for (const contacts of [
			threeVeeContacts({ ballCircleRadius_mm: 50, contactAngle_deg: 45, ballDiameter_mm: 10 }),
			trihedralVeeFlatContacts({
				ballCircleRadius_mm: 50,
				contactAngle_deg: 45,
				ballDiameter_mm: 10
			})
		]) {
			const r = checkGeometry({
				contacts,
				ballDiameter_mm: 10,
				preload_N: null,
				ball: steel,
				seat: steel,
				allowableP0_MPa: 4200
			});
			expect(r).toMatchObject({ status: 'exact', dof: 0, stresses: null });
			expect(r.balls).toHaveLength(3);
		}
	});
});

describe('projectLine', () => {
	it('draws a vertical line end-on in the top view and full length in the side view', () => {
		expect(projectLine([1, 2, 3], [0, 0, 1], 5, 'top')).toBeNull();
		expect(projectLine([1, 2, 3], [0, 0, 1], 5, 'side')).toEqual({ from: [1, 2], to: [1, -8] });
		expect(projectLine([0, 0, 0], [1, 0, 0], 2, 'top')).toEqual({ from: [-2, -0], to: [2, -0] });
	});
});
