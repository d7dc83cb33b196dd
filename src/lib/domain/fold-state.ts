/**
 * A fixture's derived state, folded from its event log (see fold.ts), and the bounds that keep it
 * small.
 *
 * State is plain JSON (numbers, strings, null, arrays, objects; times as ISO strings) so the server
 * can store it in a JSON column and round-trip it. Only bounded windows of recent readings are kept
 * — the last repeatability window, the current settling or trend window as running sums, a bounded
 * series of windowed R by cycle for the forecast, and per-axis SPC baseline sums with a short tail
 * for the run rules — so folding costs O(1) per event whatever the length of the history.
 */
import { DomainInputError } from './errors';
import type { DerivedStatus } from './fixture-status';
import { RULE_LENGTH, type RunRule } from './spc';
import type { InspectionVerdict, WearMark } from './wear';

/** Why a break-in is (or was last) required. */
export type BreakInReason = 'new' | 'part-swap' | 'relubricated';

/** A seating's readings as stored: [dx, dy, dz] in µm, null where the axis was not measured. */
export type StoredReading = [number | null, number | null, number | null];

/**
 * Running statistics of one window of readings (Welford):
 * [count, n_x, mean_x, M2_x, n_y, mean_y, M2_y, n_z, mean_z, M2_z].
 */
export type WindowAccumulator = number[];

/** Windowed R (µm) at the cycle where the window ended. */
export interface WindowPoint {
	cycle: number;
	R: number;
}

/** Progress of the current (or last) break-in. */
export interface BreakInProgress {
	required: boolean;
	reason: BreakInReason | null;
	/** When the current requirement began (event time). */
	since: string | null;
	/** Cycles run since the requirement began. */
	cycles: number;
	acc: WindowAccumulator;
	/** Settling curve: R of each completed settling window; cycle counts from the requirement. */
	windows: WindowPoint[];
	completedAt: string | null;
	/** Total cycles when the break-in completed. */
	completedAtCycle: number | null;
}

/** SPC state of one axis: baseline sums (phase I) and the latest later values. */
export interface AxisSpc {
	/** Baseline points taken so far (up to SPC_BASELINE_POINTS). */
	n: number;
	sum: number;
	sumMR: number;
	last: number | null;
	/** Values on this axis since break-in completed (baseline and later). */
	count: number;
	/** The latest values after the baseline, oldest first (up to SPC_TAIL). */
	tail: number[];
}

/** A fixture's derived state; plain JSON. */
export interface FixtureState {
	version: 1;
	eventCount: number;
	lastEventId: string | null;
	lastEventAt: string | null;
	/** Commissioning time, or the first event's time. */
	since: string | null;
	/** Whether `since` is a commissioning date (true) or the first event's time (false). */
	sinceIsCommissioning: boolean;
	status: DerivedStatus;
	onHold: boolean;
	holdReason: string | null;
	totalCycles: number;
	cyclesSinceCleaning: number;
	cyclesSinceInspection: number;
	cyclesSincePartSwap: number;
	/** Cycles since the contacts were last renewed (whole fixture, or balls and seats together). */
	cyclesSinceRenewal: number;
	lastCleaningAt: string | null;
	lastRelubricatedAt: string | null;
	lastInspectionAt: string | null;
	lastPartSwapAt: string | null;
	lastBreakInRunAt: string | null;
	lastMoveAt: string | null;
	/** Seatings with readings, ever. */
	readingsTotal: number;
	/** The last repeatabilityWindow seatings with readings, oldest first. */
	recent: StoredReading[];
	breakIn: BreakInProgress;
	/** Windows of repeatabilityWindow readings after break-in, for the forecast. */
	trend: { acc: WindowAccumulator; windows: WindowPoint[] };
	spc: [AxisSpc, AxisSpc, AxisSpc];
	/** From the last inspection: highest grade over the contacts, verdict, marks seen. */
	wear: { grade: number | null; verdict: InspectionVerdict | null; marks: WearMark[] };
}

/**
 * Points for phase-I SPC limits. Common practice (from memory of the SPC literature, e.g. the
 * NIST/SEMATECH handbook's advice on phase I): 20–25 points before limits are trusted.
 */
export const SPC_BASELINE_POINTS = 20;
/** Run rules that raise a drift flag: the Western Electric rules and Nelson's trend rule. */
export const DRIFT_RULES: readonly RunRule[] = ['WE1', 'WE2', 'WE3', 'WE4', 'N3'];
/** A hit counts while its window ends within this many of the latest readings on the axis. */
export const DRIFT_MEMORY = 5;
/** Values kept after the baseline: enough for every drift rule's window to end in the memory. */
export const SPC_TAIL = Math.max(...DRIFT_RULES.map((r) => RULE_LENGTH[r])) + DRIFT_MEMORY - 1;
/** Settling windows kept for the settling curve. */
export const BREAK_IN_MAX_WINDOWS = 50;
/** Trend windows kept for the forecast (the latest ones). */
export const TREND_MAX_WINDOWS = 16;
/** Fewest trend windows before a forecast is made. */
export const FORECAST_MIN_WINDOWS = 4;

export const newAcc = (): WindowAccumulator => [0, 0, 0, 0, 0, 0, 0, 0, 0, 0];
const newAxis = (): AxisSpc => ({ n: 0, sum: 0, sumMR: 0, last: null, count: 0, tail: [] });
export const newSpc = (): FixtureState['spc'] => [newAxis(), newAxis(), newAxis()];

export function newBreakIn(
	required: boolean,
	reason: BreakInReason | null,
	since: string | null
): BreakInProgress {
	return {
		required,
		reason,
		since,
		cycles: 0,
		acc: newAcc(),
		windows: [],
		completedAt: null,
		completedAtCycle: null
	};
}

export interface InitialStateOptions {
	/** Commissioning time (ISO 8601); default: the first event's time. */
	since?: string | null;
	/** Whether the fixture must be broken in before service; default true (a new fixture). */
	breakInRequired?: boolean;
}

/** State of a fixture before any event. */
export function initialState(options: InitialStateOptions = {}): FixtureState {
	const since = options.since ?? null;
	if (since !== null && (typeof since !== 'string' || Number.isNaN(Date.parse(since)))) {
		throw new DomainInputError('since', 'must be an ISO 8601 date and time');
	}
	const required = options.breakInRequired ?? true;
	return {
		version: 1,
		eventCount: 0,
		lastEventId: null,
		lastEventAt: null,
		since,
		sinceIsCommissioning: since !== null,
		status: required ? 'breaking-in' : 'in-service',
		onHold: false,
		holdReason: null,
		totalCycles: 0,
		cyclesSinceCleaning: 0,
		cyclesSinceInspection: 0,
		cyclesSincePartSwap: 0,
		cyclesSinceRenewal: 0,
		lastCleaningAt: null,
		lastRelubricatedAt: null,
		lastInspectionAt: null,
		lastPartSwapAt: null,
		lastBreakInRunAt: null,
		lastMoveAt: null,
		readingsTotal: 0,
		recent: [],
		breakIn: newBreakIn(required, required ? 'new' : null, since),
		trend: { acc: newAcc(), windows: [] },
		spc: newSpc(),
		wear: { grade: null, verdict: null, marks: [] }
	};
}

/** State of a new fixture with no events and no commissioning date. */
export function emptyState(): FixtureState {
	return initialState();
}

/**
 * The top level of a state, field by field. An object spread of a state this size runs through a
 * slow generic path in V8 (several times the cost of this literal), and applyEvent copies the top
 * level on every event.
 */
export function copyTop(s: FixtureState): FixtureState {
	return {
		version: s.version,
		eventCount: s.eventCount,
		lastEventId: s.lastEventId,
		lastEventAt: s.lastEventAt,
		since: s.since,
		sinceIsCommissioning: s.sinceIsCommissioning,
		status: s.status,
		onHold: s.onHold,
		holdReason: s.holdReason,
		totalCycles: s.totalCycles,
		cyclesSinceCleaning: s.cyclesSinceCleaning,
		cyclesSinceInspection: s.cyclesSinceInspection,
		cyclesSincePartSwap: s.cyclesSincePartSwap,
		cyclesSinceRenewal: s.cyclesSinceRenewal,
		lastCleaningAt: s.lastCleaningAt,
		lastRelubricatedAt: s.lastRelubricatedAt,
		lastInspectionAt: s.lastInspectionAt,
		lastPartSwapAt: s.lastPartSwapAt,
		lastBreakInRunAt: s.lastBreakInRunAt,
		lastMoveAt: s.lastMoveAt,
		readingsTotal: s.readingsTotal,
		recent: s.recent,
		breakIn: s.breakIn,
		trend: s.trend,
		spc: s.spc,
		wear: s.wear
	};
}

/** A copy of a break-in's progress; `deep` also copies its window sums and settling curve. */
export function copyBreakIn(b: BreakInProgress, deep: boolean): BreakInProgress {
	return {
		required: b.required,
		reason: b.reason,
		since: b.since,
		cycles: b.cycles,
		acc: deep ? b.acc.slice() : b.acc,
		windows: deep ? b.windows.slice() : b.windows,
		completedAt: b.completedAt,
		completedAtCycle: b.completedAtCycle
	};
}

function copyAxis(a: AxisSpc): AxisSpc {
	return { n: a.n, sum: a.sum, sumMR: a.sumMR, last: a.last, count: a.count, tail: a.tail.slice() };
}

/**
 * Copies of the parts that folding readings changes in place: during a break-in its settling
 * windows, afterwards the trend windows and SPC sums (see addReading); all of them for `all`.
 */
export function copyReadingParts(w: FixtureState, all: boolean): void {
	w.recent = w.recent.slice();
	if (all || w.breakIn.required) w.breakIn = copyBreakIn(w.breakIn, true);
	if (all || !w.breakIn.required) {
		w.trend = { acc: w.trend.acc.slice(), windows: w.trend.windows.slice() };
		w.spc = [copyAxis(w.spc[0]), copyAxis(w.spc[1]), copyAxis(w.spc[2])];
	}
}

/** A deep copy of a state (it is plain JSON). */
export function cloneState(state: FixtureState): FixtureState {
	const w = copyTop(state);
	copyReadingParts(w, true);
	w.wear = {
		grade: state.wear.grade,
		verdict: state.wear.verdict,
		marks: state.wear.marks.slice()
	};
	return w;
}
