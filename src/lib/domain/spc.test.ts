import { describe, expect, it } from 'vitest';
import { type RunRule, individualsChart, runRuleHits } from './spc';

// Worked limits computed from the NIST/SEMATECH e-Handbook §6.3.2 formulas, which also give
// d₂ = 1.128 and D₄ = 3.267.
const readings = [
	0.52, 0.47, 0.5, 0.55, 0.49, 0.46, 0.51, 0.48, 0.53, 0.5, 0.54, 0.56, 0.55, 0.58, 0.57, 0.6, 0.62,
	0.64, 0.66, 0.8
];

const byRule = (hits: { rule: RunRule; index: number }[]) => {
	const out: Partial<Record<RunRule, number[]>> = {};
	for (const h of hits) (out[h.rule] ??= []).push(h.index);
	return out;
};

describe('individualsChart — limits', () => {
	it('worked case: x̄ 0.5565, MR̄ 0.0378947, UCL 0.657284, LCL 0.455716, MR UCL 0.123802 (computed from NIST/SEMATECH §6.3.2)', () => {
		const c = individualsChart(readings);
		expect(c.center).toBeCloseTo(0.5565, 10);
		expect(c.mrBar).toBeCloseTo(0.0378947, 7);
		expect(c.sigma).toBeCloseTo(0.0378947 / 1.128, 7);
		expect(c.ucl).toBeCloseTo(0.657284, 6);
		expect(c.lcl).toBeCloseTo(0.455716, 6);
		expect(c.mrUcl).toBeCloseTo(0.123802, 6);
		expect(c.movingRanges[0]).toBeNull();
		expect(c.movingRanges[19]).toBeCloseTo(0.14, 12);
	});

	it("multiplier '2.66': x̄ ± 2.66 MR̄ (NIST/SEMATECH §6.3.2)", () => {
		const c = individualsChart(readings, { multiplier: '2.66' });
		expect(c.ucl).toBeCloseTo(0.5565 + 2.66 * 0.0378947368, 9);
		expect(c.lcl).toBeCloseTo(0.5565 - 2.66 * 0.0378947368, 9);
		// Zones still use σ̂ = MR̄/1.128.
		expect(c.sigma).toBeCloseTo(0.0378947368 / 1.128, 9);
	});

	it('phase I: limits from the first 10 points, applied to all 20', () => {
		const base = readings.slice(0, 10);
		const c = individualsChart(readings, { baseline: 10 });
		const mean = base.reduce((s, x) => s + x, 0) / 10;
		const mr = base.slice(1).reduce((s, x, i) => s + Math.abs(x - base[i]), 0) / 9;
		expect(c.center).toBeCloseTo(mean, 12);
		expect(c.mrBar).toBeCloseTo(mr, 12);
		// Every later point from 0.58 up is above the phase-I UCL (0.5829 + 0.1117 → 0.6117 ...).
		const beyond = readings.map((x, i) => (x > c.ucl ? i + 1 : 0)).filter(Boolean);
		expect(byRule(c.hits).WE1).toEqual(beyond);
	});
});

describe('individualsChart — run rules on the worked readings (hand-derived from the conventions)', () => {
	// σ̂ = 0.033595: 1σ band 0.5229–0.5901, 2σ 0.4893–0.6237, limits 0.4557–0.6573.
	const hits = byRule(individualsChart(readings).hits);

	it('Western Electric rules', () => {
		expect(hits.WE1).toEqual([19, 20]);
		expect(hits.WE2).toEqual([8, 19, 20]);
		expect(hits.WE3).toEqual([5, 6, 7, 8, 9, 10, 19, 20]);
		expect(hits.WE4).toEqual([8, 9, 10, 11]);
	});

	it('Nelson rules', () => {
		expect(hits.N1).toEqual([19, 20]);
		expect(hits.N2).toEqual([9, 10, 11]);
		expect(hits.N3).toEqual([20]);
		expect(hits.N4).toBeUndefined();
		expect(hits.N5).toEqual(hits.WE2);
		expect(hits.N6).toEqual(hits.WE3);
		expect(hits.N7).toBeUndefined();
		expect(hits.N8).toBeUndefined();
	});
});

describe('run rules — conventions (Western Electric 1956; Nelson 1984; windowing is common practice)', () => {
	const limits = { center: 0, sigma: 1, ucl: 3, lcl: -3 };
	const hitsOf = (values: number[], rule: RunRule) =>
		runRuleHits(values, limits, [rule]).map((h) => h.index);

	it('beyond is strict: a point on a limit or zone edge does not count', () => {
		expect(hitsOf([3, -3, 3.0001], 'WE1')).toEqual([3]);
		expect(hitsOf([2, 2, 0], 'WE2')).toEqual([]);
		expect(hitsOf([2.1, 0, 2.1], 'WE2')).toEqual([3]);
	});

	it('k-of-m points must be on the same side', () => {
		expect(hitsOf([2.5, -2.5, 0], 'WE2')).toEqual([]);
		expect(hitsOf([1.5, 1.5, -1.5, 1.5, 0], 'WE3')).toEqual([]);
		expect(hitsOf([1.5, 1.5, 0, 1.5, 1.5], 'WE3')).toEqual([5]);
	});

	it('every qualifying window gives a hit at its last point, which need not be beyond', () => {
		// Windows ending at 3 and 4 both hold two points beyond 2σ; point 4 itself is at 0.
		expect(hitsOf([0, 2.5, 2.5, 0], 'WE2')).toEqual([3, 4]);
	});

	it('a point on the centre line breaks a run', () => {
		expect(hitsOf([1, 1, 1, 1, 1, 1, 1, 1], 'WE4')).toEqual([8]);
		expect(hitsOf([1, 1, 1, 0, 1, 1, 1, 1, 1], 'WE4')).toEqual([]);
		expect(hitsOf(Array(9).fill(-0.1), 'N2')).toEqual([9]);
	});

	it('a trend is 6 points with 5 strictly monotone steps; a tie breaks it', () => {
		expect(hitsOf([1, 2, 3, 4, 5, 6, 7], 'N3')).toEqual([6, 7]);
		expect(hitsOf([6, 5, 4, 3, 2, 1], 'N3')).toEqual([6]);
		expect(hitsOf([1, 2, 3, 3, 4, 5], 'N3')).toEqual([]);
	});

	it('N4: 14 points alternating up and down', () => {
		const alt = Array.from({ length: 14 }, (_, i) => (i % 2 ? 0.5 : -0.5));
		expect(hitsOf(alt, 'N4')).toEqual([14]);
		expect(hitsOf(alt.slice(0, 13), 'N4')).toEqual([]);
		const tie = [...alt];
		tie[7] = tie[6];
		expect(hitsOf(tie, 'N4')).toEqual([]);
	});

	it('N7: 15 points within 1σ (edges included), either side', () => {
		const hugging = Array.from({ length: 15 }, (_, i) => (i % 2 ? 1 : -0.5));
		expect(hitsOf(hugging, 'N7')).toEqual([15]);
		expect(hitsOf([...hugging.slice(0, 14), 1.01], 'N7')).toEqual([]);
	});

	it('N8: 8 points beyond 1σ with both sides represented', () => {
		const both = [1.5, -1.5, 2, -2, 1.2, -1.2, 1.1, -1.1];
		expect(hitsOf(both, 'N8')).toEqual([8]);
		expect(hitsOf(Array(8).fill(1.5), 'N8')).toEqual([]);
		expect(hitsOf([...both.slice(0, 7), 0.5], 'N8')).toEqual([]);
	});
});

describe('individualsChart — errors', () => {
	it('throws clearly, never NaN', () => {
		expect(() => individualsChart([1])).toThrow(/at least 2 points/);
		expect(() => individualsChart([1, NaN, 2])).toThrow(/values\[1\]: must be a finite number/);
		expect(() => individualsChart([1, 2, 3], { baseline: 1 })).toThrow(/options.baseline/);
		expect(() => individualsChart([1, 2, 3], { baseline: 4 })).toThrow(/options.baseline/);
		expect(() => individualsChart([1, 2], { multiplier: '3' as 'd2' })).toThrow(/multiplier/);
	});

	it('flat data gives σ = 0 and no NaN; any change is then beyond the limits', () => {
		const c = individualsChart([1, 1, 1, 1.1], { baseline: 3 });
		expect(c.sigma).toBe(0);
		expect(c.hits.filter((h) => h.rule === 'WE1').map((h) => h.index)).toEqual([4]);
		expect(JSON.stringify(c)).not.toMatch(/NaN|null,null/);
	});
});
