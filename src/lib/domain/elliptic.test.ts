import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { ellipticKE } from './elliptic';

const ke = (k: number) => ellipticKE(k, Math.sqrt(1 - k * k));

describe('complete elliptic integrals by the AGM', () => {
	it('K(0) = E(0) = π/2', () => {
		expect(ke(0)).toMatchObject({ K: Math.PI / 2, E: Math.PI / 2, S: 0 });
	});

	it('K(1/√2) = Γ(1/4)²/(4√π) (Abramowitz & Stegun ch. 17, from memory), Γ(1/4) = 3.625609908221908, from memory', () => {
		const k = Math.SQRT1_2;
		expect(ke(k).K).toBeCloseTo(3.625609908221908 ** 2 / (4 * Math.sqrt(Math.PI)), 13);
	});

	it('tabulated values: K, E at k = 0.5 and k = 0.9 (A&S Table 17.1, from memory)', () => {
		expect(ke(0.5).K).toBeCloseTo(1.685750354812596, 13);
		expect(ke(0.5).E).toBeCloseTo(1.467462209339427, 13);
		expect(ke(0.9).K).toBeCloseTo(2.28054913842277, 13);
		expect(ke(0.9).E).toBeCloseTo(1.171697052781614, 13);
	});

	it("satisfies Legendre's relation E K' + E' K − K K' = π/2 (A&S 17.3.13, from memory)", () => {
		fc.assert(
			fc.property(fc.double({ min: 0.01, max: 0.999, noNaN: true }), (k) => {
				const kp = Math.sqrt(1 - k * k);
				const a = ellipticKE(k, kp);
				const b = ellipticKE(kp, k);
				expect(a.E * b.K + b.E * a.K - a.K * b.K).toBeCloseTo(Math.PI / 2, 11);
				expect(a.K - a.E).toBeCloseTo(a.K * a.S, 12);
			})
		);
	});
});
