import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { FixtureEvent } from './events';
import {
	type RunCycle,
	countRefusal,
	freshBreakIn,
	progressAfter,
	rollingRepeatability,
	runPayload,
	runVerdict
} from './break-in-run';
import { recompute } from './health';
import { DEFAULT_POLICY } from './policy';

// The settle rule of the default policy: spec 1 µm, windows of 10 readings, tolerance 0.1 µm,
// at least 30 cycles (DEFAULT_POLICY).
const rule = DEFAULT_POLICY;

/** Readings alternating +a, −a on dx. */
const alternating = (n: number, a: number): RunCycle[] =>
	Array.from({ length: n }, (_, i) => ({ dx: i % 2 ? -a : a }));
// s of ten readings ±0.1 about a mean of 0: √(10 · 0.1² / 9) = 0.105409 µm (sample standard
// deviation, n − 1, ISO 3534-1 definition), so R = 4s = 0.421637 µm (ISO 230-2 style).
const R_01 = 4 * Math.sqrt((10 * 0.01) / 9);

describe('runVerdict', () => {
	it('asks for the whole minimum and two windows of readings before the first cycle', () => {
		const v = runVerdict(freshBreakIn(), rule, []);
		expect(v).toMatchObject({
			required: true,
			settled: false,
			cycles: 0,
			windows: [],
			moreReadings: 20,
			moreCycles: 30
		});
	});

	it('counts settling windows of readings and R = 4s per window', () => {
		const v = runVerdict(freshBreakIn(), rule, alternating(25, 0.1));
		expect(v.windows.map((w) => w.cycle)).toEqual([10, 20]);
		expect(v.windows[0].R).toBeCloseTo(0.421637, 6);
		expect(v.windows[1].R).toBeCloseTo(R_01, 12);
		expect(v.readingsInWindow).toBe(5);
		// Two equal windows within spec: only the minimum of 30 cycles is missing.
		expect(v).toMatchObject({ settled: false, cycles: 25, moreCycles: 5, moreReadings: 0 });
	});

	it('is met once the minimum is reached with two close windows within spec', () => {
		const v = runVerdict(freshBreakIn(), { ...rule, breakInMinCycles: 25 }, alternating(25, 0.1));
		expect(v).toMatchObject({ settled: true, cycles: 25, moreCycles: 0, moreReadings: 0 });
		expect(v.windows).toHaveLength(2);
	});

	it('asks for another window when R moved more than the tolerance', () => {
		// Second window ±0.5: R = 4s with s = √(10·0.25/9) (n − 1, ISO 3534-1) = 2.108 µm, a change of
		// 1.69 µm.
		const run = [...alternating(10, 0.1), ...alternating(10, 0.5), ...alternating(13, 0.1)];
		const v = runVerdict(freshBreakIn(), rule, run);
		expect(v.windows[1].R).toBeCloseTo(4 * Math.sqrt(2.5 / 9), 12);
		expect(v).toMatchObject({ settled: false, cycles: 33, readingsInWindow: 3 });
		expect(v).toMatchObject({ moreReadings: 7, moreCycles: 7 });
	});

	it('cannot settle on cycles without readings', () => {
		const v = runVerdict(
			freshBreakIn(),
			rule,
			Array.from({ length: 40 }, () => null)
		);
		expect(v).toMatchObject({ settled: false, cycles: 40, moreReadings: 20, moreCycles: 20 });
	});

	it('continues the fixture’s progress before the run', () => {
		const before = alternating(10, 0.1);
		const start = recompute(
			[
				{
					id: 'a',
					kind: 'break-in',
					occurredAt: '2025-01-01T00:00:00Z',
					payload: runPayload(before)
				}
			],
			DEFAULT_POLICY
		).breakIn;
		const v = runVerdict(start, rule, alternating(20, 0.1));
		expect(v).toMatchObject({ cyclesBefore: 10, cycles: 30, settled: true });
		expect(v.windows.map((w) => w.cycle)).toEqual([10, 20, 30]);
	});

	it('says no break-in is required for a fixture in service', () => {
		const start = { ...freshBreakIn(), required: false };
		expect(runVerdict(start, rule, alternating(3, 0.1))).toMatchObject({
			required: false,
			settled: true,
			cycles: 3,
			moreCycles: 0
		});
	});

	it('agrees with the server’s fold of the same events, whatever the run', () => {
		const reading = fc.option(
			fc.record(
				{
					dx: fc.double({ min: -2, max: 2, noNaN: true }),
					dy: fc.double({ min: -2, max: 2, noNaN: true })
				},
				{ requiredKeys: [] }
			),
			{ nil: null }
		);
		const clean = (r: RunCycle) => (r && (r.dx !== undefined || r.dy !== undefined) ? r : null);
		fc.assert(
			fc.property(
				fc.array(reading, { maxLength: 30 }),
				fc.array(reading, { minLength: 1, maxLength: 60 }),
				fc.integer({ min: 0, max: 40 }),
				(beforeRaw, runRaw, minCycles) => {
					const policy = { ...DEFAULT_POLICY, breakInMinCycles: minCycles, settleWindow: 5 };
					const before = beforeRaw.map(clean);
					const run = runRaw.map(clean);
					const events: FixtureEvent[] = [];
					if (before.length) {
						events.push({
							id: 'a',
							kind: 'break-in',
							occurredAt: '2025-01-01T00:00:00Z',
							payload: runPayload(before)
						});
					}
					const start = recompute(events, policy).breakIn;
					events.push({
						id: 'b',
						kind: 'break-in',
						occurredAt: '2025-01-02T00:00:00Z',
						payload: runPayload(run)
					});
					const server = recompute(events, policy).breakIn;
					const v = runVerdict(start, policy, run);
					if (!start.required) return v.settled;
					return v.settled === !server.required && v.cycles === server.cycles;
				}
			)
		);
	});

	it('rejects a start that is not break-in progress', () => {
		expect(() => runVerdict(null as never, rule, [])).toThrow(
			/start: must be the break-in progress/
		);
	});
});

describe('runPayload', () => {
	it('gives the cycles, the readings oldest first and a trimmed note', () => {
		expect(runPayload([{ dx: 1 }, null, { dy: -2, dz: 0.5 }], '  new balls ')).toEqual({
			cycles: 3,
			readings: [{ dx: 1 }, { dy: -2, dz: 0.5 }],
			note: 'new balls'
		});
		expect(runPayload([null], '   ')).toEqual({ cycles: 1, readings: [] });
	});
});

describe('rollingRepeatability', () => {
	it('gives the worst per-axis s over the last readings and R = 4s', () => {
		// dx 1, 2, 3: s = 1 exactly (sample standard deviation); dy 0, 0, 0.5: s = 0.288675.
		const run: RunCycle[] = [
			{ dx: 1, dy: 0 },
			null,
			{ dx: 2, dy: 0 },
			{ dx: 3, dy: 0.5 },
			{ dx: 3 }
		];
		const pts = rollingRepeatability(run, 3);
		expect(pts.map((p) => p.cycle)).toEqual([4, 5]);
		expect(pts[0]).toEqual({ cycle: 4, s: 1, R: 4 });
		// Sample standard deviation (n − 1, ISO 3534-1): dx 2, 3, 3: mean 8/3, s = √(1/3) = 0.57735;
		// dy 0, 0.5: s = 0.353553.
		expect(pts[1].s).toBeCloseTo(Math.sqrt(1 / 3), 12);
		expect(pts[1].R).toBeCloseTo(4 * Math.sqrt(1 / 3), 12);
	});

	it('skips windows where no axis has two values, and checks the window', () => {
		expect(rollingRepeatability([{ dx: 1 }, { dy: 2 }, { dz: 3 }], 3)).toEqual([]);
		expect(rollingRepeatability([{ dx: 1 }], 2)).toEqual([]);
		expect(() => rollingRepeatability([], 1)).toThrow(/window: must be a whole number/);
	});
});

describe('countRefusal', () => {
	it('stops at the limits of one break-in event (events.ts)', () => {
		expect(countRefusal([], true)).toBeNull();
		const readings: RunCycle[] = Array.from({ length: 10_000 }, () => ({ dx: 0 }));
		expect(countRefusal(readings, false)).toBeNull();
		expect(countRefusal(readings, true)).toMatch(/10000 readings, the most one run can log/);
		const cycles: RunCycle[] = Array.from({ length: 100_000 }, () => null);
		expect(countRefusal(cycles, false)).toMatch(/100000 cycles, the most one run can log/);
	});
});

describe('progressAfter', () => {
	it('folds events not yet on the server into the progress, as the server will', () => {
		const events: FixtureEvent[] = [
			{
				id: 'a',
				kind: 'break-in',
				occurredAt: '2025-01-01T00:00:00Z',
				payload: runPayload(alternating(12, 0.1))
			},
			{ id: 'b', kind: 'reseat', occurredAt: '2025-01-01T01:00:00Z', payload: { cycles: 3 } }
		];
		const p = progressAfter(freshBreakIn(), rule, events);
		const server = recompute(events, DEFAULT_POLICY).breakIn;
		expect(p).toEqual({
			required: true,
			reason: 'new',
			cycles: 15,
			acc: server.acc,
			windows: server.windows
		});
		expect(p.windows).toHaveLength(1);
	});

	it('starts a new requirement after a part swap logged on the device', () => {
		const done = { ...freshBreakIn(), required: false, reason: 'new' as const, cycles: 30 };
		const p = progressAfter(done, rule, [
			{
				id: 'c',
				kind: 'part-swap',
				occurredAt: '2025-02-01T00:00:00Z',
				payload: { replaced: ['balls'] }
			}
		]);
		expect(p).toMatchObject({ required: true, reason: 'part-swap', cycles: 0, windows: [] });
	});
});
