import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { FixtureEvent } from './events';
import { forecastCrossing } from './forecast';
import {
	type FixtureState,
	type Flag,
	DRIFT_MEMORY,
	SPC_BASELINE_POINTS,
	applyEvent,
	cloneState,
	compareEvents,
	emptyState,
	evaluateFlags,
	fixtureForecast,
	foldEvents,
	initialState,
	isOutOfOrder,
	recentRepeatability,
	recompute
} from './health';
import { DEFAULT_POLICY, type Policy } from './policy';
import { repeatability } from './repeatability';

// Small windows keep the scenarios short; the rules are the same at any size.
const policy: Policy = {
	...DEFAULT_POLICY,
	repeatabilitySpec_um: 1,
	repeatabilityWindow: 5,
	breakInMinCycles: 10,
	settleWindow: 5,
	settleTolerance_um: 0.1,
	cleaningIntervalCycles: 100,
	cleaningIntervalDays: 30,
	inspectionIntervalCycles: 400,
	inspectionIntervalDays: 90,
	ratedLifeCycles: null,
	wearLimitGrade: 3,
	forecastHorizonCycles: 200
};

const T0 = Date.parse('2025-01-06T08:00:00.000Z');
const HOUR = 3_600_000;

/** A history builder: events an hour apart with ids in order. */
function history() {
	const events: FixtureEvent[] = [];
	let n = 0;
	const at = () => new Date(T0 + n * HOUR).toISOString();
	const add = (e: Omit<FixtureEvent, 'id' | 'occurredAt'>) => {
		const full = { id: `ev-${String(n).padStart(6, '0')}`, occurredAt: at(), ...e } as FixtureEvent;
		n++;
		events.push(full);
		return full;
	};
	return {
		events,
		/** Time of the next event (ms). */
		now: () => T0 + n * HOUR,
		reseat: (cycles = 1, readings?: { dx?: number; dy?: number; dz?: number }) =>
			add({ kind: 'reseat', payload: readings ? { cycles, readings } : { cycles } }),
		breakIn: (cycles: number, readings: { dx?: number; dy?: number; dz?: number }[] = []) =>
			add({ kind: 'break-in', payload: { cycles, readings } }),
		cleaning: (relubricated = false) =>
			add({
				kind: 'cleaning',
				payload: relubricated
					? { method: 'solvent-wipe', relubricated, lubricant: 'instrument oil' }
					: { method: 'dry-wipe', relubricated }
			}),
		inspection: (grades: number[], verdict: 'serviceable' | 'watch' | 'replace' = 'serviceable') =>
			add({
				kind: 'inspection',
				payload: {
					contacts: grades.map((grade, i) => ({
						contact: `ball ${i + 1}`,
						grade,
						marks: grade >= 2 ? ['fretting'] : []
					})),
					verdict
				}
			}),
		partSwap: (replaced: ('balls' | 'seats' | 'preload' | 'whole-fixture')[]) =>
			add({ kind: 'part-swap', payload: { replaced } }),
		hold: (reason: string) => add({ kind: 'hold', payload: { reason } }),
		release: () => add({ kind: 'release', payload: {} }),
		move: () => add({ kind: 'move', payload: { locationId: 'bay-2' } }),
		note: (text: string) => add({ kind: 'note', payload: { text } })
	};
}

const settled = [0, 0.2, 0.1, 0, 0.2]; // s = 0.1, R = 0.4 µm
const xs = (values: number[]) => values.map((dx) => ({ dx }));
const kinds = (flags: Flag[]) => flags.map((f) => f.kind);
const flag = (flags: Flag[], kind: Flag['kind']) => flags.find((f) => f.kind === kind);

/** A history with a completed break-in (cycle 10, two settling windows of R 0.4 µm). */
function brokenIn() {
	const h = history();
	h.breakIn(10, xs([...settled, ...settled]));
	return h;
}

describe('a new fixture', () => {
	it('needs a break-in and says so with the numbers', () => {
		const s = emptyState();
		expect(s.status).toBe('breaking-in');
		const flags = evaluateFlags(s, policy, new Date(T0));
		expect(kinds(flags)).toEqual(['break-in-due']);
		expect(flags[0].reason).toBe(
			'New fixture: break-in required — 0 of at least 10 cycles run; no settling window yet (5 seatings with readings each).'
		);
		expect(flags[0].figures).toMatchObject({ reason: 'new', cycles: 0, minCycles: 10, windows: 0 });
	});

	it('can start in service when imported as already broken in', () => {
		const s = initialState({ since: '2024-06-01T00:00:00.000Z', breakInRequired: false });
		expect(s.status).toBe('in-service');
		expect(s.since).toBe('2024-06-01T00:00:00.000Z');
		expect(evaluateFlags(s, policy, new Date('2024-06-02T00:00:00Z'))).toEqual([]);
	});

	it('takes the first event time as its start when no commissioning date is known', () => {
		const h = history();
		h.note('Arrived from the maker');
		expect(recompute(h.events, policy).since).toBe(h.events[0].occurredAt);
	});
});

describe('break-in', () => {
	it('completes once minimum cycles are run and the last two windows agree within tolerance and spec', () => {
		const h = brokenIn();
		const s = recompute(h.events, policy);
		expect(s.breakIn).toMatchObject({
			required: false,
			completedAtCycle: 10,
			completedAt: h.events[0].occurredAt
		});
		expect(s.breakIn.windows.map((w) => [w.cycle, w.R])).toEqual([
			[5, expect.closeTo(0.4, 12)],
			[10, expect.closeTo(0.4, 12)]
		]);
		expect(s.status).toBe('in-service');
		expect(kinds(evaluateFlags(s, policy, new Date(h.now())))).toEqual([]);
	});

	it('is not settled while windowed R still falls by more than the tolerance', () => {
		const h = history();
		h.breakIn(10, xs([0, 0.4, 0.2, 0, 0.4, ...settled])); // R 0.8 → 0.4
		const s = recompute(h.events, policy);
		expect(s.breakIn.required).toBe(true);
		const f = flag(evaluateFlags(s, policy, new Date(h.now())), 'break-in-due')!;
		expect(f.reason).toBe(
			'New fixture: break-in required — 10 of at least 10 cycles run; windowed R 0.8 → 0.4 µm (change 0.4 µm, tolerance 0.1 µm); spec 1 µm.'
		);
		expect(f.figures).toMatchObject({
			lastWindowR_um: expect.closeTo(0.4, 12),
			change_um: expect.closeTo(0.4, 12)
		});
	});

	it('is not settled when R is steady but above spec', () => {
		const h = history();
		const wide = [0, 1, 0.5, 0, 1]; // s = 0.5, R = 2
		h.breakIn(10, xs([...wide, ...wide]));
		expect(recompute(h.events, policy).breakIn.required).toBe(true);
	});

	it('waits for the minimum cycles even when readings have settled; reseats count', () => {
		const h = history();
		h.breakIn(6, xs([...settled, ...settled].slice(0, 6)));
		h.reseat(1, { dx: 0.1 });
		h.reseat(1, { dx: 0 });
		h.reseat(1, { dx: 0.2 });
		h.reseat(1, { dx: 0.2 }); // closes the second window, R 0.4 µm again, at cycle 10
		let s = recompute(h.events, policy);
		expect(s.totalCycles).toBe(10);
		expect(s.breakIn.required).toBe(false);
		// With a higher minimum the same history is still breaking in until more cycles are run.
		const strict = { ...policy, breakInMinCycles: 15 };
		s = recompute(h.events, strict);
		expect(s.breakIn).toMatchObject({ required: true, cycles: 10 });
		h.reseat(5);
		s = recompute(h.events, strict);
		expect(s.breakIn).toMatchObject({ required: false, completedAtCycle: 15 });
	});

	it('is required again after a part swap or a relubricating cleaning, not after a plain cleaning', () => {
		const h = brokenIn();
		h.cleaning(false);
		expect(recompute(h.events, policy).status).toBe('in-service');
		h.cleaning(true);
		let s = recompute(h.events, policy);
		expect(s.breakIn).toMatchObject({ required: true, reason: 'relubricated', cycles: 0 });
		expect(s.lastRelubricatedAt).toBe(h.events.at(-1)!.occurredAt);
		expect(flag(evaluateFlags(s, policy, new Date(h.now())), 'break-in-due')!.reason).toMatch(
			/^After relubrication: break-in required/
		);
		h.breakIn(10, xs([...settled, ...settled]));
		h.partSwap(['preload']);
		s = recompute(h.events, policy);
		expect(s.breakIn).toMatchObject({ required: true, reason: 'part-swap' });
		expect(s.status).toBe('breaking-in');
	});
});

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

describe('hold, release and the rest', () => {
	it('hold and release set the status; a break-in still pending shows again on release', () => {
		const h = history();
		h.hold('Dropped on the floor');
		let s = recompute(h.events, policy);
		expect(s).toMatchObject({ status: 'on-hold', holdReason: 'Dropped on the floor' });
		h.release();
		s = recompute(h.events, policy);
		expect(s).toMatchObject({ status: 'breaking-in', onHold: false, holdReason: null });
		h.breakIn(10, xs([...settled, ...settled]));
		h.hold('Waiting for a new seat');
		h.release();
		expect(recompute(h.events, policy).status).toBe('in-service');
	});

	it('moves and notes count as events and change nothing else', () => {
		const h = brokenIn();
		const before = recompute(h.events, policy);
		h.move();
		h.note('Looks fine');
		const after = recompute(h.events, policy);
		expect(after.eventCount).toBe(before.eventCount + 2);
		expect(after.lastMoveAt).toBe(h.events[1].occurredAt);
		expect({
			...after,
			eventCount: 0,
			lastEventId: null,
			lastEventAt: null,
			lastMoveAt: null
		}).toEqual({
			...before,
			eventCount: 0,
			lastEventId: null,
			lastEventAt: null
		});
	});

	it('orders events by time then id, and spots a late event', () => {
		const a = { id: 'b', occurredAt: '2025-01-01T00:00:00.000Z' };
		const b = { id: 'a', occurredAt: '2025-01-01T00:00:01.000Z' };
		const c = { id: 'c', occurredAt: '2025-01-01T00:00:00.000Z' };
		expect([b, c, a].sort(compareEvents).map((e) => e.id)).toEqual(['b', 'c', 'a']);
		const h = brokenIn();
		const s = recompute(h.events, policy);
		expect(isOutOfOrder(s, { occurredAt: '2024-12-31T00:00:00Z' })).toBe(true);
		expect(isOutOfOrder(s, { occurredAt: new Date(h.now()).toISOString() })).toBe(false);
		expect(isOutOfOrder(emptyState(), { occurredAt: '2000-01-01T00:00:00Z' })).toBe(false);
	});
});

describe('errors', () => {
	it('an unknown kind, a bad time, a bad reading or a bad policy throw clearly', () => {
		const s = emptyState();
		const good = {
			id: 'x',
			kind: 'reseat',
			occurredAt: '2025-01-01T00:00:00Z',
			payload: {}
		} as FixtureEvent;
		expect(() =>
			applyEvent(s, { ...good, kind: 'polish' } as unknown as FixtureEvent, policy)
		).toThrow(/event.kind: unknown kind "polish"/);
		expect(() => applyEvent(s, { ...good, occurredAt: 'soon' }, policy)).toThrow(
			/event.occurredAt/
		);
		expect(() =>
			applyEvent(s, { ...good, payload: { readings: { dx: NaN } } } as FixtureEvent, policy)
		).toThrow(/payload.readings.dx: must be a finite number/);
		expect(() =>
			applyEvent(s, { ...good, payload: { cycles: 0 } } as FixtureEvent, policy)
		).toThrow(/payload.cycles/);
		expect(() => applyEvent(s, good, { ...policy, repeatabilityWindow: 1 })).toThrow(
			/policy.repeatabilityWindow/
		);
		expect(() => evaluateFlags(s, policy, new Date('nope'))).toThrow(/now: must be a valid Date/);
		expect(() => initialState({ since: 'yesterday' })).toThrow(/since/);
	});
});

// ————————————————————————————————————————————————————————————————————————————————
// Properties over random histories.

const reading = fc
	.record(
		{
			dx: fc.integer({ min: -3000, max: 3000 }).map((i) => i / 1000),
			dy: fc.integer({ min: -3000, max: 3000 }).map((i) => i / 1000),
			dz: fc.integer({ min: -3000, max: 3000 }).map((i) => i / 1000)
		},
		{ requiredKeys: [] }
	)
	.filter((r) => Object.keys(r).length > 0);

const payloadArb: fc.Arbitrary<Pick<FixtureEvent, 'kind' | 'payload'>> = fc.oneof(
	{
		weight: 12,
		arbitrary: fc
			.record({
				cycles: fc.integer({ min: 1, max: 40 }),
				readings: fc.option(reading, { nil: undefined })
			})
			.map((p) => ({ kind: 'reseat' as const, payload: p.readings ? p : { cycles: p.cycles } }))
	},
	{
		weight: 2,
		arbitrary: fc
			.integer({ min: 1, max: 30 })
			.chain((cycles) =>
				fc
					.array(reading, { maxLength: Math.min(cycles, 12) })
					.map((readings) => ({ cycles, readings }))
			)
			.map((payload) => ({ kind: 'break-in' as const, payload }))
	},
	{
		weight: 2,
		arbitrary: fc.boolean().map((relubricated) => ({
			kind: 'cleaning' as const,
			payload: { method: 'dry-wipe' as const, relubricated }
		}))
	},
	{
		weight: 1,
		arbitrary: fc
			.array(fc.integer({ min: 0, max: 4 }), { minLength: 1, maxLength: 6 })
			.chain((grades) =>
				fc.constantFrom('serviceable', 'watch', 'replace').map((verdict) => ({
					kind: 'inspection' as const,
					payload: {
						contacts: grades.map((grade, i) => ({
							contact: `c${i}`,
							grade,
							marks: grade > 1 ? (['pitting', 'corrosion'] as const).slice(0, grade - 1) : []
						})),
						verdict: verdict as 'serviceable' | 'watch' | 'replace'
					}
				}))
			)
	},
	{
		weight: 1,
		arbitrary: fc
			.subarray(['balls', 'seats', 'preload', 'whole-fixture'] as const, { minLength: 1 })
			.map((replaced) => ({ kind: 'part-swap' as const, payload: { replaced: [...replaced] } }))
	},
	{ weight: 1, arbitrary: fc.constant({ kind: 'hold' as const, payload: { reason: 'checking' } }) },
	{ weight: 1, arbitrary: fc.constant({ kind: 'release' as const, payload: {} }) },
	{ weight: 1, arbitrary: fc.constant({ kind: 'move' as const, payload: { locationId: 'lab' } }) },
	{ weight: 1, arbitrary: fc.constant({ kind: 'note' as const, payload: { text: 'ok' } }) }
) as fc.Arbitrary<Pick<FixtureEvent, 'kind' | 'payload'>>;

const historyArb = fc
	.array(fc.tuple(payloadArb, fc.integer({ min: 1, max: 72 * 3600 })), { maxLength: 120 })
	.map((items) => {
		let t = T0;
		return items.map(([e, dt], i) => {
			t += dt * 1000;
			return { ...e, id: `e${i}`, occurredAt: new Date(t).toISOString() } as FixtureEvent;
		});
	});

const policyArb = fc.record({
	...Object.fromEntries(Object.entries(DEFAULT_POLICY).map(([k, v]) => [k, fc.constant(v)])),
	repeatabilitySpec_um: fc.constantFrom(0.5, 1, 2, 4),
	repeatabilityWindow: fc.integer({ min: 2, max: 8 }),
	breakInMinCycles: fc.integer({ min: 0, max: 60 }),
	settleWindow: fc.integer({ min: 2, max: 8 }),
	settleTolerance_um: fc.constantFrom(0, 0.2, 1, 5),
	ratedLifeCycles: fc.constantFrom(null, 300, 2000),
	forecastHorizonCycles: fc.constantFrom(0, 100, 5000)
}) as fc.Arbitrary<Policy>;

function deepFreeze<T>(value: T): T {
	if (value && typeof value === 'object') {
		Object.freeze(value);
		for (const v of Object.values(value)) deepFreeze(v);
	}
	return value;
}

const hasBadNumber = (s: unknown) =>
	/NaN|Infinity/.test(
		JSON.stringify(s, (_, v) => (typeof v === 'number' && !Number.isFinite(v) ? `${v}` : v))
	);

describe('folding properties (fast-check)', () => {
	it('one by one through JSON (as the server stores it) equals recompute from scratch', () => {
		fc.assert(
			fc.property(historyArb, policyArb, (events, p) => {
				let s: FixtureState = emptyState();
				for (const e of events) s = JSON.parse(JSON.stringify(applyEvent(s, e, p)));
				expect(s).toEqual(recompute(events, p));
			}),
			{ numRuns: 300 }
		);
	});

	it('applyEvent never changes its input (deep-frozen states and events)', () => {
		fc.assert(
			fc.property(historyArb, policyArb, (events, p) => {
				let s: FixtureState = deepFreeze(emptyState());
				for (const e of events) s = deepFreeze(applyEvent(s, deepFreeze(e), p));
				expect(s.eventCount).toBe(events.length);
			}),
			{ numRuns: 200 }
		);
	});

	it('a history split anywhere folds to the same state; states are plain finite JSON', () => {
		fc.assert(
			fc.property(historyArb, policyArb, fc.nat(), (events, p, cut) => {
				const k = events.length ? cut % (events.length + 1) : 0;
				const whole = recompute(events, p);
				const split = foldEvents(recompute(events.slice(0, k), p), events.slice(k), p);
				expect(split).toEqual(whole);
				expect(JSON.parse(JSON.stringify(whole))).toEqual(whole);
				expect(hasBadNumber(whole)).toBe(false);
				expect(cloneState(whole)).toEqual(whole);
			}),
			{ numRuns: 200 }
		);
	});

	it('evaluateFlags gives known kinds with finite figures and never throws on a folded state', () => {
		fc.assert(
			fc.property(historyArb, policyArb, fc.integer({ min: 0, max: 400 }), (events, p, days) => {
				const s = recompute(events, p);
				const now = new Date((s.lastEventAt ? Date.parse(s.lastEventAt) : T0) + days * 86_400_000);
				const flags = evaluateFlags(s, p, now);
				expect(new Set(kinds(flags)).size).toBe(flags.length);
				for (const f of flags) {
					expect(f.reason.length).toBeGreaterThan(10);
					expect(hasBadNumber(f.figures)).toBe(false);
				}
				expect(kinds(flags).includes('replace-now') && kinds(flags).includes('replace-soon')).toBe(
					false
				);
				expect(s.status === 'breaking-in').toBe(s.breakIn.required && !s.onHold);
			}),
			{ numRuns: 300 }
		);
	});
});

describe('bounded state (O(1) per event)', () => {
	it('20,000 seatings with readings leave a state of a few kilobytes', () => {
		const h = brokenIn();
		for (let i = 0; i < 20_000; i++)
			h.reseat(1, { dx: Math.sin(i) * 0.2, dy: Math.cos(i * 0.7) * 0.2, dz: 0.1 });
		const s = foldEvents(emptyState(), h.events, DEFAULT_POLICY);
		expect(s.readingsTotal).toBe(20_010);
		expect(JSON.stringify(s).length).toBeLessThan(8000);
	});
});
