/**
 * The fold: a fixture's state (fold-state.ts) updated one event at a time.
 *
 * Events are folded in the order given. The server folds them in (occurredAt, id) order
 * (compareEvents); when a late event from an offline phone sorts before the state's last event, it
 * refolds the fixture's whole history instead (recompute). Window sizes are part of the state, so a
 * policy change re-evaluates flags at once but shapes only the events folded after it, until the
 * states are rebuilt (`npm run state:rebuild -- --fix`).
 *
 * Break-in is required for a new fixture and after any part swap or a cleaning that relubricated the
 * contacts. It is complete once it has run breakInMinCycles cycles and the last two settling windows
 * (settleWindow seatings with readings each) differ in R by at most settleTolerance_um and the last
 * is within spec. A fixture without readings cannot show it has settled. R of a set of seatings is
 * the largest per-axis R = 4s (ISO 230-2 style) over the measured axes.
 */
import { DomainInputError } from './errors';
import type { EventKind, FixtureEvent } from './events';
import type { DerivedStatus } from './fixture-status';
import {
	copyBreakIn,
	copyReadingParts,
	copyTop,
	cloneState,
	initialState,
	newAcc,
	newBreakIn,
	newSpc,
	type BreakInReason,
	type FixtureState,
	type InitialStateOptions,
	type StoredReading
} from './fold-state';
import { addReading, advance } from './fold-sums';
import { type Policy, assertPolicy } from './policy';
import { isoMs } from './time';
import { type WearMark, WEAR_MARKS } from './wear';

// Differences of windowed R at the tolerance should not fail on binary rounding.
const SETTLE_EPS = 1e-9;

type EventOf<K extends EventKind> = Extract<FixtureEvent, { kind: K }>;

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

function cyclesOf(v: unknown, field: string, fallback: number | null): number {
	if (v === undefined && fallback !== null) return fallback;
	if (typeof v !== 'number' || !Number.isInteger(v) || v < 1) {
		throw new DomainInputError(field, `must be a whole number of at least 1 (got ${String(v)})`);
	}
	return v;
}

/** Start a new break-in: readings taken before it describe other contacts, so they go. */
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

/**
 * The cycle of a break-in run (1-based) at which its reading `i` (0-based) of `m` was taken:
 * readings are spread evenly over the run's `cycles`, the last one at its final cycle.
 */
export function readingCycle(i: number, m: number, cycles: number): number {
	return Math.ceil(((i + 1) * cycles) / m);
}

function foldReseat(w: FixtureState, ev: EventOf<'reseat'>, p: Policy): void {
	const c = ev.payload.cycles;
	// The common case (a whole number) skips cyclesOf's checks.
	advance(
		w,
		c !== undefined && Number.isInteger(c) && c >= 1 ? c : cyclesOf(c, 'payload.cycles', 1)
	);
	if (ev.payload.readings !== undefined) {
		addReading(w, toStored(ev.payload.readings, 'payload.readings'), p);
	}
	checkSettled(w, p, ev.occurredAt);
}

function foldBreakInRun(w: FixtureState, ev: EventOf<'break-in'>, p: Policy): void {
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
	w.lastBreakInRunAt = ev.occurredAt;
	checkSettled(w, p, ev.occurredAt);
}

function foldCleaning(w: FixtureState, ev: EventOf<'cleaning'>): void {
	const at = ev.occurredAt;
	w.cyclesSinceCleaning = 0;
	w.lastCleaningAt = at;
	if (ev.payload.relubricated) {
		w.lastRelubricatedAt = at;
		requireBreakIn(w, 'relubricated', at);
	}
}

/** The wear record is the last inspection's: its worst grade, its verdict, the marks it saw. */
function foldInspection(w: FixtureState, ev: EventOf<'inspection'>): void {
	const contacts = ev.payload.contacts ?? [];
	let grade: number | null = null;
	const seen = new Set<WearMark>();
	for (const c of contacts) {
		if (grade === null || c.grade > grade) grade = c.grade;
		for (const mark of c.marks ?? []) seen.add(mark);
	}
	w.cyclesSinceInspection = 0;
	w.lastInspectionAt = ev.occurredAt;
	w.wear = {
		grade,
		verdict: ev.payload.verdict,
		marks: WEAR_MARKS.filter((mark) => seen.has(mark))
	};
}

/**
 * New balls or seats clear the wear record; only both together (or the whole fixture) renew the
 * rated life. Any swap calls for a break-in.
 */
function foldPartSwap(w: FixtureState, ev: EventOf<'part-swap'>): void {
	const at = ev.occurredAt;
	const parts = ev.payload.replaced ?? [];
	const whole = parts.includes('whole-fixture');
	const balls = whole || parts.includes('balls');
	const seats = whole || parts.includes('seats');
	w.cyclesSincePartSwap = 0;
	w.lastPartSwapAt = at;
	if (balls || seats) w.wear = { grade: null, verdict: null, marks: [] };
	if (balls && seats) w.cyclesSinceRenewal = 0;
	requireBreakIn(w, 'part-swap', at);
}

/** Fold one event into a state this call owns (mutates `w`). */
function step(w: FixtureState, ev: FixtureEvent, p: Policy): void {
	switch (ev.kind) {
		case 'reseat':
			foldReseat(w, ev, p);
			break;
		case 'break-in':
			foldBreakInRun(w, ev, p);
			break;
		case 'cleaning':
			foldCleaning(w, ev);
			break;
		case 'inspection':
			foldInspection(w, ev);
			break;
		case 'part-swap':
			foldPartSwap(w, ev);
			break;
		case 'move':
			w.lastMoveAt = ev.occurredAt;
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
	w.lastEventAt = ev.occurredAt;
	if (w.since === null) w.since = ev.occurredAt;
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

/**
 * The fields applyEvent relies on, checked cheaply on every call; the full assertPolicy runs only
 * when one of them looks wrong (it then throws with the field's name).
 */
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
