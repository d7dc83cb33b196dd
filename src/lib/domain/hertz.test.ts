import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
	MATERIALS,
	MATERIAL_SOURCES,
	allowableLoad,
	effectiveModulus,
	hertzBallInGroove,
	hertzBallInSeat,
	hertzBallInVee,
	hertzBallOnBall,
	hertzBallOnFlat,
	type Material
} from './hertz';
import { gaussLegendre } from './subsurface';

const steel: Material = { E_GPa: 210, nu: 0.3 };
const siliconNitride: Material = { E_GPa: 310, nu: 0.27 };

/** |x/expected − 1| ≤ rel */
const near = (x: number, expected: number, rel: number) =>
	expect(Math.abs(x / expected - 1)).toBeLessThanOrEqual(rel);

describe('hertzBallOnFlat — worked cases (computed from Johnson, Contact Mechanics 1985 §3.4, equation numbers from memory)', () => {
	it('Ø12.7 mm 52100 ball on a steel flat, 100 N', () => {
		const h = hertzBallOnFlat({ ballDiameter_mm: 12.7, load_N: 100, ball: steel, flat: steel });
		expect(h.effectiveModulus_GPa).toBeCloseTo(115.385, 3);
		expect(h.a_mm).toBeCloseTo(0.16041, 5);
		expect(h.b_mm).toBe(h.a_mm);
		expect(h.p0_MPa).toBeCloseTo(1855.6, 1);
		expect(h.meanPressure_MPa * 1.5).toBeCloseTo(h.p0_MPa, 9);
		expect(h.approach_um).toBeCloseTo(4.052, 3);
		expect(h.stiffness_N_per_um).toBeCloseTo(37.02, 2);
		// k = 2E*a = 1.5 F/δ (Johnson 1985 §3.4, from memory).
		expect(h.stiffness_N_per_um).toBeCloseTo((1.5 * 100) / h.approach_um, 9);
		// τ_max 0.3100 p0 at 0.4809 a for ν = 0.3 (computed from Johnson 1985 eq. 3.45, from memory).
		expect(h.maxShear_MPa / h.p0_MPa).toBeCloseTo(0.31, 4);
		expect(h.maxShearDepth_mm / h.a_mm).toBeCloseTo(0.4809, 4);
	});

	it('Ø12.7 mm Si₃N₄ ball on a steel flat, 100 N', () => {
		const h = hertzBallOnFlat({
			ballDiameter_mm: 12.7,
			load_N: 100,
			ball: siliconNitride,
			flat: steel
		});
		expect(h.effectiveModulus_GPa).toBeCloseTo(136.538, 3);
		expect(h.a_mm).toBeCloseTo(0.15166, 5);
		expect(h.p0_MPa).toBeCloseTo(2076.0, 1);
		expect(h.approach_um).toBeCloseTo(3.622, 3);
		expect(h.stiffness_N_per_um).toBeCloseTo(41.41, 2);
		// The ceramic ball (ν 0.27) carries the larger shear.
		expect(h.bodies.map((b) => b.body)).toEqual(['ball', 'flat']);
		expect(h.bodies[0].maxShear_MPa).toBeGreaterThan(h.bodies[1].maxShear_MPa);
		expect(h.maxShear_MPa).toBe(h.bodies[0].maxShear_MPa);
	});

	it("matches Roark's Table 14.1 constants: a = 0.721 (P K_D C_E)^⅓, y = 1.040 (P² C_E²/K_D)^⅓", () => {
		const P = 250;
		const D = 10;
		const CE = (1 / effectiveModulus(steel, steel)) * 1e6; // 1/MPa: N and mm units
		const h = hertzBallOnFlat({ ballDiameter_mm: D, load_N: P, ball: steel, flat: steel });
		near(h.a_mm, 0.721 * Math.cbrt(P * D * CE), 3e-4);
		near(h.approach_um / 1000, 1.04 * Math.cbrt((P * P * CE * CE) / D), 3e-4);
		near(h.p0_MPa, (1.5 * P) / (Math.PI * h.a_mm ** 2), 1e-12);
	});
});

describe('other circular contacts — Roark Table 14.1', () => {
	const CE = (1 / effectiveModulus(steel, siliconNitride)) * 1e6;

	it('ball on ball: K_D = D₁D₂/(D₁ + D₂)', () => {
		const h = hertzBallOnBall({
			ballDiameter_mm: 12,
			otherDiameter_mm: 20,
			load_N: 80,
			ball: steel,
			other: siliconNitride
		});
		const KD = (12 * 20) / 32;
		near(h.a_mm, 0.721 * Math.cbrt(80 * KD * CE), 3e-4);
		near(h.approach_um / 1000, 1.04 * Math.cbrt((80 * 80 * CE * CE) / KD), 3e-4);
	});

	it('ball in a spherical socket: K_D = D₁D₂/(D₂ − D₁)', () => {
		const h = hertzBallInSeat({
			ballDiameter_mm: 12,
			seatRadius_mm: 6.5,
			load_N: 80,
			ball: steel,
			seat: siliconNitride
		});
		const KD = (12 * 13) / (13 - 12);
		near(h.a_mm, 0.721 * Math.cbrt(80 * KD * CE), 3e-4);
		near(h.approach_um / 1000, 1.04 * Math.cbrt((80 * 80 * CE * CE) / KD), 3e-4);
	});

	it('a conforming seat spreads the load: bigger contact, lower pressure than a flat', () => {
		const flat = hertzBallOnFlat({ ballDiameter_mm: 12, load_N: 80, ball: steel, flat: steel });
		const seat = hertzBallInSeat({
			ballDiameter_mm: 12,
			seatRadius_mm: 6.2,
			load_N: 80,
			ball: steel,
			seat: steel
		});
		expect(seat.a_mm).toBeGreaterThan(flat.a_mm);
		expect(seat.p0_MPa).toBeLessThan(flat.p0_MPa);
	});
});

describe('Hertz scaling laws (fast-check): a ∝ F^⅓, p0 ∝ F^⅓, δ ∝ F^⅔ (Johnson 1985 §3.4, from memory)', () => {
	it('hold for every load ratio, diameter and material pair', () => {
		const material = fc.record({
			E_GPa: fc.double({ min: 50, max: 700, noNaN: true }),
			nu: fc.double({ min: 0, max: 0.45, noNaN: true })
		});
		fc.assert(
			fc.property(
				fc.double({ min: 1, max: 50, noNaN: true }),
				fc.double({ min: 0.1, max: 1e4, noNaN: true }),
				fc.double({ min: 0.01, max: 1000, noNaN: true }),
				material,
				material,
				(D, F, k, ball, flat) => {
					const h1 = hertzBallOnFlat({ ballDiameter_mm: D, load_N: F, ball, flat });
					const h2 = hertzBallOnFlat({ ballDiameter_mm: D, load_N: F * k, ball, flat });
					near(h2.a_mm / h1.a_mm, Math.cbrt(k), 1e-12);
					near(h2.p0_MPa / h1.p0_MPa, Math.cbrt(k), 1e-12);
					near(h2.approach_um / h1.approach_um, Math.cbrt(k) ** 2, 1e-12);
				}
			)
		);
	});
});

describe('hertzBallInVee — flank load N = F/(2 cos θ), k_v = 2 k_n cos²θ (computed from the flank geometry and Johnson 1985 §3.4)', () => {
	it('90° vee: θ = 45°, each flank carries F/√2 and k_v = k_n', () => {
		const v = hertzBallInVee({
			ballDiameter_mm: 12.7,
			verticalLoad_N: 100,
			includedAngle_deg: 90,
			ball: steel,
			seat: steel
		});
		expect(v.flankLoad_N).toBeCloseTo(100 / Math.SQRT2, 10);
		const flat = hertzBallOnFlat({
			ballDiameter_mm: 12.7,
			load_N: v.flankLoad_N,
			ball: steel,
			flat: steel
		});
		expect(v.flank.a_mm).toBeCloseTo(flat.a_mm, 12);
		expect(v.verticalStiffness_N_per_um).toBeCloseTo(v.flank.stiffness_N_per_um, 10);
		expect(v.flank.bodies.map((b) => b.body)).toEqual(['ball', 'seat']);
	});

	it('120° vee: θ = 30°', () => {
		const v = hertzBallInVee({
			ballDiameter_mm: 10,
			verticalLoad_N: 300,
			includedAngle_deg: 120,
			ball: steel,
			seat: steel
		});
		expect(v.flankLoad_N).toBeCloseTo(300 / (2 * Math.cos(Math.PI / 6)), 10);
		expect(v.verticalStiffness_N_per_um).toBeCloseTo(2 * v.flank.stiffness_N_per_um * 0.75, 10);
	});
});

/**
 * Surface approach at (x0, y0) under an elliptical Hertz pressure, by quadrature of Boussinesq's
 * surface kernel u = (1/πE*) ∬ p/r dA (Johnson 1985 §3.2, from memory) in polar coordinates about the
 * point: along each ray the pressure is p0 √(γ(ρ₁ − ρ)(ρ − ρ₀)), integrated in closed form.
 * Independent of the elliptic-integral solution it checks. mm and MPa.
 */
function approachAt(
	x0: number,
	y0: number,
	a: number,
	b: number,
	p0: number,
	Estar: number
): number {
	const { x, w } = gaussLegendre(400);
	let sum = 0;
	for (let i = 0; i < x.length; i++) {
		const phi = Math.PI * (x[i] + 1);
		const c = Math.cos(phi);
		const s = Math.sin(phi);
		const alpha = 1 - (x0 * x0) / (a * a) - (y0 * y0) / (b * b);
		const beta = -2 * ((x0 * c) / (a * a) + (y0 * s) / (b * b));
		const gamma = (c * c) / (a * a) + (s * s) / (b * b);
		const root = Math.sqrt(beta * beta + 4 * gamma * alpha);
		const r1 = (beta + root) / (2 * gamma);
		const r0 = (beta - root) / (2 * gamma);
		const m = (r1 + r0) / 2;
		const h = (r1 - r0) / 2;
		const F = (u: number) =>
			0.5 * (u * Math.sqrt(Math.max(h * h - u * u, 0)) + h * h * Math.asin(u / h));
		sum += w[i] * Math.PI * Math.sqrt(gamma) * (F(h) - F(-m));
	}
	return (p0 * sum) / (Math.PI * Estar);
}

describe('hertzBallInGroove — elliptical contact', () => {
	const base = {
		ballDiameter_mm: 12.7,
		contactAngle_deg: 45,
		verticalLoad_N: 100,
		ball: steel,
		seat: steel
	};

	it('exact solution satisfies the surface displacement condition u = δ − A x² − B y² (Johnson 1985 §4.2, from memory; checked by independent quadrature)', () => {
		for (const conformity of [1.04, 1.2, 2]) {
			const rb = 6.35;
			const Rg = rb * conformity;
			const { flank: f } = hertzBallInGroove({ ...base, grooveRadius_mm: Rg });
			const Estar = f.effectiveModulus_GPa * 1000;
			const A = (1 / rb - 1 / Rg) / 2; // across the groove, along a
			const B = 1 / (2 * rb); // along the groove, along b
			const delta = f.approach_um / 1000;
			near(approachAt(0, 0, f.a_mm, f.b_mm, f.p0_MPa, Estar), delta, 1e-6);
			const xa = 0.6 * f.a_mm;
			const yb = 0.6 * f.b_mm;
			near(approachAt(xa, 0, f.a_mm, f.b_mm, f.p0_MPa, Estar), delta - A * xa * xa, 1e-6);
			near(approachAt(0, yb, f.a_mm, f.b_mm, f.p0_MPa, Estar), delta - B * yb * yb, 1e-6);
			expect(f.a_mm).toBeGreaterThan(f.b_mm);
			near(f.p0_MPa, (3 * f.load_N) / (2 * Math.PI * f.a_mm * f.b_mm), 1e-12);
		}
	});

	it('flank load is F/(2 cos θ) for a Gothic arch and F for a single-arc groove', () => {
		expect(hertzBallInGroove({ ...base, grooveRadius_mm: 6.6 }).flankLoad_N).toBeCloseTo(
			100 / Math.SQRT2,
			10
		);
		expect(
			hertzBallInGroove({ ...base, contactAngle_deg: 0, grooveRadius_mm: 6.6 }).flankLoad_N
		).toBe(100);
	});

	it('a very wide groove tends to ball on flat', () => {
		const g = hertzBallInGroove({ ...base, contactAngle_deg: 0, grooveRadius_mm: 1e9 }).flank;
		const f = hertzBallOnFlat({ ballDiameter_mm: 12.7, load_N: 100, ball: steel, flat: steel });
		near(g.a_mm, f.a_mm, 1e-7);
		near(g.b_mm, f.b_mm, 1e-7);
		near(g.p0_MPa, f.p0_MPa, 1e-7);
		near(g.approach_um, f.approach_um, 1e-7);
		near(g.maxShear_MPa, f.maxShear_MPa, 1e-5);
	});

	it('Hamrock–Brewe (1983, from memory) agrees with the exact solution within 1.5 % for radius ratios 2–30 (computed)', () => {
		for (const ratio of [2, 5, 10, 20, 30]) {
			const Rg = (6.35 * ratio) / (ratio - 1); // R_across / R_along = ratio
			const exact = hertzBallInGroove({ ...base, grooveRadius_mm: Rg }).flank;
			const approx = hertzBallInGroove({
				...base,
				grooveRadius_mm: Rg,
				method: 'approximate'
			}).flank;
			near(approx.a_mm, exact.a_mm, 0.015);
			near(approx.b_mm, exact.b_mm, 0.015);
			near(approx.p0_MPa, exact.p0_MPa, 0.015);
			near(approx.approach_um, exact.approach_um, 0.015);
		}
	});

	it('subsurface shear of a conforming groove lies deeper (in b) than a circular contact’s', () => {
		const f = hertzBallInGroove({ ...base, grooveRadius_mm: 6.6 }).flank;
		expect(f.maxShearDepth_mm / f.b_mm).toBeGreaterThan(0.6);
		expect(f.maxShear_MPa / f.p0_MPa).toBeGreaterThan(0.29);
		expect(f.maxShear_MPa / f.p0_MPa).toBeLessThan(0.34);
	});
});

describe('allowableLoad — F = p0³π³R²/(6E*²) at the ISO 76 limit of 4200 MPa', () => {
	it('ball on flat: the load that gives p0 = 4200 MPa', () => {
		const { load_N, limit_MPa } = allowableLoad({
			contact: 'ball-on-flat',
			ballDiameter_mm: 12.7,
			ball: steel,
			seat: steel
		});
		expect(limit_MPa).toBe(4200);
		expect(load_N).toBeCloseTo(1159.57, 2); // computed from the formula above
		const h = hertzBallOnFlat({ ballDiameter_mm: 12.7, load_N, ball: steel, flat: steel });
		expect(h.p0_MPa).toBeCloseTo(4200, 8);
	});

	it('ball in a 90° vee: vertical load 2 cos 45° times the flank load', () => {
		const v = allowableLoad({
			contact: 'ball-in-vee',
			ballDiameter_mm: 12.7,
			ball: steel,
			seat: steel
		});
		expect(v.load_N).toBeCloseTo(v.flankLoad_N * Math.SQRT2, 9);
		const check = hertzBallInVee({
			ballDiameter_mm: 12.7,
			verticalLoad_N: v.load_N,
			includedAngle_deg: 90,
			ball: steel,
			seat: steel
		});
		expect(check.flank.p0_MPa).toBeCloseTo(4200, 8);
	});

	it('takes another limit, e.g. first yield at p0 ≈ 1.6 Y (Johnson 1985, from memory)', () => {
		const Y = 2000;
		const r = allowableLoad({
			contact: 'ball-on-flat',
			ballDiameter_mm: 10,
			ball: steel,
			seat: steel,
			limit_MPa: 1.6 * Y
		});
		expect(
			hertzBallOnFlat({ ballDiameter_mm: 10, load_N: r.load_N, ball: steel, flat: steel }).p0_MPa
		).toBeCloseTo(3200, 8);
	});
});

describe('materials', () => {
	it('every material has a stated source', () => {
		for (const key of Object.keys(MATERIALS))
			expect(MATERIAL_SOURCES[key as keyof typeof MATERIALS]).toBeTruthy();
		expect(MATERIALS['steel-52100']).toMatchObject({ E_GPa: 210, nu: 0.3 });
		expect(MATERIALS['silicon-nitride']).toMatchObject({ E_GPa: 310, nu: 0.27 });
	});
});

describe('invalid input throws a clear error, never NaN', () => {
	const ok = { ballDiameter_mm: 10, load_N: 10, ball: steel, flat: steel };
	it.each([
		[{ ...ok, load_N: 0 }, /load_N: must be greater than zero/],
		[{ ...ok, load_N: -5 }, /load_N/],
		[{ ...ok, ballDiameter_mm: NaN }, /ballDiameter_mm: must be a finite number/],
		[{ ...ok, ball: { E_GPa: 0, nu: 0.3 } }, /ball.E_GPa/],
		[{ ...ok, flat: { E_GPa: 200, nu: 0.5 } }, /flat.nu: must be above −1 and below 0.5/],
		[{ ...ok, flat: null as unknown as Material }, /flat: must be a material/]
	])('hertzBallOnFlat(%o)', (input, message) => {
		expect(() => hertzBallOnFlat(input)).toThrow(message);
	});

	it('seat and groove radii must exceed the ball radius; angles must be in range', () => {
		expect(() =>
			hertzBallInSeat({
				ballDiameter_mm: 10,
				seatRadius_mm: 5,
				load_N: 1,
				ball: steel,
				seat: steel
			})
		).toThrow(/seatRadius_mm: must be larger than the ball radius 5.000 mm/);
		expect(() =>
			hertzBallInGroove({
				ballDiameter_mm: 10,
				grooveRadius_mm: 4,
				contactAngle_deg: 45,
				verticalLoad_N: 1,
				ball: steel,
				seat: steel
			})
		).toThrow(/grooveRadius_mm/);
		expect(() =>
			hertzBallInGroove({
				ballDiameter_mm: 10,
				grooveRadius_mm: 6,
				contactAngle_deg: 90,
				verticalLoad_N: 1,
				ball: steel,
				seat: steel
			})
		).toThrow(/contactAngle_deg/);
		expect(() =>
			hertzBallInVee({
				ballDiameter_mm: 10,
				verticalLoad_N: 1,
				includedAngle_deg: 180,
				ball: steel,
				seat: steel
			})
		).toThrow(/includedAngle_deg/);
		expect(() =>
			allowableLoad({
				contact: 'ball-on-cone' as 'ball-on-flat',
				ballDiameter_mm: 10,
				ball: steel,
				seat: steel
			})
		).toThrow(/contact/);
		expect(() =>
			allowableLoad({
				contact: 'ball-on-flat',
				ballDiameter_mm: 10,
				ball: steel,
				seat: steel,
				limit_MPa: -1
			})
		).toThrow(/limit_MPa/);
	});
});
