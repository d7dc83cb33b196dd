/**
 * The settling curve of one break-in run, for the fixture page: a rolling window of the run's
 * readings slides one seating at a time, and each window gives R = 4s (ISO 230-2 style), the
 * largest over the measured axes. The sliding-window s and the settling answer come from
 * breakInStatus (./break-in.ts) per axis, with an s threshold of spec / 4 (so R ≤ spec); the
 * cycle of each reading from the fold's own placement rule (readingCycle in ./health.ts).
 */
import { breakInStatus } from './break-in';
import { DomainInputError, requireInteger, requirePositive } from './errors';
import { readingCycle } from './health';

/** One seating's readings in µm; an absent or null axis was not measured. */
export interface CurveReading {
	dx?: number | null;
	dy?: number | null;
	dz?: number | null;
}

/** The rolling R of one run, and the cycle (within the run) from which it stayed within spec. */
export interface BreakInCurve {
	/** Rolling R = 4s (µm) at the cycle where each window ends, cycles counted within the run. */
	points: { cycle: number; R: number }[];
	/** From this cycle on every window's R is at or below the spec; null when it never settles. */
	withinSpecFromCycle: number | null;
}

const AXES = ['dx', 'dy', 'dz'] as const;

/**
 * Rolling R = 4s over `window` consecutive readings of a break-in run of `cycles` cycles, against
 * `spec_um`. An axis with fewer than `window` readings adds no points.
 */
export function breakInCurve(
	readings: readonly CurveReading[],
	cycles: number,
	window: number,
	spec_um: number
): BreakInCurve {
	if (!Array.isArray(readings)) throw new DomainInputError('readings', 'must be an array');
	requireInteger(cycles, 'cycles', Math.max(1, readings.length));
	requireInteger(window, 'window', 2);
	requirePositive(spec_um, 'spec_um');
	// Worst axis per reading index at which a window ends.
	const worst = new Map<number, number>();
	const settledAt: (number | null)[] = [];
	for (const axis of AXES) {
		const at: number[] = [];
		const values: number[] = [];
		readings.forEach((r, i) => {
			const v = r?.[axis];
			if (typeof v === 'number') {
				at.push(i);
				values.push(v);
			}
		});
		if (values.length < window) continue;
		const status = breakInStatus(values, { window, threshold_um: spec_um / 4 });
		for (const w of status.windows) {
			const index = at[w.endCycle - 1];
			worst.set(index, Math.max(worst.get(index) ?? 0, 4 * w.s));
		}
		settledAt.push(status.settled ? at[status.settledAtCycle! - 1] : null);
	}
	const m = readings.length;
	const points = [...worst.entries()]
		.sort((a, b) => a[0] - b[0])
		.map(([i, R]) => ({ cycle: readingCycle(i, m, cycles), R }));
	// Within spec once every measured axis is: the latest of the axes' answers.
	const from =
		settledAt.length && settledAt.every((x) => x !== null)
			? Math.max(...(settledAt as number[]))
			: null;
	return {
		points,
		withinSpecFromCycle: from === null ? null : readingCycle(from, m, cycles)
	};
}
