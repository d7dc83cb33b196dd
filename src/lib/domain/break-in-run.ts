/**
 * A break-in run as a technician counts it on the phone: one entry per cycle, each with the
 * indicator readings of that seating or none. The verdict (settled or not, windows, cycles still
 * asked for) comes from folding the run as the 'break-in' event the server will receive through
 * the same applyEvent the server uses, starting from the fixture's break-in progress as the
 * register snapshot carries it — so the phone and the server cannot disagree on the rule.
 */
import {
	type EventPayloadInputs,
	type FixtureEvent,
	MAX_CYCLES_PER_EVENT,
	MAX_READINGS_PER_BREAK_IN
} from './events';
import { DomainInputError } from './errors';
import { type BreakInProgress, type WindowPoint, applyEvent, initialState } from './health';
import { DEFAULT_POLICY, type Policy } from './policy';
import { type Reading, meanAndS } from './repeatability';

/** The break-in progress a device knows for a fixture (see the register snapshot). */
export type BreakInStart = Pick<
	BreakInProgress,
	'required' | 'reason' | 'cycles' | 'acc' | 'windows'
>;

/** The policy fields the settle rule uses. */
export type SettleRule = Pick<
	Policy,
	'repeatabilitySpec_um' | 'breakInMinCycles' | 'settleWindow' | 'settleTolerance_um'
>;

/** One counted cycle: the readings of that seating (µm), or null when none were taken. */
export type RunCycle = Reading | null;

/** Where a run stands under the settle rule, fixture progress before the run included. */
export interface RunVerdict {
	/** False when the fixture needs no break-in (the run is then logged as cycles and readings). */
	required: boolean;
	/** The settle rule is met (always true when no break-in is required). */
	settled: boolean;
	/** Cycles since the break-in requirement began, this run included. */
	cycles: number;
	/** Cycles of the requirement run before this run. */
	cyclesBefore: number;
	/** Completed settling windows (R of each, at the requirement's cycle where it ended). */
	windows: WindowPoint[];
	/** Readings in the settling window not yet complete. */
	readingsInWindow: number;
	/** At least this many more cycles before the rule can be met (each with a reading if short of windows). */
	moreCycles: number;
	/** How many of `moreCycles` must carry readings to complete the settling windows the rule needs. */
	moreReadings: number;
}

/** Progress of a fixture whose break-in just became required (no cycles, no windows). */
export function freshBreakIn(): BreakInStart {
	const b = initialState().breakIn;
	return { required: true, reason: b.reason, cycles: 0, acc: b.acc, windows: [] };
}

/** The run as the payload of one 'break-in' event: cycles, readings oldest first, note. */
export function runPayload(
	cycles: readonly RunCycle[],
	note?: string
): EventPayloadInputs['break-in'] {
	const readings = cycles.filter((c): c is Reading => c !== null).map((r) => ({ ...r }));
	const text = note?.trim();
	return { cycles: cycles.length, readings, ...(text ? { note: text } : {}) };
}

// Any valid time: the fold's verdict does not depend on when the run happened.
const PREVIEW_AT = '2000-01-01T00:00:00.000Z';

function stateFrom(start: BreakInStart) {
	const s = initialState({ breakInRequired: start.required });
	s.breakIn = {
		...s.breakIn,
		required: start.required,
		reason: start.reason,
		cycles: start.cycles,
		acc: start.acc.slice(),
		windows: start.windows.slice()
	};
	return s;
}

/**
 * The progress after events the server has not folded yet (this device's unsent outbox entries
 * for the fixture, oldest first): an earlier run or a part swap logged offline counts at once.
 */
export function progressAfter(
	start: BreakInStart,
	rule: SettleRule,
	events: readonly FixtureEvent[]
): BreakInStart {
	const policy: Policy = { ...DEFAULT_POLICY, ...rule };
	let s = stateFrom(start);
	for (const ev of events) s = applyEvent(s, ev, policy);
	const b = s.breakIn;
	return {
		required: b.required,
		reason: b.reason,
		cycles: b.cycles,
		acc: b.acc,
		windows: b.windows
	};
}

/** The verdict of the settle rule on a run so far, from the fixture's progress before it. */
export function runVerdict(
	start: BreakInStart,
	rule: SettleRule,
	cycles: readonly RunCycle[]
): RunVerdict {
	if (start === null || typeof start !== 'object' || !Array.isArray(start.acc)) {
		throw new DomainInputError(
			'start',
			'must be the break-in progress { required, cycles, acc, windows }'
		);
	}
	const policy: Policy = { ...DEFAULT_POLICY, ...rule };
	let s = stateFrom(start);
	if (cycles.length > 0) {
		const payload = runPayload(cycles);
		s = applyEvent(s, { id: 'run', kind: 'break-in', occurredAt: PREVIEW_AT, payload }, policy);
	}
	const b = s.breakIn;
	const base = {
		cyclesBefore: start.cycles,
		cycles: start.required ? start.cycles + cycles.length : cycles.length
	};
	if (!start.required) {
		const none = { windows: [], readingsInWindow: 0, moreCycles: 0, moreReadings: 0 };
		return { required: false, settled: true, ...base, ...none };
	}
	if (!b.required) {
		// Settling leaves the windows in place (later readings go to the service trend).
		const done = { readingsInWindow: b.acc[0], moreCycles: 0, moreReadings: 0 };
		return { required: true, settled: true, ...base, windows: b.windows, ...done };
	}
	const toMinimum = Math.max(0, policy.breakInMinCycles - b.cycles);
	// Would the windows already pass once the minimum is reached? Ask the same fold.
	const padded =
		toMinimum > 0 &&
		!applyEvent(
			s,
			{ id: 'pad', kind: 'break-in', occurredAt: PREVIEW_AT, payload: { cycles: toMinimum } },
			policy
		).breakIn.required;
	const inWindow = b.acc[0];
	const moreReadings = padded
		? 0
		: (b.windows.length === 0 ? 2 : 1) * policy.settleWindow - inWindow;
	return {
		required: true,
		settled: false,
		...base,
		windows: b.windows,
		readingsInWindow: inWindow,
		moreCycles: Math.max(toMinimum, moreReadings),
		moreReadings
	};
}

/** One point of the rolling repeatability curve. */
export interface RollingPoint {
	/** Cycle of the run (1-based) at which the window's last reading was taken. */
	cycle: number;
	/** Largest per-axis sample standard deviation over the window (µm). */
	s: number;
	/** R = 4s (µm), ISO 230-2 style. */
	R: number;
}

/**
 * Rolling repeatability over the run's readings: for each reading from the window-th on, the
 * worst per-axis s of the last `window` readings (axes with fewer than two values in the window
 * are skipped) and R = 4s. Cycles without readings are passed over.
 */
export function rollingRepeatability(cycles: readonly RunCycle[], window: number): RollingPoint[] {
	if (!Number.isInteger(window) || window < 2) {
		throw new DomainInputError('window', `must be a whole number of at least 2 (got ${window})`);
	}
	const taken: { cycle: number; r: Reading }[] = [];
	cycles.forEach((r, i) => {
		if (r !== null) taken.push({ cycle: i + 1, r });
	});
	const out: RollingPoint[] = [];
	for (let end = window; end <= taken.length; end++) {
		const slice = taken.slice(end - window, end);
		let worst: number | null = null;
		for (const key of ['dx', 'dy', 'dz'] as const) {
			const values = slice.map((t) => t.r[key]).filter((v): v is number => typeof v === 'number');
			if (values.length < 2) continue;
			const { s } = meanAndS(values);
			if (worst === null || s > worst) worst = s;
		}
		if (worst !== null) out.push({ cycle: slice[slice.length - 1].cycle, s: worst, R: 4 * worst });
	}
	return out;
}

/**
 * Why one more cycle (with readings, or without) cannot join this run, or null when it can: one
 * 'break-in' event holds at most MAX_CYCLES_PER_EVENT cycles and MAX_READINGS_PER_BREAK_IN readings.
 */
export function countRefusal(cycles: readonly RunCycle[], withReading: boolean): string | null {
	if (cycles.length >= MAX_CYCLES_PER_EVENT) {
		return `This run has ${MAX_CYCLES_PER_EVENT} cycles, the most one run can log: finish it and start another.`;
	}
	if (withReading && cycles.filter((c) => c !== null).length >= MAX_READINGS_PER_BREAK_IN) {
		return `This run has ${MAX_READINGS_PER_BREAK_IN} readings, the most one run can log: count without readings, or finish it and start another.`;
	}
	return null;
}
