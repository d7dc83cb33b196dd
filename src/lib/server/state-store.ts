/**
 * Reading and writing derived fixture health: the fixture facts a fold needs, effective policies
 * in bulk, the stored state rows with their open flags, and the flag writes. Shared by ingest
 * (event by event, ./ingest.ts) and by the health jobs (rebuild, calendar scan, policy change,
 * ./health.ts), so both start folds alike and write flags alike. The statements themselves are in
 * ./db/health-sql.ts.
 */
import { getTableColumns } from 'drizzle-orm';
import {
	initialState,
	recentRepeatability,
	type Flag,
	type FixtureState,
	type InitialStateOptions
} from '../domain/health';
import type { Policy } from '../domain/policy';
import { canonicalJson } from './canonical-json';
import { getPool } from './db';
import {
	selectPolicyRows,
	selectStoredStates,
	upsertFlagRows,
	upsertStateRows,
	type FlagRow,
	type HealthFixture,
	type Queryable
} from './db/health-sql';
import { policies } from './db/schema';
import { indexPolicyRows, policyValues, resolvePolicy } from './policies';

export type { FlagRow, HealthFixture, Queryable, StoredState } from './db/health-sql';

/**
 * Reads the fixtures' state rows with their open flags; with `lock`, FOR UPDATE in fixture id
 * order (see selectStoredStates).
 */
export const loadStoredStates = selectStoredStates;

const POLICY_COLUMNS = getTableColumns(policies);

/**
 * The effective policy of each fixture, from one read of the policy rows that bear on them.
 * Reads through `q`: a caller that holds a connection passes it, because asking the pool for
 * another while holding one is how a burst of syncs once wedged the server (every connection held
 * by a batch waiting for a second one). Without `q` the read takes its own pool connection.
 */
export async function policiesFor(
	fixtures: Iterable<HealthFixture>,
	q?: Queryable
): Promise<Map<number, Policy>> {
	const list = [...fixtures];
	const out = new Map<number, Policy>();
	if (!list.length) return out;
	const types = [...new Set(list.map((f) => f.type))];
	const classIds = [...new Set(list.flatMap((f) => (f.policyId ? [f.policyId] : [])))];
	const rows = await selectPolicyRows(q ?? getPool(), types, classIds);
	// Raw rows in the shape Drizzle would give (camelCase keys), so resolvePolicy reads them alike.
	const index = indexPolicyRows(
		rows.map(
			(r) =>
				Object.fromEntries(
					Object.entries(POLICY_COLUMNS).map(([key, column]) => [key, r[column.name]])
				) as typeof policies.$inferSelect
		)
	);
	for (const f of list) out.set(f.id, policyValues(resolvePolicy(f, index)));
	return out;
}

/**
 * How a fixture's state starts before its first event: from its commissioning date when known, and
 * needing a break-in (the domain's default for a fixture new to the register). Ingest and the
 * rebuild start from the same, or the rebuild would not reproduce the stored state.
 */
export function initialStateOptions(f: { commissionedOn: string | null }): InitialStateOptions {
	return { since: f.commissionedOn ? `${f.commissionedOn}T00:00:00.000Z` : null };
}

/** The state a fixture starts from before its first event (see initialStateOptions). */
export function initialStateFor(f: { commissionedOn: string | null }): FixtureState {
	return initialState(initialStateOptions(f));
}

const isoToDate = (iso: string | null) => (iso === null ? null : new Date(iso));

/** The fixture_state row for a state: the JSON and the columns copied out for filtering. */
export function stateColumns(fixtureId: number, s: FixtureState, now: Date): unknown[] {
	return [
		fixtureId,
		JSON.stringify(s),
		s.eventCount,
		s.totalCycles,
		s.cyclesSinceCleaning,
		s.cyclesSinceInspection,
		s.cyclesSincePartSwap,
		recentRepeatability(s)?.R ?? null,
		s.wear.grade,
		isoToDate(s.lastEventAt),
		isoToDate(s.lastCleaningAt),
		isoToDate(s.lastInspectionAt),
		now
	];
}

/** Writes fixtures' states (insert or replace) in one statement. */
export async function upsertStates(
	conn: Queryable,
	rows: { fixtureId: number; state: FixtureState }[],
	now: Date
): Promise<void> {
	await upsertStateRows(
		conn,
		rows.map((r) => stateColumns(r.fixtureId, r.state, now))
	);
}

/** How a fixture's open flags must change to match the flags its state calls for. */
export interface FlagDiff {
	raise: Flag[];
	/** Open flags whose reason or figures changed, with the new flag. */
	update: { open: FlagRow; flag: Flag }[];
	clear: FlagRow[];
}

/**
 * Compares open flags with `wanted` (only the kinds in `kinds`, all when omitted): kinds not open
 * are raised, open kinds no longer wanted are cleared, changed reasons or figures are updated.
 */
export function diffFlags(
	open: readonly FlagRow[],
	wanted: readonly Flag[],
	kinds?: readonly Flag['kind'][]
): FlagDiff {
	const inScope = (k: Flag['kind']) => !kinds || kinds.includes(k);
	const diff: FlagDiff = { raise: [], update: [], clear: [] };
	const openByKind = new Map(open.filter((f) => inScope(f.kind)).map((f) => [f.kind, f]));
	for (const flag of wanted) {
		if (!inScope(flag.kind)) continue;
		const o = openByKind.get(flag.kind);
		openByKind.delete(flag.kind);
		if (!o) diff.raise.push(flag);
		else if (
			o.reason !== flag.reason ||
			canonicalJson(o.figures ?? {}) !== canonicalJson(flag.figures)
		) {
			diff.update.push({ open: o, flag });
		}
	}
	diff.clear.push(...openByKind.values());
	return diff;
}

/**
 * The rows that carry out a diff at `now`. `byEvent` names the event behind a raise or a clear
 * (null when time or a policy change did it).
 */
export function flagRows(
	fixtureId: number,
	diff: FlagDiff,
	now: Date,
	byEvent: (kind: Flag['kind'], raised: boolean) => string | null = () => null
): FlagRow[] {
	return [
		...diff.raise.map((flag) => ({
			id: null,
			fixtureId,
			kind: flag.kind,
			reason: flag.reason,
			figures: flag.figures,
			raisedAt: now,
			raisedByEventId: byEvent(flag.kind, true),
			clearedAt: null,
			clearedByEventId: null
		})),
		...diff.update.map(({ open, flag }) => ({
			...open,
			reason: flag.reason,
			figures: flag.figures
		})),
		...diff.clear.map((open) => ({
			...open,
			clearedAt: now,
			clearedByEventId: byEvent(open.kind, false)
		}))
	];
}

/** Raises, updates and clears flags in one statement (new rows have no id yet). */
export const writeFlags = upsertFlagRows;
