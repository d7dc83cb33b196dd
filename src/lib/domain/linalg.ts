/**
 * Small dense linear algebra for the constraint analysis (matrices of at most a few dozen rows and
 * six columns). Jacobi methods are used because they are short, need no pivoting logic and give
 * small singular values to high relative accuracy; the tests cross-check them against ml-matrix.
 */

/** A dense matrix as an array of rows. */
export type Matrix = number[][];

/** Singular values (descending) and right singular vectors (columns of v, same order). */
export interface Svd {
	values: number[];
	/** n × n orthogonal matrix; column j belongs to values[j]. */
	v: Matrix;
}

const MAX_SWEEPS = 80;

/** One-sided (Hestenes) Jacobi SVD of an m × n matrix; m may be smaller than n. */
export function svd(a: Matrix, n: number): Svd {
	const m = a.length;
	// Work on columns: u[j] is column j of A.
	const u: number[][] = [];
	for (let j = 0; j < n; j++) {
		const col = new Array<number>(m);
		for (let i = 0; i < m; i++) col[i] = a[i][j];
		u.push(col);
	}
	const v: number[][] = [];
	for (let j = 0; j < n; j++) {
		const col = new Array<number>(n).fill(0);
		col[j] = 1;
		v.push(col);
	}
	for (let sweep = 0; sweep < MAX_SWEEPS; sweep++) {
		let rotated = false;
		for (let p = 0; p < n - 1; p++) {
			for (let q = p + 1; q < n; q++) {
				const up = u[p];
				const uq = u[q];
				let alpha = 0;
				let beta = 0;
				let gamma = 0;
				for (let i = 0; i < m; i++) {
					alpha += up[i] * up[i];
					beta += uq[i] * uq[i];
					gamma += up[i] * uq[i];
				}
				if (gamma === 0 || Math.abs(gamma) <= 1e-15 * Math.sqrt(alpha * beta)) continue;
				rotated = true;
				const zeta = (beta - alpha) / (2 * gamma);
				const t = (zeta >= 0 ? 1 : -1) / (Math.abs(zeta) + Math.sqrt(1 + zeta * zeta));
				const c = 1 / Math.sqrt(1 + t * t);
				const s = c * t;
				for (let i = 0; i < m; i++) {
					const x = up[i];
					const y = uq[i];
					up[i] = c * x - s * y;
					uq[i] = s * x + c * y;
				}
				const vp = v[p];
				const vq = v[q];
				for (let i = 0; i < n; i++) {
					const x = vp[i];
					const y = vq[i];
					vp[i] = c * x - s * y;
					vq[i] = s * x + c * y;
				}
			}
		}
		if (!rotated) break;
	}
	const order = u
		.map((col, j) => ({ j, s: Math.sqrt(col.reduce((acc, x) => acc + x * x, 0)) }))
		.sort((x, y) => y.s - x.s);
	const values = order.map((o) => o.s);
	const vOut: Matrix = [];
	for (let i = 0; i < n; i++) vOut.push(order.map((o) => v[o.j][i]));
	return { values, v: vOut };
}

/** Eigen-decomposition of a small symmetric matrix (cyclic Jacobi); values descending. */
export function symmetricEigen(s: Matrix): { values: number[]; vectors: Matrix } {
	const k = s.length;
	const a = s.map((row) => row.slice());
	const vec: Matrix = [];
	for (let i = 0; i < k; i++) {
		const row = new Array<number>(k).fill(0);
		row[i] = 1;
		vec.push(row);
	}
	for (let sweep = 0; sweep < MAX_SWEEPS; sweep++) {
		let off = 0;
		let diag = 0;
		for (let i = 0; i < k; i++) {
			diag += a[i][i] * a[i][i];
			for (let j = i + 1; j < k; j++) off += a[i][j] * a[i][j];
		}
		if (off <= 1e-30 * Math.max(diag, 1e-300)) break;
		for (let p = 0; p < k - 1; p++) {
			for (let q = p + 1; q < k; q++) {
				if (a[p][q] === 0) continue;
				const theta = (a[q][q] - a[p][p]) / (2 * a[p][q]);
				const t = (theta >= 0 ? 1 : -1) / (Math.abs(theta) + Math.sqrt(1 + theta * theta));
				const c = 1 / Math.sqrt(1 + t * t);
				const sn = t * c;
				for (let r = 0; r < k; r++) {
					const arp = a[r][p];
					const arq = a[r][q];
					a[r][p] = c * arp - sn * arq;
					a[r][q] = sn * arp + c * arq;
				}
				for (let r = 0; r < k; r++) {
					const apr = a[p][r];
					const aqr = a[q][r];
					a[p][r] = c * apr - sn * aqr;
					a[q][r] = sn * apr + c * aqr;
				}
				for (let r = 0; r < k; r++) {
					const vrp = vec[r][p];
					const vrq = vec[r][q];
					vec[r][p] = c * vrp - sn * vrq;
					vec[r][q] = sn * vrp + c * vrq;
				}
			}
		}
	}
	const order = a.map((row, i) => ({ i, value: row[i] })).sort((x, y) => y.value - x.value);
	return {
		values: order.map((o) => o.value),
		vectors: vec.map((row) => order.map((o) => row[o.i]))
	};
}
