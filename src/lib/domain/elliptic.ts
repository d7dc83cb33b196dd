/**
 * Complete elliptic integrals K(k) and E(k) by the arithmetic–geometric mean (Abramowitz & Stegun
 * 17.6), returned with S = 1 − E/K computed without cancellation, which the Hertz elliptical solution
 * needs as K − E = K·S when the ellipse is nearly a circle.
 */

/** K(k), E(k) and S = Σ 2^(n−1) c_n² for modulus k (0 ≤ k < 1), with k' = √(1 − k²) given. */
export function ellipticKE(k: number, kPrime: number): { K: number; E: number; S: number } {
	let a = 1;
	let b = kPrime;
	let c = k;
	let sum = 0.5 * c * c;
	let pow = 0.5;
	for (let i = 0; i < 60 && Math.abs(c) > 1e-17 * a; i++) {
		const an = (a + b) / 2;
		c = (a - b) / 2;
		b = Math.sqrt(a * b);
		a = an;
		pow *= 2;
		sum += pow * c * c;
	}
	const K = Math.PI / (2 * a);
	return { K, E: K * (1 - sum), S: sum };
}
