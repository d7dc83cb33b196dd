/**
 * Where a run starts from on this device: the fixture's break-in progress and settle rule from the
 * register copy, advanced by this fixture's outbox entries the server has not folded yet.
 */
import type { OutboxEntry } from '$lib/client/outbox';
import {
	freshBreakIn,
	progressAfter,
	type BreakInStart,
	type SettleRule
} from '$lib/domain/break-in-run';
import { DEFAULT_POLICY } from '$lib/domain/policy';
import type { FixtureEvent } from '$lib/schemas/events';
import type { SnapshotFixture } from '$lib/schemas/register-snapshot';

/** The progress before the run, the rule, and whether the device knew the progress. */
export interface RunStart {
	progress: BreakInStart;
	rule: SettleRule;
	/** False with a register copy older than break-in progress: counted from zero, said so. */
	known: boolean;
}

/** The start of a run on `fixture`, after the device's unsent `entries` (oldest first). */
export function runStart(fixture: SnapshotFixture, entries: readonly OutboxEntry[]): RunStart {
	const b = fixture.breakIn;
	const rule: SettleRule = b?.rule ?? {
		repeatabilitySpec_um:
			fixture.policy.repeatabilitySpec_um ?? DEFAULT_POLICY.repeatabilitySpec_um,
		breakInMinCycles: fixture.policy.breakInMinCycles ?? DEFAULT_POLICY.breakInMinCycles,
		settleWindow: DEFAULT_POLICY.settleWindow,
		settleTolerance_um: DEFAULT_POLICY.settleTolerance_um
	};
	const base: BreakInStart = b ?? {
		...freshBreakIn(),
		required:
			fixture.status === 'breaking-in' || fixture.flags.some((f) => f.kind === 'break-in-due')
	};
	const events = entries
		.filter((e) => e.state !== 'rejected')
		.map(
			(e) =>
				({ id: e.id, kind: e.kind, occurredAt: e.occurredAt, payload: e.payload }) as FixtureEvent
		);
	try {
		return { progress: progressAfter(base, rule, events), rule, known: b !== undefined };
	} catch {
		// An entry the fold cannot read will be refused by the server too; judge without it.
		return { progress: base, rule, known: b !== undefined };
	}
}
