import { describe, expect, it } from 'vitest';
import {
	circularAxisStress,
	circularMaxShear,
	ellipticalAxisStress,
	ellipticalMaxShear,
	gaussLegendre
} from './subsurface';

describe('Gauss–Legendre nodes', () => {
	it('integrate polynomials up to degree 2n − 1 exactly and cos over [0, π/2]', () => {
		const { x, w } = gaussLegendre(8);
		const integrate = (f: (t: number) => number) => x.reduce((s, xi, i) => s + w[i] * f(xi), 0);
		expect(integrate((t) => t ** 14)).toBeCloseTo(2 / 15, 14);
		expect(integrate(() => 1)).toBeCloseTo(2, 14);
		const half = Math.PI / 4;
		expect(x.reduce((s, xi, i) => s + w[i] * half * Math.cos(half * (xi + 1)), 0)).toBeCloseTo(
			1,
			12
		);
	});
});

describe('circular contact, on-axis stresses (Johnson 1985 eq. 3.45, from memory)', () => {
	it('σ_z = −p0 at the surface and decays as 1/(1 + ζ²)', () => {
		expect(circularAxisStress(1e-9, 0.3).sigmaZ).toBeCloseTo(-1, 9);
		expect(circularAxisStress(1, 0.3).sigmaZ).toBeCloseTo(-0.5, 12);
	});

	it('σ_r at the surface centre is −(1 + 2ν)/2 · p0 (Johnson 1985 eq. 3.45 at z = 0, from memory)', () => {
		expect(circularAxisStress(1e-9, 0.3).sigmaR).toBeCloseTo(-0.8, 6);
		expect(circularAxisStress(1e-9, 0.22).sigmaR).toBeCloseTo(-0.72, 6);
	});

	it('ν = 0.3: τ_max ≈ 0.31 p0 at ≈ 0.48 a (Johnson 1985 §3.4, from memory); 0.3100 p0 at 0.4809 a (computed)', () => {
		const s = circularMaxShear(0.3);
		expect(s.tau).toBeCloseTo(0.31, 2);
		expect(s.depth).toBeCloseTo(0.48, 2);
		expect(s.tau).toBeCloseTo(0.31, 4);
		expect(s.depth).toBeCloseTo(0.4809, 4);
	});

	it('depends on ν: lower ν gives a larger, shallower maximum', () => {
		const hard = circularMaxShear(0.14); // SiC
		const steel = circularMaxShear(0.3);
		expect(hard.tau).toBeGreaterThan(steel.tau);
		expect(hard.depth).toBeLessThan(steel.depth);
	});
});

describe('elliptical contact, on-axis stresses by Boussinesq quadrature', () => {
	it('reproduces the circular closed form when a = b (two independent methods)', () => {
		for (const nu of [0.14, 0.22, 0.3, 0.45]) {
			for (const z of [0.05, 0.3, 0.48, 1, 2.5]) {
				const c = circularAxisStress(z, nu);
				const e = ellipticalAxisStress(z, 1, 1, nu);
				// Within 1e-5 p0 even at 0.05 a, where the kernel is sharpest; 1e-7 from 0.3 a down.
				const digits = z < 0.3 ? 5 : 7;
				expect(e.sx).toBeCloseTo(c.sigmaR, digits);
				expect(e.sy).toBeCloseTo(c.sigmaR, digits);
				expect(e.sz).toBeCloseTo(c.sigmaZ, digits);
			}
		}
		const m = ellipticalMaxShear(1, 1, 0.3);
		expect(m.tau).toBeCloseTo(circularMaxShear(0.3).tau, 6);
		expect(m.depth).toBeCloseTo(0.4809, 3);
	});

	it('tends to the line-contact result, 0.30 p0 at 0.78 b (Johnson 1985 §4.3, from memory), as a/b grows', () => {
		const m = ellipticalMaxShear(200, 1, 0.3);
		expect(m.tau).toBeCloseTo(0.3, 2);
		expect(m.depth).toBeCloseTo(0.786, 2);
	});

	it('depends only on b/a once depth is measured in b (what the Hertz module caches on)', () => {
		const small = ellipticalMaxShear(3, 1, 0.27);
		const large = ellipticalMaxShear(30, 10, 0.27);
		expect(large.tau).toBeCloseTo(small.tau, 9);
		expect(large.depth / 10).toBeCloseTo(small.depth, 6);
	});

	it('agrees with a plain polar quadrature of the same integral for a/b = 3, computed', () => {
		// Independent quadrature: x = a s cos φ, y = b s sin φ, s = sin t, many nodes, one panel.
		const a = 3;
		const b = 1;
		const nu = 0.3;
		const z = 0.6;
		const { x: gx, w: gw } = gaussLegendre(200);
		let sz = 0;
		let sx = 0;
		for (let i = 0; i < gx.length; i++) {
			const t = (Math.PI / 4) * (gx[i] + 1);
			for (let j = 0; j < gx.length; j++) {
				const phi = (Math.PI / 4) * (gx[j] + 1);
				const s = Math.sin(t);
				const x = a * s * Math.cos(phi);
				const y = b * s * Math.sin(phi);
				const w = gw[i] * gw[j] * (Math.PI / 4) ** 2 * a * b * s * Math.cos(t) ** 2;
				const r2 = x * x + y * y;
				const rho = Math.sqrt(r2 + z * z);
				const g = (1 - z / rho) / r2;
				const sr = (1 - 2 * nu) * g - (3 * z * r2) / rho ** 5;
				const st = -(1 - 2 * nu) * (g - z / rho ** 3);
				sx += w * ((sr * (x * x)) / r2 + (st * (y * y)) / r2);
				sz += (w * -3 * z ** 3) / rho ** 5;
			}
		}
		const f = 4 / (2 * Math.PI);
		const ours = ellipticalAxisStress(z, a, b, nu);
		expect(ours.sz).toBeCloseTo(sz * f, 5);
		expect(ours.sx).toBeCloseTo(sx * f, 5);
	});
});
