/**
 * The health rules: a fixture's derived state, folded from its event log one event at a time, and
 * the flags that state raises under a policy.
 *
 * State is plain JSON (numbers, strings, null, arrays, objects; times as ISO strings) so the server
 * can store it in a JSON column and round-trip it. Folding costs O(1) per event whatever the length
 * of the history: only bounded windows of recent readings are kept — the last repeatability window,
 * the current settling or trend window as running sums, a bounded series of windowed R by cycle for
 * the forecast, and per-axis SPC baseline sums with a short tail for the run rules.
 *
 * Events are folded in the order given. The server folds them in (occurredAt, id) order; when a late
 * event from an offline phone is older than the state's last event (isOutOfOrder), it recomputes
 * from the full history instead. A policy change also calls for a recompute, since window sizes are
 * part of the state.
 *
 * Rules (every number is a policy field):
 * - Break-in is required for a new fixture and after any part swap or a cleaning that relubricated
 *   the contacts. It is complete once it has run breakInMinCycles cycles and the last two settling
 *   windows (settleWindow seatings with readings each) differ in R by at most settleTolerance_um
 *   and the last is within spec. A fixture without readings cannot show it has settled.
 * - R of a set of seatings is the largest per-axis R = 4s (ISO 230-2 style) over the measured axes.
 * - Cleaning / inspection due: cycles since the last one reach the interval, or whole days since it
 *   (since commissioning or the first event if there was none) reach the interval.
 * - Out of spec: R over the last repeatabilityWindow seatings with readings exceeds the spec.
 * - Drift: once a baseline of SPC_BASELINE_POINTS readings per axis has been taken after break-in,
 *   a run rule (DRIFT_RULES) fires on an individuals chart of later readings, on a window ending
 *   within the last DRIFT_MEMORY readings on that axis.
 * - Replace now: last inspection's highest wear grade at or above wearLimitGrade, or its verdict
 *   'replace', or cycles since the contacts were renewed reach ratedLifeCycles.
 * - Replace soon (when not replace now): the Theil–Sen trend of windowed R crosses the spec within
 *   forecastHorizonCycles, or the rated life ends within that horizon.
 * - While a break-in is running, out-of-spec, drift and the forecast are not judged: those
 *   readings describe settling, and the break-in flag already says the fixture is not ready.
 */
import { DomainInputError } from './errors';
import type { EventKind, FixtureEvent } from './events';
import type { DerivedStatus } from './fixture-status';
import type { FlagKind } from './flag-kinds';
import { type Forecast, forecastCrossing } from './forecast';
import { type Policy, assertPolicy } from './policy';
import { D2, RULE_LENGTH, RULE_TEXT, type RunRule, runRuleHits } from './spc';
import { isoMs } from './time';
import { type InspectionVerdict, type WearMark, WEAR_MARKS } from './wear';

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

/** A flag with its reason in words and the numbers behind it. */
export interface Flag {
	kind: FlagKind;
	reason: string;
	figures: Record<string, number | string | null>;
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

const AXIS_NAMES = ['x', 'y', 'z'] as const;
const DAY_MS = 86_400_000;
// Differences of windowed R at the tolerance should not fail on binary rounding.
const SETTLE_EPS = 1e-9;

const newAcc = (): WindowAccumulator => [0, 0, 0, 0, 0, 0, 0, 0, 0, 0];
const newAxis = (): AxisSpc => ({ n: 0, sum: 0, sumMR: 0, last: null, count: 0, tail: [] });
const newSpc = (): FixtureState['spc'] => [newAxis(), newAxis(), newAxis()];

function newBreakIn(required: boolean, reason: BreakInReason | null, since: string | null) {
	return {
		required,
		reason,
		since,
		cycles: 0,
		acc: newAcc(),
		windows: [],
		completedAt: null,
		completedAtCycle: null
	} satisfies BreakInProgress;
}

/** Options for initialState. */
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
function copyTop(s: FixtureState): FixtureState {
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

function copyBreakIn(b: BreakInProgress, deep: boolean): BreakInProgress {
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
function copyReadingParts(w: FixtureState, all: boolean): void {
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

function axisValue(src: Record<string, unknown>, key: string, field: string): number | null {
	const v = src[key];
	if (v === undefined || v === null) return null;
	if (typeof v !== 'number' || !Number.isFinite(v)) {
		throw new DomainInputError(
			`${field}.${key}`,
			`must be a finite number of µm (got ${String(v)})`
		);
	}
	return v + 0; // −0 would not survive JSON
}

function toStored(r: unknown, field: string): StoredReading {
	if (r === null || typeof r !== 'object') {
		throw new DomainInputError(field, 'must be an object { dx?, dy?, dz? }');
	}
	const src = r as Record<string, unknown>;
	const out: StoredReading = [
		axisValue(src, 'dx', field),
		axisValue(src, 'dy', field),
		axisValue(src, 'dz', field)
	];
	if (out[0] === null && out[1] === null && out[2] === null) {
		throw new DomainInputError(field, 'needs at least one of dx, dy, dz');
	}
	return out;
}

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

/** Add cycles to every counter. */
function advance(w: FixtureState, cycles: number): void {
	w.totalCycles += cycles;
	w.cyclesSinceCleaning += cycles;
	w.cyclesSinceInspection += cycles;
	w.cyclesSincePartSwap += cycles;
	w.cyclesSinceRenewal += cycles;
	if (w.breakIn.required) w.breakIn.cycles += cycles;
}

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

function addReading(w: FixtureState, r: StoredReading, p: Policy): void {
	w.readingsTotal++;
	pushBounded(w.recent, r, p.repeatabilityWindow);
	if (w.breakIn.required) {
		const acc = w.breakIn.acc;
		accumulate(acc, r);
		if (acc[0] >= p.settleWindow) {
			const R = accR(acc);
			w.breakIn.acc = newAcc();
			if (R !== null)
				pushBounded(w.breakIn.windows, { cycle: w.breakIn.cycles, R }, BREAK_IN_MAX_WINDOWS);
		}
		return;
	}
	const acc = w.trend.acc;
	accumulate(acc, r);
	if (acc[0] >= p.repeatabilityWindow) {
		const R = accR(acc);
		w.trend.acc = newAcc();
		if (R !== null) pushBounded(w.trend.windows, { cycle: w.totalCycles, R }, TREND_MAX_WINDOWS);
	}
	for (let a = 0; a < 3; a++) {
		const v = r[a];
		if (v !== null) spcAdd(w.spc[a], v);
	}
}

function requireBreakIn(w: FixtureState, reason: BreakInReason, at: string): void {
	w.breakIn = newBreakIn(true, reason, at);
	w.recent = [];
	w.trend = { acc: newAcc(), windows: [] };
	w.spc = newSpc();
}

function checkSettled(w: FixtureState, p: Policy, at: string): void {
	const b = w.breakIn;
	if (!b.required || b.cycles < p.breakInMinCycles || b.windows.length < 2) return;
	const last = b.windows[b.windows.length - 1];
	const prev = b.windows[b.windows.length - 2];
	if (Math.abs(last.R - prev.R) > p.settleTolerance_um + SETTLE_EPS) return;
	if (last.R > p.repeatabilitySpec_um) return;
	b.required = false;
	b.completedAt = at;
	b.completedAtCycle = w.totalCycles;
	// Service readings start afresh: the last settling readings are not a trend window.
	w.recent = [];
}

function statusOf(w: FixtureState): DerivedStatus {
	return w.onHold ? 'on-hold' : w.breakIn.required ? 'breaking-in' : 'in-service';
}

function cyclesOf(v: unknown, field: string, fallback: number | null): number {
	if (v === undefined && fallback !== null) return fallback;
	if (typeof v !== 'number' || !Number.isInteger(v) || v < 1) {
		throw new DomainInputError(field, `must be a whole number of at least 1 (got ${String(v)})`);
	}
	return v;
}

/**
 * The cycle of a break-in run (1-based) at which its reading `i` (0-based) of `m` was taken:
 * readings are spread evenly over the run's `cycles`, the last one at its final cycle.
 */
export function readingCycle(i: number, m: number, cycles: number): number {
	return Math.ceil(((i + 1) * cycles) / m);
}

/** Fold one event into a state this call owns (mutates `w`). */
function step(w: FixtureState, ev: FixtureEvent, p: Policy): void {
	const at = ev.occurredAt;
	switch (ev.kind) {
		case 'reseat': {
			const c = ev.payload.cycles;
			advance(
				w,
				c !== undefined && Number.isInteger(c) && c >= 1 ? c : cyclesOf(c, 'payload.cycles', 1)
			);
			if (ev.payload.readings !== undefined) {
				addReading(w, toStored(ev.payload.readings, 'payload.readings'), p);
			}
			checkSettled(w, p, at);
			break;
		}
		case 'break-in': {
			const c = cyclesOf(ev.payload.cycles, 'payload.cycles', null);
			const readings = ev.payload.readings ?? [];
			const m = readings.length;
			let done = 0;
			for (let i = 0; i < m; i++) {
				const at_i = readingCycle(i, m, c);
				advance(w, at_i - done);
				done = at_i;
				addReading(w, toStored(readings[i], `payload.readings[${i}]`), p);
			}
			advance(w, c - done);
			w.lastBreakInRunAt = at;
			checkSettled(w, p, at);
			break;
		}
		case 'cleaning':
			w.cyclesSinceCleaning = 0;
			w.lastCleaningAt = at;
			if (ev.payload.relubricated) {
				w.lastRelubricatedAt = at;
				requireBreakIn(w, 'relubricated', at);
			}
			break;
		case 'inspection': {
			const contacts = ev.payload.contacts ?? [];
			let grade: number | null = null;
			const seen = new Set<WearMark>();
			for (const c of contacts) {
				if (grade === null || c.grade > grade) grade = c.grade;
				for (const mark of c.marks ?? []) seen.add(mark);
			}
			w.cyclesSinceInspection = 0;
			w.lastInspectionAt = at;
			w.wear = {
				grade,
				verdict: ev.payload.verdict,
				marks: WEAR_MARKS.filter((mark) => seen.has(mark))
			};
			break;
		}
		case 'part-swap': {
			const parts = ev.payload.replaced ?? [];
			const whole = parts.includes('whole-fixture');
			const balls = whole || parts.includes('balls');
			const seats = whole || parts.includes('seats');
			w.cyclesSincePartSwap = 0;
			w.lastPartSwapAt = at;
			if (balls || seats) w.wear = { grade: null, verdict: null, marks: [] };
			if (balls && seats) w.cyclesSinceRenewal = 0;
			requireBreakIn(w, 'part-swap', at);
			break;
		}
		case 'move':
			w.lastMoveAt = at;
			break;
		case 'hold':
			w.onHold = true;
			w.holdReason = ev.payload.reason;
			break;
		case 'release':
			w.onHold = false;
			w.holdReason = null;
			break;
		case 'note':
			break;
		default: {
			const kind: never = ev;
			throw new DomainInputError(
				'event.kind',
				`unknown kind ${JSON.stringify((kind as { kind: unknown }).kind)}`
			);
		}
	}
	w.eventCount++;
	w.lastEventId = ev.id;
	w.lastEventAt = at;
	if (w.since === null) w.since = at;
	w.status = statusOf(w);
}

function checkEvent(ev: FixtureEvent): void {
	if (ev === null || typeof ev !== 'object')
		throw new DomainInputError('event', 'must be an object');
	if (typeof ev.id !== 'string' || ev.id === '')
		throw new DomainInputError('event.id', 'must be a non-empty string');
	// A cheap shape check ("2025-03-04T05:06:07…"); the schemas validate the time fully.
	const t = ev.occurredAt;
	if (typeof t !== 'string' || t.length < 19 || t.charCodeAt(4) !== 45 || t.charCodeAt(10) !== 84) {
		throw new DomainInputError('event.occurredAt', 'must be an ISO 8601 date and time');
	}
	if (ev.payload === null || typeof ev.payload !== 'object') {
		throw new DomainInputError('event.payload', 'must be an object');
	}
}

/** The fields applyEvent relies on, checked cheaply on every call. */
function checkFoldPolicy(p: Policy): void {
	if (
		p === null ||
		typeof p !== 'object' ||
		!Number.isInteger(p.repeatabilityWindow) ||
		p.repeatabilityWindow < 2 ||
		!Number.isInteger(p.settleWindow) ||
		p.settleWindow < 2 ||
		!(p.settleTolerance_um >= 0) ||
		!(p.repeatabilitySpec_um > 0) ||
		!(p.breakInMinCycles >= 0)
	) {
		assertPolicy(p);
	}
}

/** Copy exactly the parts of `s` that folding this event may change in place. */
function draftFor(s: FixtureState, ev: FixtureEvent): FixtureState {
	const w = copyTop(s);
	const kind: EventKind = ev.kind;
	if (kind === 'reseat' || kind === 'break-in') {
		const p = ev.payload as { readings?: unknown };
		const readings =
			kind === 'reseat'
				? p.readings !== undefined
				: ((p.readings as unknown[] | undefined)?.length ?? 0) > 0;
		// Cycles and completion change in place; windows and sums only when there are readings.
		if (readings) copyReadingParts(w, false);
		if (s.breakIn.required && w.breakIn === s.breakIn) w.breakIn = copyBreakIn(s.breakIn, false);
	}
	return w;
}

/**
 * Fold one event into a fixture's state and return the new state. `state` is not modified (the
 * result shares the parts the event leaves unchanged, so treat states as immutable values).
 */
export function applyEvent(state: FixtureState, event: FixtureEvent, policy: Policy): FixtureState {
	checkFoldPolicy(policy);
	checkEvent(event);
	const w = draftFor(state, event);
	step(w, event, policy);
	return w;
}

/**
 * Fold a batch of events into a copy of `state` (copied once, then updated in place: the fast path
 * for a sync batch). Same result as applying the events one by one.
 */
export function foldEvents(
	state: FixtureState,
	events: readonly FixtureEvent[],
	policy: Policy
): FixtureState {
	assertPolicy(policy);
	const w = cloneState(state);
	for (const ev of events) {
		checkEvent(ev);
		step(w, ev, policy);
	}
	return w;
}

/** State from scratch: fold the whole history into a fresh state. */
export function recompute(
	events: readonly FixtureEvent[],
	policy: Policy,
	options: InitialStateOptions = {}
): FixtureState {
	return foldEvents(initialState(options), events, policy);
}

/** Whether `event` happened before the last event folded into `state` (then recompute). */
export function isOutOfOrder(
	state: FixtureState,
	event: Pick<FixtureEvent, 'occurredAt'>
): boolean {
	return state.lastEventAt !== null && isoMs(event.occurredAt) < isoMs(state.lastEventAt);
}

/** Order for folding: by occurredAt, then by id so equal times fold the same way everywhere. */
export function compareEvents(
	a: Pick<FixtureEvent, 'occurredAt' | 'id'>,
	b: Pick<FixtureEvent, 'occurredAt' | 'id'>
): number {
	return isoMs(a.occurredAt) - isoMs(b.occurredAt) || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);
}

/** R = 4s per axis over the stored recent readings; the worst axis, or null with too few. */
export function recentRepeatability(state: FixtureState): {
	R: number;
	axis: 'x' | 'y' | 'z';
	n: number;
	perAxis: Partial<Record<'x' | 'y' | 'z', number>>;
} | null {
	const recent = state.recent;
	const perAxis: Partial<Record<'x' | 'y' | 'z', number>> = {};
	let bestR = -1;
	let bestAxis: 'x' | 'y' | 'z' = 'x';
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

/** Theil–Sen forecast of windowed R against cycles, or null before FORECAST_MIN_WINDOWS windows. */
export function fixtureForecast(
	state: FixtureState,
	policy: Policy
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

/** Significant figures for reasons: 1.8, 0.0123, 1230. */
function num(x: number): string {
	if (x === 0) return '0';
	return String(Number(x.toPrecision(3)));
}

/** Whole number with thousands separators: 12,345 (toLocaleString is slow on a hot path). */
function count(x: number): string {
	const n = Math.round(x);
	const digits = String(Math.abs(n));
	let out = '';
	for (let i = 0; i < digits.length; i++) {
		if (i > 0 && (digits.length - i) % 3 === 0) out += ',';
		out += digits[i];
	}
	return n < 0 ? `-${out}` : out;
}

function day(iso: string): string {
	return iso.slice(0, 10);
}

function intervalFlag(
	kind: 'cleaning-due' | 'inspection-due',
	what: string,
	cycles: number,
	last: string | null,
	s: FixtureState,
	intervalCycles: number | null,
	intervalDays: number | null,
	now: number
): Flag | null {
	const reasons: string[] = [];
	const ref = last ?? s.since;
	const origin = s.sinceIsCommissioning ? 'commissioning' : 'the first logged event';
	let days: number | null = null;
	if (intervalCycles !== null && cycles >= intervalCycles) {
		const since = last ? `the last ${what}` : `${origin}, with no ${what} logged`;
		reasons.push(
			`${count(cycles)} cycles since ${since} (interval ${count(intervalCycles)} cycles)`
		);
	}
	if (intervalDays !== null && ref !== null) {
		days = Math.floor((now - isoMs(ref)) / DAY_MS);
		if (days >= intervalDays) {
			const since = last
				? `the last ${what} on ${day(ref)}`
				: `${origin} on ${day(ref)}, with no ${what} logged`;
			reasons.push(`${count(days)} days since ${since} (interval ${count(intervalDays)} days)`);
		}
	}
	if (reasons.length === 0) return null;
	const noun = what.charAt(0).toUpperCase() + what.slice(1);
	return {
		kind,
		reason: `${noun} due: ${reasons.join('; ')}.`,
		figures: {
			cyclesSince: cycles,
			intervalCycles,
			daysSince: days,
			intervalDays,
			lastAt: last
		}
	};
}

const REASON_WORDS: Record<BreakInReason, string> = {
	new: 'New fixture',
	'part-swap': 'After a part swap',
	relubricated: 'After relubrication'
};

function breakInFlag(s: FixtureState, p: Policy): Flag {
	const b = s.breakIn;
	const last = b.windows.at(-1) ?? null;
	const prev = b.windows.at(-2) ?? null;
	const change = last && prev ? Math.abs(last.R - prev.R) : null;
	const parts = [`${count(b.cycles)} of at least ${count(p.breakInMinCycles)} cycles run`];
	if (!last) {
		parts.push(`no settling window yet (${p.settleWindow} seatings with readings each)`);
	} else if (change === null) {
		parts.push(
			`one settling window so far, R = ${num(last.R)} µm; a second is needed to judge settling`
		);
	} else {
		parts.push(
			`windowed R ${num(prev!.R)} → ${num(last.R)} µm (change ${num(change)} µm, tolerance ${num(p.settleTolerance_um)} µm)`
		);
	}
	if (last) parts.push(`spec ${num(p.repeatabilitySpec_um)} µm`);
	return {
		kind: 'break-in-due',
		reason: `${REASON_WORDS[b.reason ?? 'new']}: break-in required — ${parts.join('; ')}.`,
		figures: {
			reason: b.reason,
			cycles: b.cycles,
			minCycles: p.breakInMinCycles,
			windows: b.windows.length,
			lastWindowR_um: last?.R ?? null,
			previousWindowR_um: prev?.R ?? null,
			change_um: change,
			tolerance_um: p.settleTolerance_um,
			spec_um: p.repeatabilitySpec_um
		}
	};
}

function driftFlag(s: FixtureState): Flag | null {
	const found: {
		axis: number;
		rule: RunRule;
		index: number;
		limits: { center: number; sigma: number };
	}[] = [];
	for (let a = 0; a < 3; a++) {
		const ax = s.spc[a];
		if (ax.n < SPC_BASELINE_POINTS || ax.tail.length === 0) continue;
		const center = ax.sum / ax.n;
		const sigma = ax.sumMR / (ax.n - 1) / D2;
		const limits = { center, sigma, ucl: center + 3 * sigma, lcl: center - 3 * sigma };
		for (const hit of runRuleHits(ax.tail, limits, DRIFT_RULES)) {
			if (hit.index > ax.tail.length - DRIFT_MEMORY)
				found.push({ axis: a, rule: hit.rule, index: hit.index, limits });
		}
	}
	if (found.length === 0) return null;
	// Report the most recent hit; the count says how many there are.
	const top = found.reduce((x, y) =>
		y.index - s.spc[y.axis].tail.length > x.index - s.spc[x.axis].tail.length ? y : x
	);
	const ax = s.spc[top.axis];
	const readingNo = ax.count - ax.tail.length + top.index;
	const value = ax.tail[top.index - 1];
	return {
		kind: 'drift',
		reason:
			`Drift on the ${AXIS_NAMES[top.axis]} axis: ${RULE_TEXT[top.rule]} (rule ${top.rule}), ` +
			`ending at reading ${readingNo} since break-in, ${num(value)} µm ` +
			`(centre ${num(top.limits.center)} µm, σ ${num(top.limits.sigma)} µm from the first ${SPC_BASELINE_POINTS} readings).`,
		figures: {
			axis: AXIS_NAMES[top.axis],
			rule: top.rule,
			reading: readingNo,
			value_um: value,
			center_um: top.limits.center,
			sigma_um: top.limits.sigma,
			hits: found.length
		}
	};
}

/** The flags a state raises under a policy at time `now`, each with its reason and figures. */
export function evaluateFlags(state: FixtureState, policy: Policy, now: Date): Flag[] {
	assertPolicy(policy);
	if (!(now instanceof Date) || Number.isNaN(now.getTime())) {
		throw new DomainInputError('now', 'must be a valid Date');
	}
	const t = now.getTime();
	const p = policy;
	const s = state;
	const flags: Flag[] = [];
	if (s.breakIn.required) flags.push(breakInFlag(s, p));
	const cleaning = intervalFlag(
		'cleaning-due',
		'cleaning',
		s.cyclesSinceCleaning,
		s.lastCleaningAt,
		s,
		p.cleaningIntervalCycles,
		p.cleaningIntervalDays,
		t
	);
	if (cleaning) flags.push(cleaning);
	const inspection = intervalFlag(
		'inspection-due',
		'inspection',
		s.cyclesSinceInspection,
		s.lastInspectionAt,
		s,
		p.inspectionIntervalCycles,
		p.inspectionIntervalDays,
		t
	);
	if (inspection) flags.push(inspection);
	if (!s.breakIn.required) {
		if (s.recent.length >= p.repeatabilityWindow) {
			const r = recentRepeatability(s);
			if (r && r.R > p.repeatabilitySpec_um) {
				flags.push({
					kind: 'out-of-spec',
					reason: `R = ${num(r.R)} µm (${r.axis} axis) over the last ${r.n} seatings; spec ${num(p.repeatabilitySpec_um)} µm.`,
					figures: { R_um: r.R, axis: r.axis, seatings: r.n, spec_um: p.repeatabilitySpec_um }
				});
			}
		}
		const drift = driftFlag(s);
		if (drift) flags.push(drift);
	}
	const now_: string[] = [];
	const soon: string[] = [];
	const figures: Flag['figures'] = {};
	if (s.wear.grade !== null && s.wear.grade >= p.wearLimitGrade) {
		now_.push(`last inspection found wear grade ${s.wear.grade} (limit ${p.wearLimitGrade})`);
		figures.wearGrade = s.wear.grade;
		figures.wearLimitGrade = p.wearLimitGrade;
	}
	if (s.wear.verdict === 'replace') now_.push('the last inspection’s verdict was replace');
	if (p.ratedLifeCycles !== null) {
		figures.cyclesSinceRenewal = s.cyclesSinceRenewal;
		figures.ratedLifeCycles = p.ratedLifeCycles;
		const left = p.ratedLifeCycles - s.cyclesSinceRenewal;
		if (left <= 0) {
			now_.push(
				`${count(s.cyclesSinceRenewal)} cycles reached the rated life of ${count(p.ratedLifeCycles)}`
			);
		} else if (left <= p.forecastHorizonCycles) {
			soon.push(`${count(left)} cycles left of the rated life of ${count(p.ratedLifeCycles)}`);
		}
	}
	const f = fixtureForecast(s, p);
	if (
		f &&
		f.status === 'crossing' &&
		f.cyclesToSpec !== null &&
		f.cyclesToSpec <= p.forecastHorizonCycles
	) {
		figures.forecastCrossingCycle = f.crossingX;
		figures.forecastCyclesToSpec = f.cyclesToSpec;
		figures.forecastSlope_um_per_cycle = f.slope;
		figures.forecastHorizonCycles = p.forecastHorizonCycles;
		soon.push(
			f.cyclesToSpec <= 0
				? `the trend of R (Theil–Sen over the last ${f.windows} windows) has already reached the ${num(p.repeatabilitySpec_um)} µm spec`
				: `the trend of R (Theil–Sen over the last ${f.windows} windows) reaches the ${num(p.repeatabilitySpec_um)} µm spec at about cycle ${count(f.crossingX!)}, ${count(f.cyclesToSpec)} cycles from now (horizon ${count(p.forecastHorizonCycles)})`
		);
	}
	if (now_.length > 0) {
		flags.push({ kind: 'replace-now', reason: `Replace now: ${now_.join('; ')}.`, figures });
	} else if (soon.length > 0) {
		flags.push({ kind: 'replace-soon', reason: `Replace soon: ${soon.join('; ')}.`, figures });
	}
	return flags;
}
