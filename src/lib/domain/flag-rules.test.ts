import { describe, expect, it } from 'vitest';
import { evaluateFlags } from './flag-rules';
import { recompute } from './fold';
import { DRIFT_MEMORY, SPC_BASELINE_POINTS, emptyState } from './fold-state';
import { fixtureForecast, recentRepeatability } from './fold-sums';
import { forecastCrossing } from './forecast';
import { brokenIn, flag, history, kinds, policy, xs } from './health-test-history';
import type { Policy } from './policy';
import { repeatability } from './repeatability';

describe('cleaning and inspection due', () => {
	it('cleaning is due when cycles since the last one reach the interval, and a cleaning clears it', () => {
		const h = brokenIn();
		h.reseat(89);
		let s = recompute(h.events, policy);
		expect(s.cyclesSinceCleaning).toBe(99);
		expect(flag(evaluateFlags(s, policy, new Date(h.now())), 'cleaning-due')).toBeUndefined();
		h.reseat(1);
		s = recompute(h.events, policy);
		const f = flag(evaluateFlags(s, policy, new Date(h.now())), 'cleaning-due')!;
		expect(f.reason).toBe(
			'Cleaning due: 100 cycles since the first logged event, with no cleaning logged (interval 100 cycles).'
		);
		expect(f.figures).toMatchObject({ cyclesSince: 100, intervalCycles: 100, lastAt: null });
		h.cleaning();
		s = recompute(h.events, policy);
		expect(s.cyclesSinceCleaning).toBe(0);
		expect(flag(evaluateFlags(s, policy, new Date(h.now())), 'cleaning-due')).toBeUndefined();
	});

	it('calendar days count from the last one, or from commissioning', () => {
		const h = brokenIn();
		h.cleaning();
		const s = recompute(h.events, policy, { since: '2024-12-01T00:00:00.000Z' });
		const cleanedAt = Date.parse(h.events.at(-1)!.occurredAt);
		expect(
			flag(evaluateFlags(s, policy, new Date(cleanedAt + 29.9 * 86_400_000)), 'cleaning-due')
		).toBeUndefined();
		const due = flag(
			evaluateFlags(s, policy, new Date(cleanedAt + 30 * 86_400_000)),
			'cleaning-due'
		)!;
		expect(due.reason).toBe(
			'Cleaning due: 30 days since the last cleaning on 2025-01-06 (interval 30 days).'
		);
		expect(due.figures.daysSince).toBe(30);
		// Never inspected: 90 days from commissioning on 2024-12-01 fall on 2025-03-01.
		const insp = flag(
			evaluateFlags(s, policy, new Date('2025-03-01T00:00:00Z')),
			'inspection-due'
		)!;
		expect(insp.reason).toBe(
			'Inspection due: 90 days since commissioning on 2024-12-01, with no inspection logged (interval 90 days).'
		);
	});

	it('an inspection resets its counters; null intervals switch a rule off', () => {
		const h = brokenIn();
		h.reseat(400);
		let s = recompute(h.events, policy);
		expect(kinds(evaluateFlags(s, policy, new Date(h.now())))).toContain('inspection-due');
		const off = { ...policy, inspectionIntervalCycles: null, cleaningIntervalCycles: null };
		expect(kinds(evaluateFlags(s, off, new Date(h.now())))).toEqual([]);
		h.inspection([0, 1, 1]);
		s = recompute(h.events, policy);
		expect(s.cyclesSinceInspection).toBe(0);
		expect(kinds(evaluateFlags(s, policy, new Date(h.now())))).not.toContain('inspection-due');
	});
});

describe('repeatability out of spec', () => {
	it('flags R over the last window of seatings when it exceeds the spec, matching repeatability()', () => {
		const h = brokenIn();
		const wide = [0.2, -0.5, 0.6, -0.4, 0.3];
		for (const dx of wide) h.reseat(1, { dx, dy: dx / 4 });
		const s = recompute(h.events, policy);
		const R = repeatability(wide.map((dx) => ({ dx, dy: dx / 4 }))).axes.x!.R;
		expect(R).toBeGreaterThan(1);
		const f = flag(evaluateFlags(s, policy, new Date(h.now())), 'out-of-spec')!;
		expect(f.figures).toMatchObject({
			R_um: expect.closeTo(R, 12),
			axis: 'x',
			seatings: 5,
			spec_um: 1
		});
		expect(f.reason).toBe(
			`R = ${Number(R.toPrecision(3))} µm (x axis) over the last 5 seatings; spec 1 µm.`
		);
		expect(recentRepeatability(s)!.perAxis.y).toBeCloseTo(R / 4, 12);
	});

	it('needs a full window and is not judged during a break-in', () => {
		const h = brokenIn();
		h.reseat(1, { dx: 5 });
		h.reseat(1, { dx: -5 });
		expect(kinds(evaluateFlags(recompute(h.events, policy), policy, new Date(h.now())))).toEqual(
			[]
		);
		const b = history();
		b.breakIn(10, xs([5, -5, 5, -5, 5, -5, 5, -5, 5, -5]));
		expect(kinds(evaluateFlags(recompute(b.events, policy), policy, new Date(b.now())))).toEqual([
			'break-in-due'
		]);
	});
});

describe('drift (SPC run rules on readings after break-in)', () => {
	it('fires when readings shift away from the baseline and clears once they return', () => {
		const h = brokenIn();
		const base = Array.from({ length: SPC_BASELINE_POINTS }, (_, i) => (i % 4) * 0.05); // 0 .. 0.15
		for (const dx of base) h.reseat(1, { dx });
		let s = recompute(h.events, policy);
		expect(s.spc[0].n).toBe(SPC_BASELINE_POINTS);
		expect(kinds(evaluateFlags(s, policy, new Date(h.now())))).toEqual([]);
		// Two of three beyond 2σ above: WE2.
		h.reseat(1, { dx: 0.5 });
		h.reseat(1, { dx: 0.07 });
		h.reseat(1, { dx: 0.5 });
		s = recompute(h.events, policy);
		const f = flag(evaluateFlags(s, policy, new Date(h.now())), 'drift')!;
		expect(f.figures).toMatchObject({ axis: 'x', reading: SPC_BASELINE_POINTS + 3, value_um: 0.5 });
		expect(['WE1', 'WE2']).toContain(f.figures.rule);
		expect(f.reason).toMatch(
			/^Drift on the x axis: .* \(rule WE[12]\), ending at reading 23 since break-in, 0.5 µm/
		);
		// Back to the baseline pattern: after DRIFT_MEMORY more readings the hit has aged out.
		for (let i = 0; i < DRIFT_MEMORY + 2; i++) h.reseat(1, { dx: (i % 4) * 0.05 });
		s = recompute(h.events, policy);
		expect(flag(evaluateFlags(s, policy, new Date(h.now())), 'drift')).toBeUndefined();
	});

	it('needs its baseline before judging', () => {
		const h = brokenIn();
		for (let i = 0; i < SPC_BASELINE_POINTS - 1; i++) h.reseat(1, { dx: i % 2 ? 0.1 : 0 });
		h.reseat(1, { dx: 0.9 });
		expect(
			flag(evaluateFlags(recompute(h.events, policy), policy, new Date(h.now())), 'drift')
		).toBeUndefined();
	});
});

describe('replace soon / replace now', () => {
	it('replace now when the last inspection reaches the wear limit, or its verdict says so', () => {
		const h = brokenIn();
		h.inspection([1, 2, 1]);
		expect(kinds(evaluateFlags(recompute(h.events, policy), policy, new Date(h.now())))).toEqual(
			[]
		);
		h.inspection([1, 3, 0]);
		let s = recompute(h.events, policy);
		expect(s.wear).toEqual({ grade: 3, verdict: 'serviceable', marks: ['fretting'] });
		const f = flag(evaluateFlags(s, policy, new Date(h.now())), 'replace-now')!;
		expect(f.reason).toBe('Replace now: last inspection found wear grade 3 (limit 3).');
		expect(f.figures).toMatchObject({ wearGrade: 3, wearLimitGrade: 3 });
		h.inspection([0], 'replace');
		s = recompute(h.events, policy);
		expect(flag(evaluateFlags(s, policy, new Date(h.now())), 'replace-now')!.reason).toBe(
			'Replace now: the last inspection’s verdict was replace.'
		);
	});

	it('the last inspection’s worst contact counts, against the policy’s own wear limit', () => {
		const strict: Policy = { ...policy, wearLimitGrade: 2 };
		const h = brokenIn();
		h.inspection([0, 2, 1]);
		let s = recompute(h.events, strict);
		expect(s.wear.grade).toBe(2);
		expect(flag(evaluateFlags(s, strict, new Date(h.now())), 'replace-now')!.reason).toBe(
			'Replace now: last inspection found wear grade 2 (limit 2).'
		);
		// The same grade is within the default limit of 3.
		expect(kinds(evaluateFlags(recompute(h.events, policy), policy, new Date(h.now())))).toEqual(
			[]
		);
		// A later inspection that finds less (after a clean-up, say) is the one that counts.
		h.inspection([1, 1, 1]);
		s = recompute(h.events, strict);
		expect(s.wear.grade).toBe(1);
		expect(flag(evaluateFlags(s, strict, new Date(h.now())), 'replace-now')).toBeUndefined();
	});

	it('a swap of balls clears the wear record; only balls and seats together renew the life', () => {
		const h = brokenIn();
		h.reseat(50);
		h.inspection([3]);
		h.partSwap(['balls']);
		let s = recompute(h.events, policy);
		expect(s.wear.grade).toBeNull();
		expect(s.cyclesSinceRenewal).toBe(60);
		h.partSwap(['balls', 'seats']);
		s = recompute(h.events, policy);
		expect(s.cyclesSinceRenewal).toBe(0);
		expect(s.cyclesSincePartSwap).toBe(0);
		expect(s.totalCycles).toBe(60);
	});

	it('rated life: soon within the horizon, now when reached', () => {
		const p = {
			...policy,
			ratedLifeCycles: 1000,
			cleaningIntervalCycles: null,
			inspectionIntervalCycles: null
		};
		const h = brokenIn();
		h.reseat(780);
		expect(kinds(evaluateFlags(recompute(h.events, p), p, new Date(h.now())))).toEqual([]);
		h.reseat(10);
		const soon = flag(evaluateFlags(recompute(h.events, p), p, new Date(h.now())), 'replace-soon')!;
		expect(soon.reason).toBe('Replace soon: 200 cycles left of the rated life of 1,000.');
		h.reseat(200);
		const flags = evaluateFlags(recompute(h.events, p), p, new Date(h.now()));
		expect(kinds(flags)).toEqual(['replace-now']);
		expect(flags[0].reason).toBe('Replace now: 1,000 cycles reached the rated life of 1,000.');
	});

	it('replace soon when the Theil–Sen trend of windowed R crosses the spec within the horizon', () => {
		const p = {
			...policy,
			cleaningIntervalCycles: null,
			inspectionIntervalCycles: null,
			forecastHorizonCycles: 60
		};
		const h = brokenIn();
		// Windows of 5 readings [0, a, a/2, 0, a]: s = a/2, R = 2a = 0.4 + 0.04 w µm, one per 5 cycles.
		const rs: number[] = [];
		for (let w = 0; w < 6; w++) {
			const a = 0.2 + 0.02 * w;
			const vals = [0, a, a / 2, 0, a];
			rs.push(repeatability(xs(vals)).axes.x!.R);
			for (const dx of vals) h.reseat(1, { dx });
		}
		expect(rs[5]).toBeCloseTo(0.6, 12);
		const s = recompute(h.events, p);
		expect(s.trend.windows.map((w) => w.cycle)).toEqual([15, 20, 25, 30, 35, 40]);
		const expected = forecastCrossing(
			s.trend.windows.map((w, i) => ({ x: w.cycle, y: rs[i] })),
			1,
			{ method: 'theil-sen', intercept: 'separate' }
		);
		const f = fixtureForecast(s, p)!;
		expect(f.crossingX).toBeCloseTo(expected.crossingX!, 9);
		expect(f.cyclesToSpec).toBeCloseTo(expected.crossingX! - 40, 9);
		// Slope 0.04 µm per 5 cycles from 0.4 µm at cycle 15: the 1 µm spec is reached at cycle 90,
		// 50 cycles after the latest window — inside the 60-cycle horizon.
		expect(expected.crossingX).toBeCloseTo(90, 9);
		const flags = evaluateFlags(s, p, new Date(h.now()));
		expect(kinds(flags)).toEqual(['replace-soon']);
		expect(flags[0].figures).toMatchObject({
			forecastCrossingCycle: expect.closeTo(90, 9),
			forecastCyclesToSpec: expect.closeTo(50, 9)
		});
		expect(flags[0].reason).toBe(
			'Replace soon: the trend of R (Theil–Sen over the last 6 windows) reaches the 1 µm spec at about cycle 90, 50 cycles from now (horizon 60).'
		);
		// With a horizon of one cycle the same trend is not yet a flag.
		expect(
			flag(evaluateFlags(s, { ...p, forecastHorizonCycles: 1 }, new Date(h.now())), 'replace-soon')
		).toBeUndefined();
	});
});

describe('errors', () => {
	it('a bad time to judge at throws clearly', () => {
		const s = emptyState();
		expect(() => evaluateFlags(s, policy, new Date('nope'))).toThrow(/now: must be a valid Date/);
	});
});
