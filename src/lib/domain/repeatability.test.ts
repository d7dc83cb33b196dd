import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { meanAndS, repeatability, type Reading } from './repeatability';

describe('repeatability — ISO 230-2:2014 style, R = 4s with s over n − 1', () => {
	it('worked case: 2.0, 2.4, 1.8, 2.2, 2.1 µm → mean 2.1, s 0.223607, R 0.894427 (ISO 230-2:2014 R = 4s with s over n − 1, computed)', () => {
		const r = repeatability([2.0, 2.4, 1.8, 2.2, 2.1].map((dx) => ({ dx })));
		expect(r.n).toBe(5);
		expect(r.axes.x!.mean).toBeCloseTo(2.1, 12);
		expect(r.axes.x!.s).toBeCloseTo(0.223607, 6);
		expect(r.axes.x!.R).toBeCloseTo(0.894427, 6);
		// The population s (÷ n) would be 0.2000 — the common wrong answer.
		expect(r.axes.x!.s).not.toBeCloseTo(0.2, 3);
		expect(r.axes.y).toBeUndefined();
		expect(r.radial).toBeUndefined();
		expect(r.worst).toEqual({ axis: 'x', R: r.axes.x!.R });
	});

	it('NIST StRD NumAcc1: 10000001, 10000003, 10000002 → mean 10000002, s 1 (certified values, from memory)', () => {
		const { mean, s } = meanAndS([10000001, 10000003, 10000002]);
		expect(mean).toBe(10000002);
		expect(s).toBe(1);
	});

	it('NIST StRD NumAcc3: 1000000.2 then 500 pairs of 1000000.1, 1000000.3 → mean 1000000.2, s 0.1 (certified, from memory)', () => {
		const values = [1000000.2];
		for (let i = 0; i < 500; i++) values.push(1000000.1, 1000000.3);
		const { mean, s } = meanAndS(values);
		expect(mean).toBeCloseTo(1000000.2, 8);
		expect(s).toBeCloseTo(0.1, 9);
	});

	it('radial figure: s_r = √(s_x² + s_y²) (DRMS), R_r = 2 s_r (2DRMS) [S: GNSS practice]', () => {
		const readings: Reading[] = [
			{ dx: 0.1, dy: -0.2, dz: 1 },
			{ dx: 0.3, dy: 0.1, dz: 1.2 },
			{ dx: -0.2, dy: 0.0, dz: 0.9 },
			{ dx: 0.0, dy: 0.2, dz: 1.1 }
		];
		const r = repeatability(readings);
		const sx = r.axes.x!.s;
		const sy = r.axes.y!.s;
		expect(r.radial!.s).toBeCloseTo(Math.hypot(sx, sy), 14);
		expect(r.radial!.R).toBeCloseTo(2 * Math.hypot(sx, sy), 14);
		expect(r.axes.z!.R).toBeCloseTo(4 * meanAndS([1, 1.2, 0.9, 1.1]).s, 14);
	});

	it('axes may be measured on some seatings only', () => {
		const r = repeatability([{ dx: 1 }, { dx: 2, dy: 5 }, { dy: 6 }, { dx: 3 }]);
		expect(r.axes.x!.n).toBe(3);
		expect(r.axes.y!.n).toBe(2);
		expect(r.n).toBe(4);
	});

	it('is unchanged by a constant offset and scales with the readings (fast-check)', () => {
		const value = fc.integer({ min: -50_000, max: 50_000 }).map((i) => i / 1000);
		fc.assert(
			fc.property(
				fc.array(fc.tuple(value, value), { minLength: 2, maxLength: 40 }),
				fc.integer({ min: -1_000_000, max: 1_000_000 }).map((i) => i / 100),
				(pairs, offset) => {
					const base = repeatability(pairs.map(([dx, dy]) => ({ dx, dy })));
					const moved = repeatability(
						pairs.map(([dx, dy]) => ({ dx: dx + offset, dy: dy - offset }))
					);
					const tol = 1e-9 * (1 + Math.abs(offset));
					expect(Math.abs(moved.axes.x!.R - base.axes.x!.R)).toBeLessThan(tol);
					expect(Math.abs(moved.axes.y!.R - base.axes.y!.R)).toBeLessThan(tol);
					expect(Math.abs(moved.radial!.R - base.radial!.R)).toBeLessThan(tol);
					const doubled = repeatability(pairs.map(([dx, dy]) => ({ dx: 2 * dx, dy: 2 * dy })));
					expect(doubled.axes.x!.R).toBeCloseTo(2 * base.axes.x!.R, 9);
				}
			)
		);
	});

	it('throws clearly on too few readings or bad values, never NaN', () => {
		expect(() => repeatability([{ dx: 1 }])).toThrow('readings: needs at least 2 seatings (got 1)');
		expect(() => repeatability([{ dx: 1 }, { dy: 2 }])).toThrow(
			/readings \(dx\): needs at least 2 values/
		);
		expect(() => repeatability([{ dx: 1 }, { dx: NaN }])).toThrow(
			/readings\[1\]\.dx: must be a finite number/
		);
		expect(() => repeatability([{}, {}])).toThrow(/contain no dx, dy or dz/);
		expect(() => repeatability('x' as unknown as Reading[])).toThrow(/must be an array/);
		expect(() => meanAndS([3])).toThrow(/at least 2 values/);
	});
});
