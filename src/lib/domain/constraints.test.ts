import fc from 'fast-check';
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import {
	type Contact,
	type Twist,
	analyzeConstraints,
	permitsTwist,
	twistVectors
} from './constraints';
import { threeVeeContacts, trihedralVeeFlatContacts } from './coupling-geometry';
import { type Vec3, add, cross, dot, norm, scale, sub } from './vec';

// Worked cases, computed — balls at 90°, 210°, 330° on r = 50 mm, normals 45° from
// vertical; line-of-constraint wrench w = [n ; p × n] (Blanding 1999; Hale 1999 §2.6; Hopkins &
// Culpepper, Precision Engineering 34 (2010) 259–270).
const maxwell = threeVeeContacts({ ballCircleRadius_mm: 50, contactAngle_deg: 45 });
const kelvin = trihedralVeeFlatContacts({ ballCircleRadius_mm: 50, contactAngle_deg: 45 });
const oneBallOff = threeVeeContacts({ ballCircleRadius_mm: 50, contactAngle_deg: 45, omitBall: 0 });
const blockOnFlat: Contact[] = [
	{ point: [0, 0, 0], normal: [0, 0, 1] },
	{ point: [100, 0, 0], normal: [0, 0, 1] },
	{ point: [0, 80, 0], normal: [0, 0, 1] }
];

/** Whether a twist's axis is the given line (direction parallel, point on it). */
function onLine(t: Twist, dir: Vec3, through: Vec3) {
	const parallel = norm(cross(t.direction, dir)) < 1e-9;
	const offset = norm(cross(sub(t.point!, through), dir)) / norm(dir);
	return parallel && offset < 1e-6;
}

/** Unscaled constraint matrix about the origin (rows [p × n, n]) times twist [ω ; v_O]. */
function residual(contacts: Contact[], t: Twist): number {
	const { omega, velocity } = twistVectors(t);
	return Math.max(
		...contacts.map((c) => {
			const n = scale(c.normal, 1 / norm(c.normal));
			return Math.abs(dot(cross(c.point, n), omega) + dot(n, velocity));
		})
	);
}

describe('analyzeConstraints — worked cases (Blanding 1999; Hale 1999 §2.6)', () => {
	it('three balls in three radial vees: 6 contacts, rank 6, exactly constrained', () => {
		const r = analyzeConstraints(maxwell);
		expect(r).toMatchObject({
			contacts: 6,
			rank: 6,
			dof: 0,
			redundant: 0,
			status: 'exact',
			freedoms: []
		});
		expect(r.conditionNumber).toBeGreaterThanOrEqual(1);
		expect(Number.isFinite(r.conditionNumber)).toBe(true);
	});

	it('one ball removed: rank 4, two rotations about the predicted axes', () => {
		const r = analyzeConstraints(oneBallOff);
		expect(r).toMatchObject({ contacts: 4, rank: 4, dof: 2, redundant: 0, status: 'under' });
		expect(r.freedoms.map((f) => f.kind)).toEqual(['rotation', 'rotation']);
		// Balls 2 and 3 sit at (∓43.30, −25, 0): one axis is the line through their centres.
		const c2: Vec3 = [-50 * Math.cos(Math.PI / 6), -25, 0];
		const c3: Vec3 = [50 * Math.cos(Math.PI / 6), -25, 0];
		// The other is vertical through the crossing of the lines perpendicular to each groove at its
		// ball — for radial grooves the tangents, which meet at (0, −r/cos 60°) = (0, −100).
		const lineThroughBalls = r.freedoms.some((f) => onLine(f, sub(c3, c2), c2));
		const vertical = r.freedoms.some((f) => onLine(f, [0, 0, 1], [0, -100, 0]));
		expect(lineThroughBalls && vertical).toBe(true);
		expect(
			permitsTwist(oneBallOff, { kind: 'rotation', direction: [1, 0, 0], point: [0, -25, 0] })
		).toBe(true);
		expect(
			permitsTwist(oneBallOff, { kind: 'rotation', direction: [0, 0, 1], point: [0, -100, 0] })
		).toBe(true);
		// A vertical axis through the centre is not a freedom.
		expect(
			permitsTwist(oneBallOff, { kind: 'rotation', direction: [0, 0, 1], point: [0, 0, 0] })
		).toBe(false);
	});

	it('trihedral socket + vee + flat (Kelvin type): rank 6, exactly constrained', () => {
		expect(analyzeConstraints(kelvin)).toMatchObject({
			contacts: 6,
			rank: 6,
			dof: 0,
			redundant: 0,
			status: 'exact'
		});
	});

	it('block on a flat, three vertical contacts: x, y translation and rotation about a vertical axis', () => {
		const r = analyzeConstraints(blockOnFlat);
		expect(r).toMatchObject({ contacts: 3, rank: 3, dof: 3, redundant: 0, status: 'under' });
		expect(r.freedoms.map((f) => f.kind)).toEqual(['translation', 'translation', 'rotation']);
		expect(r.freedoms[0].direction).toEqual([1, 0, 0]);
		expect(r.freedoms[1].direction).toEqual([0, 1, 0]);
		expect(norm(cross(r.freedoms[2].direction, [0, 0, 1]))).toBeLessThan(1e-12);
		// Any vertical axis will do while x and y translations are free.
		expect(
			permitsTwist(blockOnFlat, { kind: 'rotation', direction: [0, 0, 1], point: [37, -12, 5] })
		).toBe(true);
		expect(permitsTwist(blockOnFlat, { kind: 'translation', direction: [0, 0, 1] })).toBe(false);
	});
});

describe('analyzeConstraints — further cases from the literature', () => {
	it('tangential grooves let the coupling spin about its centre (Slocum 1992, from memory; common practice)', () => {
		const c = threeVeeContacts({
			ballCircleRadius_mm: 50,
			contactAngle_deg: 45,
			grooveYaw_deg: 90
		});
		const r = analyzeConstraints(c);
		expect(r).toMatchObject({ rank: 5, dof: 1, redundant: 1, status: 'under-and-over' });
		expect(r.freedoms[0].kind).toBe('rotation');
		expect(onLine(r.freedoms[0], [0, 0, 1], [0, 0, 0])).toBe(true);
	});

	it('four balls in four radial vees: 8 contacts, rank 6, 2 redundant (common practice)', () => {
		const c: Contact[] = [];
		for (const deg of [0, 90, 180, 270]) {
			const phi = (deg * Math.PI) / 180;
			const centre: Vec3 = [50 * Math.cos(phi), 50 * Math.sin(phi), 0];
			const across: Vec3 = [-Math.sin(phi), Math.cos(phi), 0];
			c.push(
				{ point: centre, normal: add([0, 0, 1], across) },
				{ point: centre, normal: sub([0, 0, 1], across) }
			);
		}
		expect(analyzeConstraints(c)).toMatchObject({
			contacts: 8,
			rank: 6,
			dof: 0,
			redundant: 2,
			status: 'over'
		});
	});

	it('four-point flat plus an x and a y stop: redundant and free at once; the rotation axis meets every constraint line (Hale 1999 §2.6)', () => {
		const c: Contact[] = [
			{ point: [0, 0, 0], normal: [0, 0, 1] },
			{ point: [100, 0, 0], normal: [0, 0, 1] },
			{ point: [100, 100, 0], normal: [0, 0, 1] },
			{ point: [0, 100, 0], normal: [0, 0, 1] },
			{ point: [50, 0, 10], normal: [1, 0, 0] },
			{ point: [0, 30, 10], normal: [0, 1, 0] }
		];
		const r = analyzeConstraints(c);
		expect(r).toMatchObject({ rank: 5, dof: 1, redundant: 1, status: 'under-and-over' });
		// The x-stop line (y = 0, z = 10) and the y-stop line (x = 0, z = 10) cross above the origin;
		// the vertical contact lines meet a vertical axis at infinity.
		expect(r.freedoms[0].kind).toBe('rotation');
		expect(onLine(r.freedoms[0], [0, 0, 1], [0, 0, 10])).toBe(true);
	});

	it('a single contact leaves five freedoms', () => {
		const r = analyzeConstraints([{ point: [1, 2, 3], normal: [0, 0, 2] }]);
		expect(r).toMatchObject({ rank: 1, dof: 5, redundant: 0, status: 'under' });
		for (const f of r.freedoms)
			expect(permitsTwist([{ point: [1, 2, 3], normal: [0, 0, 1] }], f)).toBe(true);
	});

	it('no contacts: six freedoms, three translations and three rotations', () => {
		const r = analyzeConstraints([]);
		expect(r).toMatchObject({ contacts: 0, rank: 0, dof: 6, redundant: 0, conditionNumber: 1 });
		expect(r.freedoms.filter((f) => f.kind === 'translation')).toHaveLength(3);
		expect(r.freedoms.filter((f) => f.kind === 'rotation')).toHaveLength(3);
	});

	it('a ball on a cone of four contacts is over-constrained: all lines meet at the centre (rank 3)', () => {
		const c: Contact[] = [0, 90, 180, 270].map((d) => {
			const phi = (d * Math.PI) / 180;
			return {
				point: [-5 * Math.cos(phi), -5 * Math.sin(phi), -5],
				normal: [Math.cos(phi), Math.sin(phi), 1]
			};
		});
		const r = analyzeConstraints(c);
		expect(r).toMatchObject({ rank: 3, dof: 3, redundant: 1 });
		// Three rotations about axes through the ball centre (the origin).
		expect(r.freedoms.every((f) => f.kind === 'rotation' && norm(f.point!) < 1e-9)).toBe(true);
	});

	it('reports a screw when the only freedom has a pitch', () => {
		// Five lines reciprocal to a screw about z through the origin with pitch 2 mm/rad: at points
		// on a 10 mm circle, normals perpendicular to that screw's velocity there.
		const h = 2;
		const c: Contact[] = [];
		for (const [deg, kinds] of [
			[0, ['radial', 'other']],
			[120, ['radial', 'other']],
			[240, ['other']]
		] as const) {
			const phi = (deg * Math.PI) / 180;
			const p: Vec3 = [10 * Math.cos(phi), 10 * Math.sin(phi), 0];
			const velocity: Vec3 = [-10 * Math.sin(phi), 10 * Math.cos(phi), h];
			const radial: Vec3 = [Math.cos(phi), Math.sin(phi), 0];
			for (const k of kinds)
				c.push({ point: p, normal: k === 'radial' ? radial : cross(velocity, radial) });
		}
		const r = analyzeConstraints(c);
		expect(r).toMatchObject({ rank: 5, dof: 1 });
		expect(r.freedoms[0].kind).toBe('screw');
		expect(r.freedoms[0].pitch).toBeCloseTo(h, 9);
		expect(onLine(r.freedoms[0], [0, 0, 1], [0, 0, 0])).toBe(true);
	});
});

describe('analyzeConstraints — errors', () => {
	it('rejects a zero-length normal, a bad point and bad options clearly', () => {
		expect(() => analyzeConstraints([{ point: [0, 0, 0], normal: [0, 0, 0] }])).toThrow(
			'contacts[0].normal: must not have zero length'
		);
		expect(() => analyzeConstraints([{ point: [0, NaN, 0], normal: [0, 0, 1] }])).toThrow(
			/contacts\[0\]\.point\[1\]: must be a finite number/
		);
		expect(() =>
			analyzeConstraints([{ point: [0, 0], normal: [0, 0, 1] } as unknown as Contact])
		).toThrow(/three numbers/);
		expect(() => analyzeConstraints(maxwell, { lengthScale: 0 })).toThrow(/lengthScale/);
		expect(() => analyzeConstraints(maxwell, { tolerance: 2 })).toThrow(/tolerance/);
		expect(() => analyzeConstraints(null as unknown as Contact[])).toThrow(
			/contacts: must be an array/
		);
	});

	it('treats contacts a picometre apart as one point, with no NaN', () => {
		const r = analyzeConstraints([
			{ point: [0, 0, 0], normal: [0, 0, 1] },
			{ point: [0, 5e-324, 0], normal: [0, 0, 1] }
		]);
		expect(r).toMatchObject({ rank: 1, dof: 5, redundant: 1, lengthScale_mm: 1 });
		expect(JSON.stringify(r)).not.toMatch(/null|NaN/);
	});

	it('permitsTwist rejects a zero direction and an unknown kind', () => {
		expect(() => permitsTwist(maxwell, { kind: 'translation', direction: [0, 0, 0] })).toThrow(
			/zero length/
		);
		expect(() =>
			permitsTwist(maxwell, { kind: 'wobble' as 'screw', direction: [0, 0, 1] })
		).toThrow(/twist.kind/);
	});
});

// Random contact sets, some with planted dependencies (a repeated line, parallel normals).
// Regression: two almost parallel lines, whose zero-pitch freedoms are nearly parallel.
const nearlyParallel: Contact[] = [
	{ point: [0, 0, 0], normal: [-0.001, 0, -1.369] },
	{ point: [-47.015, 19.448, 0], normal: [0, -0.006, -20.295] }
];
// Coordinates in mm to the micrometre, as a designer would enter them.
const coord = fc.integer({ min: -100_000, max: 100_000 }).map((i) => i / 1000);
const vec = fc.tuple(coord, coord, coord) as fc.Arbitrary<Vec3>;
const normalArb = vec.filter((v) => norm(v) > 1);
const contactArb = fc.record({ point: vec, normal: normalArb }) as fc.Arbitrary<Contact>;
// Generated values are never mutated (fast-check reuses them while shrinking): new arrays only.
const contactSet = fc
	.tuple(
		fc.oneof(fc.array(contactArb, { minLength: 1, maxLength: 9 }), fc.constant(nearlyParallel)),
		fc.nat(3),
		fc.double({ min: -50, max: 50, noNaN: true })
	)
	.map(([cs, plant, shift]): Contact[] => {
		if (plant === 1) {
			// The same line again, slid along itself (by any amount, even a subnormal one).
			const c = cs[0];
			return [
				...cs,
				{ point: add(c.point, scale(c.normal, shift / norm(c.normal))), normal: scale(c.normal, 2) }
			];
		}
		if (plant === 2) return cs.map((c) => ({ point: c.point, normal: [0, 0, 1] }));
		return cs;
	});

/** The length-scaled matrix about the centroid, with the scale L the analysis chose. */
function scaledMatrix(contacts: Contact[], L: number): { rows: number[][]; L: number } {
	const c = scale(
		contacts.reduce<Vec3>((s, k) => add(s, k.point), [0, 0, 0]),
		1 / contacts.length
	);
	const rows = contacts.map((k) => {
		const n = scale(k.normal, 1 / norm(k.normal));
		const m = scale(cross(sub(k.point, c), n), 1 / L);
		return [...m, ...n];
	});
	return { rows, L };
}

describe('analyzeConstraints — cross-check against ml-matrix SVD (random contact sets)', () => {
	it('agrees on rank, and every freedom is in the null space with a well-conditioned basis', () => {
		fc.assert(
			fc.property(contactSet, (contacts) => {
				const r = analyzeConstraints(contacts);
				const { rows } = scaledMatrix(contacts, r.lengthScale_mm);
				// Pad with zero rows so ml-matrix sees at least as many rows as columns.
				const padded = [...rows, ...Array.from({ length: 6 }, () => [0, 0, 0, 0, 0, 0])];
				const ref = new SingularValueDecomposition(new Matrix(padded));
				const sv = ref.diagonal.slice().sort((x, y) => y - x);
				const refRank = sv.filter((s) => s > 1e-9 * sv[0]).length;
				expect(r.rank).toBe(refRank);
				expect(r.dof).toBe(6 - refRank);
				expect(r.redundant).toBe(contacts.length - refRank);
				expect(r.freedoms).toHaveLength(r.dof);
				for (const f of r.freedoms) expect(permitsTwist(contacts, f, 1e-6)).toBe(true);
				if (r.dof > 0) {
					// Freedoms are independent and well conditioned: as unit 6-vectors [ω·L ; v at
					// the centroid] their matrix has rank dof with σ_min/σ_max above 1e-6.
					const L = r.lengthScale_mm;
					const c = scale(
						contacts.reduce<Vec3>((s, k) => add(s, k.point), [0, 0, 0]),
						1 / contacts.length
					);
					const T = r.freedoms.map((f) => {
						const { omega, velocity } = twistVectors(f);
						const v = add(velocity, cross(omega, c));
						const six = [...scale(omega, L), ...v];
						const size = Math.hypot(...six);
						return six.map((x) => x / size);
					});
					const tsv = new SingularValueDecomposition(new Matrix(T).transpose()).diagonal;
					expect(Math.min(...tsv) / Math.max(...tsv)).toBeGreaterThan(1e-6);
				}
				// The reference null space: residual of our freedoms against the unscaled matrix.
				for (const f of r.freedoms) {
					const { omega } = twistVectors(f);
					const size = norm(omega) * 200 + 1 + Math.abs(f.pitch ?? 0);
					expect(residual(contacts, f)).toBeLessThan(1e-6 * size * 100);
				}
			}),
			{ numRuns: 300 }
		);
	});
});

function rotation(q: [number, number, number, number]): (v: Vec3) => Vec3 {
	const n = Math.hypot(...q);
	const [w, x, y, z] = q.map((c) => c / n);
	const m = [
		[1 - 2 * (y * y + z * z), 2 * (x * y - w * z), 2 * (x * z + w * y)],
		[2 * (x * y + w * z), 1 - 2 * (x * x + z * z), 2 * (y * z - w * x)],
		[2 * (x * z - w * y), 2 * (y * z + w * x), 1 - 2 * (x * x + y * y)]
	];
	return (v) => m.map((row) => row[0] * v[0] + row[1] * v[1] + row[2] * v[2]) as Vec3;
}

const quat = fc
	.tuple(
		fc.double({ min: -1, max: 1, noNaN: true }),
		fc.double({ min: -1, max: 1, noNaN: true }),
		fc.double({ min: -1, max: 1, noNaN: true }),
		fc.double({ min: -1, max: 1, noNaN: true })
	)
	.filter((q) => Math.hypot(...q) > 0.1);

const designSet = fc.oneof(
	contactSet,
	fc.constant(maxwell),
	fc.constant(kelvin),
	fc.constant(oneBallOff),
	fc.constant(blockOnFlat),
	fc.constant(
		threeVeeContacts({ ballCircleRadius_mm: 50, contactAngle_deg: 45, grooveYaw_deg: 90 })
	)
);

describe('analyzeConstraints — invariance (fast-check)', () => {
	it('rank and DOF do not change under a rigid motion of all contacts', () => {
		fc.assert(
			fc.property(designSet, quat, vec, (contacts, q, shift) => {
				const rot = rotation(q);
				const moved = contacts.map((c) => ({
					point: add(rot(c.point), shift),
					normal: rot(c.normal)
				}));
				const a = analyzeConstraints(contacts);
				const b = analyzeConstraints(moved);
				expect([b.rank, b.dof, b.redundant]).toEqual([a.rank, a.dof, a.redundant]);
			}),
			{ numRuns: 300 }
		);
	});

	it('rank and DOF do not change when all lengths are scaled', () => {
		fc.assert(
			fc.property(designSet, fc.double({ min: 1e-3, max: 1e3, noNaN: true }), (contacts, k) => {
				const scaled = contacts.map((c) => ({ point: scale(c.point, k), normal: c.normal }));
				const a = analyzeConstraints(contacts);
				const b = analyzeConstraints(scaled);
				expect([b.rank, b.dof]).toEqual([a.rank, a.dof]);
			}),
			{ numRuns: 300 }
		);
	});
});
