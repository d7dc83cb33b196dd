import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { breakInStatus } from './break-in';

// Nestmark's settling rule (no standard defines settling — common practice): sliding windows of
// w cycles; settled at the first window of the tail in which every window has s ≤ threshold.
describe('breakInStatus', () => {
	const run = [0, 1, 0, 1, 0.5, 0.5, 0.5, 0.5, 0.5];

	it('hand-worked run: scatter stops after cycle 5, so the first compliant window ends at cycle 7, computed', () => {
		const r = breakInStatus(run, { window: 3, threshold_um: 0.1 });
		expect(r.windows.map((w) => [w.startCycle, w.endCycle])).toEqual([
			[1, 3],
			[2, 4],
			[3, 5],
			[4, 6],
			[5, 7],
			[6, 8],
			[7, 9]
		]);
		// s of [0, 1, 0] with n − 1 is √(1/3).
		expect(r.windows[0].s).toBeCloseTo(Math.sqrt(1 / 3), 12);
		expect(r.windows[3].s).toBeCloseTo(Math.sqrt(1 / 12), 12);
		expect(r).toMatchObject({ settled: true, settledAtCycle: 7 });
	});

	it('minCycles moves the answer later, and an unfinished minimum means not settled', () => {
		expect(breakInStatus(run, { window: 3, threshold_um: 0.1, minCycles: 8 }).settledAtCycle).toBe(
			8
		);
		expect(breakInStatus(run, { window: 3, threshold_um: 0.1, minCycles: 10 })).toMatchObject({
			settled: false,
			settledAtCycle: null
		});
	});

	it('a relapse at the end means not settled', () => {
		const r = breakInStatus([...run, 2], { window: 3, threshold_um: 0.1 });
		expect(r).toMatchObject({ settled: false, settledAtCycle: null });
	});

	it('too short a run has no windows and is not settled', () => {
		expect(breakInStatus([1, 2], { window: 3, threshold_um: 1 })).toEqual({
			settled: false,
			settledAtCycle: null,
			windows: []
		});
	});

	it('answer characterised (fast-check): every window from it on complies; the one before does not', () => {
		const value = fc.integer({ min: 0, max: 20 }).map((i) => i / 10);
		fc.assert(
			fc.property(
				fc.array(value, { maxLength: 60 }),
				fc.integer({ min: 2, max: 8 }),
				fc.integer({ min: 0, max: 10 }).map((i) => i / 10),
				fc.integer({ min: 0, max: 40 }),
				(devs, window, threshold_um, minCycles) => {
					const r = breakInStatus(devs, { window, threshold_um, minCycles });
					expect(r.windows.length).toBe(Math.max(devs.length - window + 1, 0));
					if (!r.settled) {
						expect(r.settledAtCycle).toBeNull();
						const last = r.windows.at(-1);
						expect(!last || last.s > threshold_um || last.endCycle < minCycles).toBe(true);
						return;
					}
					const at = r.settledAtCycle!;
					expect(at).toBeGreaterThanOrEqual(Math.max(window, minCycles));
					for (const w of r.windows)
						if (w.endCycle >= at) expect(w.s).toBeLessThanOrEqual(threshold_um);
					const before = r.windows.find((w) => w.endCycle === at - 1);
					if (before && before.endCycle >= minCycles)
						expect(before.s).toBeGreaterThan(threshold_um);
				}
			)
		);
	});

	it('throws clearly on a bad rule or value', () => {
		expect(() => breakInStatus(run, { window: 1, threshold_um: 1 })).toThrow(
			/rule.window: must be a whole number/
		);
		expect(() => breakInStatus(run, { window: 3, threshold_um: -1 })).toThrow(
			/threshold_um: must not be negative/
		);
		expect(() => breakInStatus([1, NaN, 2], { window: 2, threshold_um: 1 })).toThrow(
			/deviations_um\[1\]/
		);
		expect(() => breakInStatus(run, { window: 3, threshold_um: 1, minCycles: 1.5 })).toThrow(
			/minCycles/
		);
	});
});
