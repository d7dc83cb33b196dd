import { describe, expect, it } from 'vitest';
import { breakInCurve } from './break-in-curves';

describe('breakInCurve', () => {
	// ISO 230-2:2014 style, computed: readings 2.0, 2.4, 1.8, 2.2, 2.1 µm → s = 0.223607
	// (n − 1), R = 4s = 0.894427.
	const worked = [2.0, 2.4, 1.8, 2.2, 2.1].map((dx) => ({ dx }));

	it('gives R = 4s of the worked readings for a window of all five, computed', () => {
		const c = breakInCurve(worked, 5, 5, 1);
		expect(c.points).toHaveLength(1);
		expect(c.points[0].cycle).toBe(5);
		expect(c.points[0].R).toBeCloseTo(0.894427, 6);
		expect(c.withinSpecFromCycle).toBe(5);
		// The same run never comes within a 0.5 µm spec.
		expect(breakInCurve(worked, 5, 5, 0.5).withinSpecFromCycle).toBeNull();
	});

	it('places readings on the run’s cycles as the fold does (spread evenly, last at the end)', () => {
		// Five readings over ten cycles are taken at cycles 2, 4, 6, 8, 10; windows of two end at
		// the second reading onward. R of [a, b] is 4·|a − b|/√2, computed.
		const c = breakInCurve(worked, 10, 2, 1);
		expect(c.points.map((p) => p.cycle)).toEqual([4, 6, 8, 10]);
		expect(c.points[0].R).toBeCloseTo((4 * 0.4) / Math.SQRT2, 12);
		expect(c.points[3].R).toBeCloseTo((4 * 0.1) / Math.SQRT2, 12);
	});

	it('takes the worst axis per window, and skips an axis with too few readings', () => {
		const c = breakInCurve(
			[
				{ dx: 0, dy: 0, dz: 5 },
				{ dx: 0.1, dy: 1 },
				{ dx: 0.1, dy: 1 }
			],
			3,
			2,
			1
		);
		// dy's first window [0, 1] beats dx's [0, 0.1]; dz has one reading and adds nothing.
		expect(c.points).toHaveLength(2);
		expect(c.points[0].R).toBeCloseTo(4 / Math.SQRT2, 12);
		expect(c.points[1].R).toBe(0);
		// Within spec from where every measured axis is: dy from its second window (cycle 3).
		expect(c.withinSpecFromCycle).toBe(3);
	});

	it('settles only where every later window is within spec (the tail rule of breakInStatus)', () => {
		const run = [0, 0.4, 0, 0.02, 0.01, 0.02, 0.3, 0.01].map((dx) => ({ dx }));
		const c = breakInCurve(run, 8, 2, 0.4);
		// The jump to 0.3 breaks the tail, so only windows from the last one count.
		expect(c.withinSpecFromCycle).toBeNull();
		expect(breakInCurve(run.slice(0, 6), 6, 2, 0.4).withinSpecFromCycle).toBe(4);
	});

	it('refuses input it cannot work with', () => {
		expect(() => breakInCurve(worked, 4, 2, 1)).toThrow(/cycles/);
		expect(() => breakInCurve(worked, 5, 1, 1)).toThrow(/window/);
		expect(() => breakInCurve(worked, 5, 2, 0)).toThrow(/spec_um/);
	});
});
