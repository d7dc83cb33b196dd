/**
 * Break-in (settling) detection on a run of per-cycle deviations. No standard defines settling;
 * Nestmark's rule: slide a window of w cycles along the run (step one cycle) and take the sample
 * standard deviation s of each window; the run has settled at the first window from which every
 * window to the end has s ≤ threshold, counting only windows that end at or after minCycles. The
 * reported cycle is where that first compliant window ends (1-based).
 */
import { DomainInputError, requireInteger, requireNonNegative } from './errors';

/** Settling rule: window length (cycles), s threshold (µm) and an optional minimum run. */
export interface BreakInRule {
	window: number;
	threshold_um: number;
	minCycles?: number;
}

/** Result of breakInStatus. */
export interface BreakInResult {
	settled: boolean;
	settledAtCycle: number | null;
	windows: { startCycle: number; endCycle: number; s: number }[];
}

/** Settling status and the sliding-window s curve of a break-in run. */
export function breakInStatus(deviations_um: number[], rule: BreakInRule): BreakInResult {
	if (!Array.isArray(deviations_um))
		throw new DomainInputError('deviations_um', 'must be an array');
	if (rule === null || typeof rule !== 'object') {
		throw new DomainInputError('rule', 'must be { window, threshold_um, minCycles? }');
	}
	const w = requireInteger(rule.window, 'rule.window', 2);
	const threshold = requireNonNegative(rule.threshold_um, 'rule.threshold_um');
	const minCycles = requireInteger(rule.minCycles ?? 0, 'rule.minCycles', 0);
	deviations_um.forEach((v, i) => {
		if (typeof v !== 'number' || !Number.isFinite(v)) {
			throw new DomainInputError(
				`deviations_um[${i}]`,
				`must be a finite number (got ${String(v)})`
			);
		}
	});
	const windows: BreakInResult['windows'] = [];
	for (let start = 0; start + w <= deviations_um.length; start++) {
		let sum = 0;
		for (let i = start; i < start + w; i++) sum += deviations_um[i];
		const mean = sum / w;
		let ss = 0;
		for (let i = start; i < start + w; i++) ss += (deviations_um[i] - mean) ** 2;
		windows.push({ startCycle: start + 1, endCycle: start + w, s: Math.sqrt(ss / (w - 1)) });
	}
	// Walk back from the end while windows comply; the tail's first window is the answer.
	let first = -1;
	for (let i = windows.length - 1; i >= 0 && windows[i].s <= threshold; i--) {
		if (windows[i].endCycle >= minCycles) first = i;
		else break;
	}
	if (first < 0) return { settled: false, settledAtCycle: null, windows };
	return { settled: true, settledAtCycle: windows[first].endCycle, windows };
}
