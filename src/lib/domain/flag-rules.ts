/**
 * The flags a fixture's state raises under a policy, one rule per flag, each with its wording.
 * Every number a rule compares against is a policy field.
 *
 * - Break-in due: a break-in is required (see fold.ts for when, and when it completes).
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
import type { FlagKind } from './flag-kinds';
import {
	DRIFT_MEMORY,
	DRIFT_RULES,
	SPC_BASELINE_POINTS,
	type BreakInReason,
	type FixtureState
} from './fold-state';
import { AXIS_NAMES, fixtureForecast, recentRepeatability } from './fold-sums';
import { type Policy, assertPolicy } from './policy';
import { count, day, num } from './flag-words';
import { D2, RULE_TEXT, type RunRule, runRuleHits } from './spc';
import { isoMs } from './time';

/** A flag with its reason in words and the numbers behind it. */
export interface Flag {
	kind: FlagKind;
	reason: string;
	figures: Record<string, number | string | null>;
}

/** One rule: the flag it raises on this state at time `now` (ms), or null. */
export type FlagRule = (s: FixtureState, p: Policy, now: number) => Flag | null;

const DAY_MS = 86_400_000;

const BREAK_IN_REASON_WORDS: Record<BreakInReason, string> = {
	new: 'New fixture',
	'part-swap': 'After a part swap',
	relubricated: 'After relubrication'
};

/** Where the break-in stands against each completion condition, in words. */
function settlingWords(s: FixtureState, p: Policy): string[] {
	const b = s.breakIn;
	const last = b.windows.at(-1) ?? null;
	const prev = b.windows.at(-2) ?? null;
	const parts = [`${count(b.cycles)} of at least ${count(p.breakInMinCycles)} cycles run`];
	if (!last) {
		parts.push(`no settling window yet (${p.settleWindow} seatings with readings each)`);
	} else if (!prev) {
		parts.push(
			`one settling window so far, R = ${num(last.R)} µm; a second is needed to judge settling`
		);
	} else {
		parts.push(
			`windowed R ${num(prev.R)} → ${num(last.R)} µm (change ${num(Math.abs(last.R - prev.R))} µm, tolerance ${num(p.settleTolerance_um)} µm)`
		);
	}
	if (last) parts.push(`spec ${num(p.repeatabilitySpec_um)} µm`);
	return parts;
}

export const breakInDue: FlagRule = (s, p) => {
	const b = s.breakIn;
	if (!b.required) return null;
	const last = b.windows.at(-1) ?? null;
	const prev = b.windows.at(-2) ?? null;
	const reason = BREAK_IN_REASON_WORDS[b.reason ?? 'new'];
	return {
		kind: 'break-in-due',
		reason: `${reason}: break-in required — ${settlingWords(s, p).join('; ')}.`,
		figures: {
			reason: b.reason,
			cycles: b.cycles,
			minCycles: p.breakInMinCycles,
			windows: b.windows.length,
			lastWindowR_um: last?.R ?? null,
			previousWindowR_um: prev?.R ?? null,
			change_um: last && prev ? Math.abs(last.R - prev.R) : null,
			tolerance_um: p.settleTolerance_um,
			spec_um: p.repeatabilitySpec_um
		}
	};
};

/** What an interval rule reads from the state and the policy. */
interface Interval {
	kind: 'cleaning-due' | 'inspection-due';
	what: string;
	cycles: number;
	last: string | null;
	intervalCycles: number | null;
	intervalDays: number | null;
}

/** Due when either the cycles or the whole days since the last one reach the interval. */
function intervalFlag(i: Interval, s: FixtureState, now: number): Flag | null {
	const { what, cycles, last, intervalCycles, intervalDays } = i;
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
		kind: i.kind,
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

export const cleaningDue: FlagRule = (s, p, now) =>
	intervalFlag(
		{
			kind: 'cleaning-due',
			what: 'cleaning',
			cycles: s.cyclesSinceCleaning,
			last: s.lastCleaningAt,
			intervalCycles: p.cleaningIntervalCycles,
			intervalDays: p.cleaningIntervalDays
		},
		s,
		now
	);

export const inspectionDue: FlagRule = (s, p, now) =>
	intervalFlag(
		{
			kind: 'inspection-due',
			what: 'inspection',
			cycles: s.cyclesSinceInspection,
			last: s.lastInspectionAt,
			intervalCycles: p.inspectionIntervalCycles,
			intervalDays: p.inspectionIntervalDays
		},
		s,
		now
	);

export const outOfSpec: FlagRule = (s, p) => {
	if (s.breakIn.required || s.recent.length < p.repeatabilityWindow) return null;
	const r = recentRepeatability(s);
	if (!r || r.R <= p.repeatabilitySpec_um) return null;
	return {
		kind: 'out-of-spec',
		reason: `R = ${num(r.R)} µm (${r.axis} axis) over the last ${r.n} seatings; spec ${num(p.repeatabilitySpec_um)} µm.`,
		figures: { R_um: r.R, axis: r.axis, seatings: r.n, spec_um: p.repeatabilitySpec_um }
	};
};

interface DriftHit {
	axis: number;
	rule: RunRule;
	/** 1-based index in the axis's tail of the last point of the rule's window. */
	index: number;
	limits: { center: number; sigma: number };
}

/** Run-rule hits on each axis's tail against its baseline limits, within the last DRIFT_MEMORY. */
function driftHits(s: FixtureState): DriftHit[] {
	const found: DriftHit[] = [];
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
	return found;
}

export const drift: FlagRule = (s) => {
	if (s.breakIn.required) return null;
	const found = driftHits(s);
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
};

/** Replace-now and replace-soon reasons found so far, and the figures behind them. */
interface ReplaceFindings {
	now: string[];
	soon: string[];
	figures: Flag['figures'];
}

function wearFindings(s: FixtureState, p: Policy, r: ReplaceFindings): void {
	if (s.wear.grade !== null && s.wear.grade >= p.wearLimitGrade) {
		r.now.push(`last inspection found wear grade ${s.wear.grade} (limit ${p.wearLimitGrade})`);
		r.figures.wearGrade = s.wear.grade;
		r.figures.wearLimitGrade = p.wearLimitGrade;
	}
	if (s.wear.verdict === 'replace') r.now.push('the last inspection’s verdict was replace');
}

function ratedLifeFindings(s: FixtureState, p: Policy, r: ReplaceFindings): void {
	if (p.ratedLifeCycles === null) return;
	r.figures.cyclesSinceRenewal = s.cyclesSinceRenewal;
	r.figures.ratedLifeCycles = p.ratedLifeCycles;
	const left = p.ratedLifeCycles - s.cyclesSinceRenewal;
	if (left <= 0) {
		r.now.push(
			`${count(s.cyclesSinceRenewal)} cycles reached the rated life of ${count(p.ratedLifeCycles)}`
		);
	} else if (left <= p.forecastHorizonCycles) {
		r.soon.push(`${count(left)} cycles left of the rated life of ${count(p.ratedLifeCycles)}`);
	}
}

function forecastFindings(s: FixtureState, p: Policy, r: ReplaceFindings): void {
	const f = fixtureForecast(s, p);
	if (f === null || f.status !== 'crossing' || f.cyclesToSpec === null) return;
	if (!(f.cyclesToSpec <= p.forecastHorizonCycles)) return;
	r.figures.forecastCrossingCycle = f.crossingX;
	r.figures.forecastCyclesToSpec = f.cyclesToSpec;
	r.figures.forecastSlope_um_per_cycle = f.slope;
	r.figures.forecastHorizonCycles = p.forecastHorizonCycles;
	const trend = `the trend of R (Theil–Sen over the last ${f.windows} windows)`;
	const spec = `the ${num(p.repeatabilitySpec_um)} µm spec`;
	r.soon.push(
		f.cyclesToSpec <= 0
			? `${trend} has already reached ${spec}`
			: `${trend} reaches ${spec} at about cycle ${count(f.crossingX!)}, ${count(f.cyclesToSpec)} cycles from now (horizon ${count(p.forecastHorizonCycles)})`
	);
}

/** One flag for the contacts: replace now when anything says so, else replace soon. */
export const replaceNowOrSoon: FlagRule = (s, p) => {
	const r: ReplaceFindings = { now: [], soon: [], figures: {} };
	wearFindings(s, p, r);
	ratedLifeFindings(s, p, r);
	forecastFindings(s, p, r);
	if (r.now.length > 0) {
		return { kind: 'replace-now', reason: `Replace now: ${r.now.join('; ')}.`, figures: r.figures };
	}
	if (r.soon.length > 0) {
		return {
			kind: 'replace-soon',
			reason: `Replace soon: ${r.soon.join('; ')}.`,
			figures: r.figures
		};
	}
	return null;
};

/** The rules in the order their flags are listed. */
export const FLAG_RULES: readonly FlagRule[] = [
	breakInDue,
	cleaningDue,
	inspectionDue,
	outOfSpec,
	drift,
	replaceNowOrSoon
];

/** The flags a state raises under a policy at time `now`, each with its reason and figures. */
export function evaluateFlags(state: FixtureState, policy: Policy, now: Date): Flag[] {
	assertPolicy(policy);
	if (!(now instanceof Date) || Number.isNaN(now.getTime())) {
		throw new DomainInputError('now', 'must be a valid Date');
	}
	const t = now.getTime();
	const flags: Flag[] = [];
	for (const rule of FLAG_RULES) {
		const flag = rule(state, policy, t);
		if (flag) flags.push(flag);
	}
	return flags;
}
