import { describe, expect, it } from 'vitest';
import { threeVeeContacts, trihedralVeeFlatContacts } from './coupling-geometry';
import { type Vec3, cross, dot, norm, sub } from './vec';

const angleFromVertical = (n: Vec3) => (Math.acos(n[2] / norm(n)) * 180) / Math.PI;

describe('threeVeeContacts', () => {
	const contacts = threeVeeContacts({
		ballCircleRadius_mm: 50,
		contactAngle_deg: 45,
		ballDiameter_mm: 10
	});

	it('gives two flank contacts per ball, labelled', () => {
		expect(contacts).toHaveLength(6);
		expect(contacts[0].label).toBe('ball 1 vee flank A');
		expect(contacts[5].label).toBe('ball 3 vee flank B');
	});

	it('tilts every normal by the contact angle from the vertical', () => {
		for (const c of contacts) expect(angleFromVertical(c.normal)).toBeCloseTo(45, 10);
	});

	it('puts contact points on the ball surface, on the normal through the ball centre', () => {
		const centres: Vec3[] = [90, 210, 330].map((d) => [
			50 * Math.cos((d * Math.PI) / 180),
			50 * Math.sin((d * Math.PI) / 180),
			0
		]);
		contacts.forEach((c, i) => {
			const centre = centres[Math.floor(i / 2)];
			expect(norm(sub(c.point, centre))).toBeCloseTo(5, 10);
			expect(norm(cross(sub(centre, c.point), c.normal))).toBeLessThan(1e-9);
		});
	});

	it('radial grooves: flank normals are perpendicular to the radial groove axis', () => {
		contacts.forEach((c, i) => {
			const phi = ([90, 210, 330][Math.floor(i / 2)] * Math.PI) / 180;
			expect(dot(c.normal, [Math.cos(phi), Math.sin(phi), 0])).toBeCloseTo(0, 12);
		});
	});

	it('tangential grooves (yaw 90°): normals perpendicular to the tangent', () => {
		const t = threeVeeContacts({
			ballCircleRadius_mm: 50,
			contactAngle_deg: 45,
			grooveYaw_deg: 90
		});
		t.forEach((c, i) => {
			const phi = ([90, 210, 330][Math.floor(i / 2)] * Math.PI) / 180;
			expect(dot(c.normal, [-Math.sin(phi), Math.cos(phi), 0])).toBeCloseTo(0, 12);
		});
	});

	it('omits a ball on request', () => {
		const t = threeVeeContacts({ ballCircleRadius_mm: 50, contactAngle_deg: 45, omitBall: 1 });
		expect(t.map((c) => c.label)).toEqual([
			'ball 1 vee flank A',
			'ball 1 vee flank B',
			'ball 3 vee flank A',
			'ball 3 vee flank B'
		]);
	});

	it('rejects bad figures with a clear error', () => {
		expect(() => threeVeeContacts({ ballCircleRadius_mm: 0, contactAngle_deg: 45 })).toThrow(
			/ballCircleRadius_mm/
		);
		expect(() => threeVeeContacts({ ballCircleRadius_mm: 50, contactAngle_deg: 95 })).toThrow(
			/contactAngle_deg/
		);
		expect(() => threeVeeContacts({ ballCircleRadius_mm: 50, contactAngle_deg: NaN })).toThrow(
			/finite/
		);
		expect(() =>
			threeVeeContacts({ ballCircleRadius_mm: 50, contactAngle_deg: 45, omitBall: 3 as 0 })
		).toThrow(/omitBall/);
		expect(() =>
			threeVeeContacts({ ballCircleRadius_mm: 50, contactAngle_deg: 45, ballDiameter_mm: -1 })
		).toThrow(/ballDiameter_mm/);
	});
});

describe('trihedralVeeFlatContacts', () => {
	const contacts = trihedralVeeFlatContacts({ ballCircleRadius_mm: 50, contactAngle_deg: 45 });

	it('gives three socket contacts, two vee flanks and one flat contact', () => {
		expect(contacts.map((c) => c.label)).toEqual([
			'ball 1 socket face 1',
			'ball 1 socket face 2',
			'ball 1 socket face 3',
			'ball 2 vee flank A',
			'ball 2 vee flank B',
			'ball 3 flat'
		]);
		expect(contacts[5].normal).toEqual([0, 0, 1]);
	});

	it('points the vee at the socket: its flank normals are perpendicular to the line between them', () => {
		const c1: Vec3 = [0, 50, 0];
		const c2: Vec3 = [
			50 * Math.cos((210 * Math.PI) / 180),
			50 * Math.sin((210 * Math.PI) / 180),
			0
		];
		for (const c of contacts.slice(3, 5)) expect(dot(c.normal, sub(c1, c2))).toBeCloseTo(0, 10);
	});
});
