/**
 * The audit report's judgements and words, pure: how a break-in run ended (from the break-in-due
 * flags the fold wrote, so the report says what the register decided at the time), the final
 * rolling R of a run against its spec, how long a flag had been open, and what cleared a flag.
 */
import { DAY_MS } from './report-range';
import { num } from './flag-words';

/** How a break-in run ended, as the register judged it when the run arrived. */
export type RunOutcome = 'settled' | 'not-settled' | 'not-required';

/** A break-in-due flag of the run's fixture, times in ms (server times, as the fold wrote them). */
export interface BreakInFlagSpan {
	raisedAtMs: number;
	clearedAtMs: number | null;
	clearedByEventId: string | null;
}

/**
 * The outcome of a run: "settled" when its arrival cleared the fixture's break-in-due flag (the
 * settle rule was met), "not-settled" when a break-in-due flag was open at its arrival and stayed
 * open, "not-required" when none was open (a run logged on a fixture that needed no break-in).
 */
export function runOutcome(
	run: { id: string; receivedAtMs: number },
	flags: readonly BreakInFlagSpan[]
): RunOutcome {
	if (flags.some((f) => f.clearedByEventId === run.id)) return 'settled';
	const open = flags.some(
		(f) =>
			f.raisedAtMs <= run.receivedAtMs &&
			(f.clearedAtMs === null || f.clearedAtMs > run.receivedAtMs)
	);
	return open ? 'not-settled' : 'not-required';
}

/** The outcome in words. */
export const RUN_OUTCOME_WORDS: Record<RunOutcome, string> = {
	settled: 'Settled: break-in complete',
	'not-settled': 'Not settled yet',
	'not-required': 'No break-in was due (check run)'
};

/** "0.42 µm of 1 µm spec", or why a run has no final R. */
export function finalRWords(
	finalR_um: number | null,
	spec_um: number,
	readings: number,
	window: number
): string {
	if (finalR_um === null) {
		return readings === 0
			? 'no readings'
			: `${readings} ${readings === 1 ? 'reading' : 'readings'}, too few for a window of ${window}`;
	}
	const within = finalR_um <= spec_um ? 'within' : 'over';
	return `${num(finalR_um)} µm (${within} the ${num(spec_um)} µm spec)`;
}

/** Whole days from `fromMs` to `toMs` (0 when less than a day). */
export function wholeDays(fromMs: number, toMs: number): number {
	return Math.max(0, Math.floor((toMs - fromMs) / DAY_MS));
}

/** "open 12 days" / "open less than a day" at `atMs`, for a flag raised at `raisedAtMs`. */
export function openForWords(raisedAtMs: number, atMs: number): string {
	const d = wholeDays(raisedAtMs, atMs);
	return d === 0 ? 'open less than a day' : `open ${d} ${d === 1 ? 'day' : 'days'}`;
}

/** Event kinds as the report names the entry that cleared a flag. */
const CLEARING_ENTRY: Record<string, string> = {
	reseat: 'a reseat',
	cleaning: 'a cleaning',
	inspection: 'an inspection',
	'break-in': 'a break-in run',
	'part-swap': 'a part swap',
	move: 'a move',
	hold: 'a hold',
	release: 'a release',
	note: 'a note'
};

/**
 * What cleared a flag: the entry whose arrival made the rule stop applying, and who logged it;
 * without an entry, the register judged it again (a policy change or a rebuild).
 */
export function clearedByWords(entry: { kind: string; by: string } | null): string {
	if (!entry) return 'Cleared when the register judged it again (a policy change or a rebuild)';
	return `Cleared by ${CLEARING_ENTRY[entry.kind] ?? `an entry (${entry.kind})`} logged by ${entry.by}`;
}
