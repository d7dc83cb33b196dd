import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { forecastCrossing, median } from './forecast';

// Anscombe, "Graphs in statistical analysis", The American Statistician 27(1) 1973, data set I:
// least-squares fit y = 3.00 + 0.500 x.
const anscombeX = [10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5];
const anscombeY = [8.04, 6.95, 7.58, 8.81, 8.33, 9.96, 7.24, 4.26, 10.84, 4.82, 5.68];
const anscombe = anscombeX.map((x, i) => ({ x, y: anscombeY[i] }));

describe('forecastCrossing — OLS', () => {
	it("Anscombe's data set I: slope 0.500, intercept 3.00", () => {
		const f = forecastCrossing(anscombe, 100, { method: 'ols' });
		expect(f.slope).toBeCloseTo(0.5001, 4);
		expect(f.intercept).toBeCloseTo(3.0001, 4);
		expect(f.status).toBe('crossing');
		expect(f.crossingX).toBeCloseTo((100 - f.intercept) / f.slope, 9);
		expect(f.latestX).toBe(14);
	});
});

describe('forecastCrossing — Theil–Sen (Theil 1950; Sen 1968)', () => {
	// Hand-worked: pairwise slopes 2, 0.5, 4/3, −1, 1, 3 → median (1 + 4/3)/2 = 7/6.
	const pts = [
		{ x: 1, y: 1 },
		{ x: 2, y: 3 },
		{ x: 3, y: 2 },
		{ x: 4, y: 5 }
	];

	it("'separate' intercept: median(y) − b·median(x) = 2.5 − 7/6 · 2.5", () => {
		const f = forecastCrossing(pts, 10, { method: 'theil-sen', intercept: 'separate' });
		expect(f.slope).toBeCloseTo(7 / 6, 12);
		expect(f.intercept).toBeCloseTo(2.5 - (7 / 6) * 2.5, 12);
	});

	it("'joint' intercept: median(y − b·x) = median(−1/6, 2/3, −3/2, 1/3) = 1/12", () => {
		const f = forecastCrossing(pts, 10, { method: 'theil-sen', intercept: 'joint' });
		expect(f.intercept).toBeCloseTo(1 / 12, 12);
	});

	it("defaults to the 'separate' convention", () => {
		expect(forecastCrossing(pts, 10, { method: 'theil-sen' }).intercept).toBeCloseTo(
			2.5 - (7 / 6) * 2.5,
			12
		);
	});

	it('shrugs off an outlier that drags OLS (the reason to offer it)', () => {
		const line = Array.from({ length: 10 }, (_, i) => ({ x: i * 100, y: 0.2 + 0.001 * i * 100 }));
		line[3] = { x: 300, y: 5 };
		const ts = forecastCrossing(line, 1.5, { method: 'theil-sen' });
		const ols = forecastCrossing(line, 1.5, { method: 'ols' });
		expect(ts.slope).toBeCloseTo(0.001, 12);
		expect(Math.abs(ols.slope - 0.001)).toBeGreaterThan(1e-4);
	});

	it('skips pairs with equal x', () => {
		const f = forecastCrossing(
			[
				{ x: 0, y: 0 },
				{ x: 0, y: 5 },
				{ x: 1, y: 1 }
			],
			10,
			{ method: 'theil-sen' }
		);
		// Slopes: (0,0)-(1,1) = 1 and (0,5)-(1,1) = −4; median −1.5.
		expect(f.slope).toBeCloseTo(-1.5, 12);
	});
});

describe('forecastCrossing — status', () => {
	const rising = [0, 100, 200, 300].map((x) => ({ x, y: 0.1 + 0.001 * x }));

	it("'crossing' at x* = (S − b₀)/b₁ when the slope is positive", () => {
		for (const method of ['ols', 'theil-sen'] as const) {
			const f = forecastCrossing(rising, 1, { method });
			expect(f.status).toBe('crossing');
			expect(f.crossingX).toBeCloseTo(900, 9);
		}
	});

	it("'exceeded' when the latest point is above spec, still giving the fitted crossing", () => {
		const f = forecastCrossing(rising, 0.35, { method: 'ols' });
		expect(f.status).toBe('exceeded');
		expect(f.crossingX).toBeCloseTo(250, 9);
	});

	it("'no-crossing' when the slope is zero or negative", () => {
		const falling = rising.map((p) => ({ x: p.x, y: 1 - p.y }));
		expect(forecastCrossing(falling, 2, { method: 'ols' })).toMatchObject({
			status: 'no-crossing',
			crossingX: null
		});
		const flat = rising.map((p) => ({ x: p.x, y: 0.5 }));
		expect(forecastCrossing(flat, 2, { method: 'theil-sen' })).toMatchObject({
			status: 'no-crossing',
			crossingX: null
		});
	});

	it('the latest point is the one with the largest x, whatever the order given', () => {
		const shuffled = [rising[3], rising[0], rising[2], rising[1]];
		expect(forecastCrossing(shuffled, 0.35, { method: 'ols' }).status).toBe('exceeded');
	});

	it('both methods recover an exact line (fast-check)', () => {
		const num = fc.integer({ min: -1000, max: 1000 }).map((i) => i / 100);
		fc.assert(
			fc.property(
				num,
				num,
				fc.uniqueArray(fc.integer({ min: 0, max: 10_000 }), { minLength: 2, maxLength: 30 }),
				(b0, b1, xs) => {
					const points = xs.map((x) => ({ x, y: b0 + b1 * x }));
					for (const method of ['ols', 'theil-sen'] as const) {
						const f = forecastCrossing(points, 1e9, { method });
						expect(f.slope).toBeCloseTo(b1, 8);
						expect(f.intercept).toBeCloseTo(b0, 5);
					}
				}
			)
		);
	});
});

describe('forecastCrossing — errors', () => {
	it('throws clearly, never NaN', () => {
		expect(() => forecastCrossing([{ x: 1, y: 1 }], 1, { method: 'ols' })).toThrow(
			/at least 2 points/
		);
		const sameX = [
			{ x: 1, y: 1 },
			{ x: 1, y: 2 }
		];
		expect(() => forecastCrossing(sameX, 1, { method: 'ols' })).toThrow(/two different x values/);
		expect(() => forecastCrossing(sameX, 1, { method: 'theil-sen' })).toThrow(
			/two different x values/
		);
		expect(() => forecastCrossing(anscombe, 1, { method: 'lasso' as 'ols' })).toThrow(
			/options.method/
		);
		expect(() =>
			forecastCrossing(anscombe, 1, { method: 'theil-sen', intercept: 'mean' as 'joint' })
		).toThrow(/options.intercept/);
		expect(() =>
			forecastCrossing(
				[
					{ x: 1, y: NaN },
					{ x: 2, y: 1 }
				],
				1,
				{ method: 'ols' }
			)
		).toThrow(/points\[0\].y/);
		expect(() => forecastCrossing(anscombe, NaN, { method: 'ols' })).toThrow(/spec/);
	});

	it('median of odd and even counts', () => {
		expect(median([3, 1, 2])).toBe(2);
		expect(median([4, 1, 3, 2])).toBe(2.5);
	});
});
