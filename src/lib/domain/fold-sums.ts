/**
 * The running sums a fold keeps, and the figures read back from them: Welford sums for the current
 * settling or trend window, cycle counters, SPC baseline sums, and R and the forecast they give.
 * Every list is bounded (see the limits in fold-state.ts), so adding a reading costs O(1).
 */
import { type Forecast, forecastCrossing } from './forecast';
import {
	BREAK_IN_MAX_WINDOWS,
	FORECAST_MIN_WINDOWS,
	SPC_BASELINE_POINTS,
	SPC_TAIL,
	TREND_MAX_WINDOWS,
	newAcc,
	type AxisSpc,
	type FixtureState,
	type StoredReading,
	type WindowAccumulator,
	type WindowPoint
} from './fold-state';
import type { Policy } from './policy';

export const AXIS_NAMES = ['x', 'y', 'z'] as const;
export type AxisName = (typeof AXIS_NAMES)[number];

/** Welford's update of one window's per-axis mean and sum of squares. */
function accumulate(acc: WindowAccumulator, r: StoredReading): void {
	acc[0]++;
	for (let a = 0; a < 3; a++) {
		const v = r[a];
		if (v === null) continue;
		const o = 1 + 3 * a;
		const n = ++acc[o];
		const d = v - acc[o + 1];
		acc[o + 1] += d / n;
		acc[o + 2] += d * (v - acc[o + 1]);
	}
}

/** Largest per-axis R = 4s of an accumulator, or null when no axis has two values. */
function accR(acc: WindowAccumulator): number | null {
	let best: number | null = null;
	for (let a = 0; a < 3; a++) {
		const n = acc[1 + 3 * a];
		if (n < 2) continue;
		const R = 4 * Math.sqrt(Math.max(acc[3 + 3 * a], 0) / (n - 1));
		if (best === null || R > best) best = R;
	}
	return best;
}

function pushBounded<T>(list: T[], item: T, max: number): void {
	list.push(item);
	while (list.length > max) list.shift();
}

/** Add cycles to every counter, and to the break-in's while one is running. */
export function advance(w: FixtureState, cycles: number): void {
	w.totalCycles += cycles;
	w.cyclesSinceCleaning += cycles;
	w.cyclesSinceInspection += cycles;
	w.cyclesSincePartSwap += cycles;
	w.cyclesSinceRenewal += cycles;
	if (w.breakIn.required) w.breakIn.cycles += cycles;
}

/** The first SPC_BASELINE_POINTS values build the phase-I sums; later ones go to the tail. */
function spcAdd(a: AxisSpc, v: number): void {
	a.count++;
	if (a.n < SPC_BASELINE_POINTS) {
		a.sum += v;
		if (a.last !== null) a.sumMR += Math.abs(v - a.last);
		a.last = v;
		a.n++;
	} else {
		pushBounded(a.tail, v, SPC_TAIL);
	}
}

/** Close the window when it is full: its R joins the curve (if any axis had two values). */
function closeWindow(
	acc: WindowAccumulator,
	size: number,
	windows: WindowPoint[],
	cycle: number,
	max: number
): boolean {
	if (acc[0] < size) return false;
	const R = accR(acc);
	if (R !== null) pushBounded(windows, { cycle, R }, max);
	return true;
}

/**
 * Fold one seating's readings (mutates `w`). During a break-in they feed the settling windows;
 * afterwards the trend windows and the SPC sums. Either way they join the recent window.
 */
export function addReading(w: FixtureState, r: StoredReading, p: Policy): void {
	w.readingsTotal++;
	pushBounded(w.recent, r, p.repeatabilityWindow);
	if (w.breakIn.required) {
		const b = w.breakIn;
		accumulate(b.acc, r);
		if (closeWindow(b.acc, p.settleWindow, b.windows, b.cycles, BREAK_IN_MAX_WINDOWS)) {
			b.acc = newAcc();
		}
		return;
	}
	const t = w.trend;
	accumulate(t.acc, r);
	if (closeWindow(t.acc, p.repeatabilityWindow, t.windows, w.totalCycles, TREND_MAX_WINDOWS)) {
		t.acc = newAcc();
	}
	for (let a = 0; a < 3; a++) {
		const v = r[a];
		if (v !== null) spcAdd(w.spc[a], v);
	}
}

/** R = 4s per axis over the stored recent readings; the worst axis, or null with too few. */
export function recentRepeatability(state: FixtureState): {
	R: number;
	axis: AxisName;
	n: number;
	perAxis: Partial<Record<AxisName, number>>;
} | null {
	const recent = state.recent;
	const perAxis: Partial<Record<AxisName, number>> = {};
	let bestR = -1;
	let bestAxis: AxisName = 'x';
	for (let a = 0; a < 3; a++) {
		// Two passes (mean, then squares) over at most repeatabilityWindow readings.
		let n = 0;
		let sum = 0;
		for (let i = 0; i < recent.length; i++) {
			const v = recent[i][a];
			if (v !== null) {
				n++;
				sum += v;
			}
		}
		if (n < 2) continue;
		const mean = sum / n;
		let ss = 0;
		for (let i = 0; i < recent.length; i++) {
			const v = recent[i][a];
			if (v !== null) ss += (v - mean) * (v - mean);
		}
		const R = 4 * Math.sqrt(ss / (n - 1));
		perAxis[AXIS_NAMES[a]] = R;
		if (R > bestR) {
			bestR = R;
			bestAxis = AXIS_NAMES[a];
		}
	}
	return bestR < 0 ? null : { R: bestR, axis: bestAxis, n: recent.length, perAxis };
}

/** What fixtureForecast reads of a state: a whole FixtureState, or just these parts of one. */
export interface ForecastSource {
	totalCycles: number;
	breakIn: { required: boolean };
	trend: { windows: readonly WindowPoint[] };
}

/** Theil–Sen forecast of windowed R against cycles, or null before FORECAST_MIN_WINDOWS windows. */
export function fixtureForecast(
	state: ForecastSource,
	policy: Pick<Policy, 'repeatabilitySpec_um'>
): (Forecast & { cyclesToSpec: number | null; windows: number }) | null {
	const ws = state.trend.windows;
	if (state.breakIn.required || ws.length < FORECAST_MIN_WINDOWS) return null;
	if (ws[0].cycle === ws[ws.length - 1].cycle) return null;
	const f = forecastCrossing(
		ws.map((p) => ({ x: p.cycle, y: p.R })),
		policy.repeatabilitySpec_um,
		{ method: 'theil-sen', intercept: 'separate' }
	);
	return {
		slope: f.slope,
		intercept: f.intercept,
		status: f.status,
		crossingX: f.crossingX,
		latestX: f.latestX,
		n: f.n,
		cyclesToSpec: f.crossingX === null ? null : f.crossingX - state.totalCycles,
		windows: ws.length
	};
}
