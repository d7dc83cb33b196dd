import fc from 'fast-check';
import { Matrix, SingularValueDecomposition, EigenvalueDecomposition } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { svd, symmetricEigen } from './linalg';

// Reference library: ml-matrix 6.15 (general-purpose linear algebra on npm).
// Entries to six decimals: the values a constraint matrix holds, without subnormal noise.
const entry = fc.integer({ min: -10_000_000, max: 10_000_000 }).map((i) => i / 1e6);
const matrixArb = (rows: number, cols: number) =>
	fc.array(fc.array(entry, { minLength: cols, maxLength: cols }), {
		minLength: rows,
		maxLength: rows
	});

describe('svd (one-sided Jacobi)', () => {
	it('matches ml-matrix singular values on random 8×6 matrices', () => {
		fc.assert(
			fc.property(matrixArb(8, 6), (a) => {
				const ours = svd(a, 6).values;
				const ref = new SingularValueDecomposition(new Matrix(a)).diagonal.sort((x, y) => y - x);
				const scale = Math.max(ref[0], 1);
				ours.forEach((s, i) => expect(Math.abs(s - ref[i])).toBeLessThan(1e-10 * scale));
			})
		);
	});

	it('handles fewer rows than columns: A·v ≈ 0 for the zero singular values', () => {
		fc.assert(
			fc.property(matrixArb(3, 6), (a) => {
				const { values, v } = svd(a, 6);
				expect(values.slice(3).every((s) => s < 1e-9 * Math.max(values[0], 1))).toBe(true);
				for (let j = 3; j < 6; j++) {
					for (const row of a) {
						const dot = row.reduce((acc, x, k) => acc + x * v[k][j], 0);
						expect(Math.abs(dot)).toBeLessThan(1e-9 * Math.max(values[0], 1));
					}
				}
			})
		);
	});

	it('returns an orthogonal V', () => {
		const { v } = svd(
			[
				[1, 2, 3],
				[4, 5, 6],
				[7, 8, 10]
			],
			3
		);
		const vt = new Matrix(v).transpose().mmul(new Matrix(v));
		for (let i = 0; i < 3; i++)
			for (let j = 0; j < 3; j++) expect(vt.get(i, j)).toBeCloseTo(i === j ? 1 : 0, 12);
	});
});

describe('symmetricEigen (cyclic Jacobi)', () => {
	it('matches ml-matrix eigenvalues on random symmetric 4×4 matrices', () => {
		fc.assert(
			fc.property(matrixArb(4, 4), (a) => {
				const s = a.map((row, i) => row.map((_, j) => (a[i][j] + a[j][i]) / 2));
				const ours = symmetricEigen(s).values;
				const ref = new EigenvalueDecomposition(new Matrix(s), {
					assumeSymmetric: true
				}).realEigenvalues.sort((x, y) => y - x);
				ours.forEach((x, i) =>
					expect(Math.abs(x - ref[i])).toBeLessThan(1e-9 * Math.max(Math.abs(ref[0]), 1))
				);
			})
		);
	});
});
