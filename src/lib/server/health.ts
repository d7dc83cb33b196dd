/**
 * Fixture health outside the sync path: the rebuild check (stored state against a fold of the
 * whole history), the calendar scan (flags that become due with time alone) and re-evaluation
 * after a policy change. Ingest (./ingest.ts) keeps states and flags current event by event; this
 * module only re-derives flags from stored states, or states from stored events.
 *
 * Decisions worth knowing:
 * - Same fold as ingest: history in (occurredAt, id) order by the domain's compareEvents, from
 *   ingest's initial state for the fixture, under the fixture's effective policy.
 * - Flags changed here have no event behind them: raised or cleared with a null event id, at `now`.
 * - Work is done in chunks of fixtures, one transaction per chunk, locking the state rows in id
 *   order like ingest does, so a scan and a sync batch wait for each other instead of deadlocking.
 */
import type { PoolConnection } from 'mysql2/promise';
import type { Policy } from '../domain/policy';
import {
	compareEvents,
	evaluateFlags,
	recompute,
	type Flag,
	type FixtureState
} from '../domain/health';
import type { FixtureEvent } from '../schemas/events';
import { canonicalJson } from './canonical-json';
import { getPool } from './db';
import {
	selectFixturesById,
	selectHistories,
	selectStatedFixtureIds,
	type Queryable
} from './db/health-sql';
import { inTransaction } from './db/transaction';
import { linkRaisedFlags } from './ingest-work-orders';
import {
	diffFlags,
	flagRows,
	initialStateFor,
	initialStateOptions,
	loadStoredStates,
	policiesFor,
	upsertStates,
	writeFlags,
	type HealthFixture
} from './state-store';

/** Fixtures handled per transaction. */
const CHUNK = 200;

/** Flags that can become due with the passing of time alone. */
export const CALENDAR_FLAG_KINDS: readonly Flag['kind'][] = ['cleaning-due', 'inspection-due'];

/** Fixtures by id (all of them when `ids` is omitted), in id order. */
export function loadHealthFixtures(
	ids?: number[],
	q: Queryable = getPool()
): Promise<HealthFixture[]> {
	return selectFixturesById(q, ids);
}

/** The histories of some fixtures in folding order (the domain's compareEvents). */
export async function loadHistories(
	conn: Queryable,
	ids: number[]
): Promise<Map<number, FixtureEvent[]>> {
	const out = await selectHistories(conn, ids);
	for (const list of out.values()) list.sort(compareEvents);
	return out;
}

/** What re-evaluating one fixture's flags changed. */
export interface FlagChange {
	fixtureId: number;
	raised: Flag['kind'][];
	cleared: Flag['kind'][];
	updated: Flag['kind'][];
}

function flagChange(fixtureId: number, diff: ReturnType<typeof diffFlags>): FlagChange {
	return {
		fixtureId,
		raised: diff.raise.map((f) => f.kind),
		cleared: diff.clear.map((f) => f.kind),
		updated: diff.update.map((u) => u.flag.kind)
	};
}

/**
 * The health jobs' transactions are not retried (a job reports what it did; a conflict is rare
 * and the next run picks it up). Everything inside goes through the transaction's connection:
 * what needs the pool (fixtures, policies) is read before, so no connection is held while
 * waiting for another.
 */
const ONCE = { attempts: 1 };

function chunks<T>(list: T[], size = CHUNK): T[][] {
	const out: T[][] = [];
	for (let i = 0; i < list.length; i += size) out.push(list.slice(i, i + size));
	return out;
}

/** Options of reevaluateFlags. */
export interface ReevaluateOptions {
	/** The clock for calendar rules and the flag times; default now. */
	now?: Date;
	/** Only these flag kinds are raised or cleared; default all. */
	kinds?: readonly Flag['kind'][];
}

/**
 * Re-evaluates the flags of fixtures from their stored states under their current effective
 * policies (one transaction per chunk). Fixtures with no logged event have no state yet and are
 * left alone: their flags start with their first event. Returns the fixtures whose flags changed.
 */
export async function reevaluateFlags(
	fixtureIds: number[],
	options: ReevaluateOptions = {}
): Promise<FlagChange[]> {
	const now = options.now ?? new Date();
	const changes: FlagChange[] = [];
	const ids = [...new Set(fixtureIds)].sort((a, b) => a - b);
	for (const chunk of chunks(ids)) {
		const fixtures = await loadHealthFixtures(chunk);
		const policies = await policiesFor(fixtures);
		const changed = await inTransaction(
			(conn) => reevaluateOn(conn, fixtures, policies, { ...options, now }),
			ONCE
		);
		changes.push(...changed);
	}
	return changes;
}

/**
 * reevaluateFlags for some fixtures inside a transaction the caller holds, their policies already
 * read; locks their state rows.
 */
export async function reevaluateOn(
	conn: PoolConnection,
	fixtures: HealthFixture[],
	policies: Map<number, Policy>,
	options: ReevaluateOptions & { now: Date }
): Promise<FlagChange[]> {
	const { now } = options;
	const changes: FlagChange[] = [];
	const stored = await loadStoredStates(
		conn,
		fixtures.map((f) => f.id),
		true
	);
	const writes = [];
	for (const f of fixtures) {
		const entry = stored.get(f.id);
		if (!entry) continue;
		const wanted = evaluateFlags(entry.state, policies.get(f.id)!, now);
		const diff = diffFlags(entry.openFlags, wanted, options.kinds);
		if (!diff.raise.length && !diff.update.length && !diff.clear.length) continue;
		changes.push(flagChange(f.id, diff));
		writes.push(...flagRows(f.id, diff, now));
	}
	await writeFlags(conn, writes);
	// A calendar flag raised while an order that answers it is open joins that order.
	await linkRaisedFlags(
		conn,
		changes.flatMap((c) => c.raised.map((kind) => ({ fixtureId: c.fixtureId, kind }))),
		null,
		now
	);
	return changes;
}

/**
 * Raises and clears the calendar flags (cleaning or inspection due by days) of every fixture
 * with a state, at `now`. Run by the server's scheduled job and on reads of health.
 */
export async function evaluateDueFlags(
	now: Date = new Date(),
	fixtureIds?: number[]
): Promise<FlagChange[]> {
	const ids = fixtureIds ?? (await selectStatedFixtureIds(getPool()));
	return reevaluateFlags(ids, { now, kinds: CALENDAR_FLAG_KINDS });
}

/* ------------------------------------------------------------------------------------------ */
/* Rebuild                                                                                    */

/** One fixture whose stored state differed from a fold of its history. */
export interface StateDifference {
	fixtureId: number;
	code: string;
	/** Top-level fields of the state that differ ("(no stored state)" when the row is missing). */
	fields: string[];
}

/** What a rebuild found (and, with fix, wrote). */
export interface RebuildReport {
	checked: number;
	differing: StateDifference[];
	fixed: boolean;
}

/** Top-level fields whose JSON differs; the stored side is compared after a JSON round trip. */
export function differingFields(stored: unknown, rebuilt: unknown): string[] {
	const a = JSON.parse(JSON.stringify(stored ?? {})) as Record<string, unknown>;
	const b = JSON.parse(JSON.stringify(rebuilt ?? {})) as Record<string, unknown>;
	const keys = [...new Set([...Object.keys(a), ...Object.keys(b)])].sort();
	return keys.filter((k) => canonicalJson(a[k] ?? null) !== canonicalJson(b[k] ?? null));
}

/**
 * Recomputes every fixture's state (or those in `ids`) from its full history and compares it with
 * the stored one.
 * With `fix`, writes the recomputed states of the fixtures that differed and re-evaluates their
 * flags, in the same transaction per chunk.
 */
export async function rebuildStates(
	options: { fix?: boolean; now?: Date; ids?: number[] } = {}
): Promise<RebuildReport> {
	const now = options.now ?? new Date();
	const fix = !!options.fix;
	const all = await loadHealthFixtures(options.ids);
	const report: RebuildReport = { checked: 0, differing: [], fixed: fix };
	for (const fixtures of chunks(all)) {
		const policies = await policiesFor(fixtures);
		const differing = await inTransaction(
			(conn) => rebuildOn(conn, fixtures, policies, { fix, now }),
			ONCE
		);
		report.checked += fixtures.length;
		report.differing.push(...differing);
	}
	return report;
}

/**
 * rebuildStates for some fixtures inside a transaction the caller holds, their policies already
 * read. Returns the fixtures whose stored state differed (and, with fix, was rewritten with
 * their flags re-evaluated).
 */
export async function rebuildOn(
	conn: PoolConnection,
	fixtures: HealthFixture[],
	policies: Map<number, Policy>,
	options: { fix: boolean; now: Date }
): Promise<StateDifference[]> {
	const { fix, now } = options;
	const ids = fixtures.map((f) => f.id);
	const stored = await loadStoredStates(conn, ids, fix);
	const histories = await loadHistories(conn, ids);
	const differing: StateDifference[] = [];
	const toWrite: { f: HealthFixture; state: FixtureState }[] = [];
	for (const f of fixtures) {
		const history = histories.get(f.id)!;
		const state = stored.get(f.id)?.state ?? null;
		// No events and no state: nothing was ever folded, nothing to compare.
		if (!history.length && !state) continue;
		const rebuilt = history.length
			? recompute(history, policies.get(f.id)!, initialStateOptions(f))
			: initialStateFor(f);
		const fields = state ? differingFields(state, rebuilt) : ['(no stored state)'];
		if (!fields.length) continue;
		differing.push({ fixtureId: f.id, code: f.code, fields });
		toWrite.push({ f, state: rebuilt });
	}
	if (!fix || !toWrite.length) return differing;
	await upsertStates(
		conn,
		toWrite.map(({ f, state }) => ({ fixtureId: f.id, state })),
		now
	);
	const writes = toWrite.flatMap(({ f, state }) => {
		const wanted = evaluateFlags(state, policies.get(f.id)!, now);
		return flagRows(f.id, diffFlags(stored.get(f.id)?.openFlags ?? [], wanted), now);
	});
	await writeFlags(conn, writes);
	return differing;
}

/**
 * Refolds one fixture's state from its whole history and re-evaluates its flags, inside a
 * transaction the caller holds (a register change to what the fold or the policy depends on).
 * Reads the fixture and its policy through `conn`, so it sees the caller's uncommitted change.
 */
export async function refoldOn(conn: PoolConnection, fixtureId: number, now: Date): Promise<void> {
	const fixtures = await loadHealthFixtures([fixtureId], conn);
	const policies = await policiesFor(fixtures, conn);
	await rebuildOn(conn, fixtures, policies, { fix: true, now });
	await reevaluateOn(conn, fixtures, policies, { now });
}
