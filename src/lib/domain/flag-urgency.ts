/**
 * How urgent each kind of health flag is, for the fleet board: a part that must be replaced now
 * comes before a fixture that is merely due for cleaning. Nestmark's own ordering: what stops work
 * or spoils parts first, then what will soon, then the routine work that falls due.
 */
import type { FlagKind } from './flag-kinds';

/** Flag kinds, most urgent first. */
export const FLAG_URGENCY = [
	'replace-now',
	'out-of-spec',
	'drift',
	'replace-soon',
	'break-in-due',
	'inspection-due',
	'cleaning-due'
] as const satisfies readonly FlagKind[];

/** The kinds that are routine work falling due (a technician's list), most urgent first. */
export const DUE_WORK_KINDS = [
	'break-in-due',
	'inspection-due',
	'cleaning-due'
] as const satisfies readonly FlagKind[];

/** 0 for the most urgent kind, counting up. */
export function urgencyRank(kind: FlagKind): number {
	return (FLAG_URGENCY as readonly FlagKind[]).indexOf(kind);
}

/** Sorts flags most urgent first, then the oldest first (ISO `raisedAt`), without changing `flags`. */
export function byUrgency<T extends { kind: FlagKind; raisedAt: string }>(
	flags: readonly T[]
): T[] {
	return [...flags].sort(
		(a, b) => urgencyRank(a.kind) - urgencyRank(b.kind) || a.raisedAt.localeCompare(b.raisedAt)
	);
}
