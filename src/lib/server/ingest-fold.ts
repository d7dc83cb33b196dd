/**
 * The fold step of ingest (./ingest.ts): once a batch's new events are inserted, bring the derived
 * state and the flags of every fixture they touch up to date, inside the batch's transaction.
 * See ingest.ts for the decisions (order of folding, incremental or recompute, flag attribution).
 */
import type { PoolConnection } from 'mysql2/promise';
import {
	applyEvent,
	compareEvents,
	evaluateFlags,
	recompute,
	type Flag,
	type FixtureState
} from '../domain/health';
import type { Policy } from '../domain/policy';
import type { FixtureEvent, SyncEvent } from '../schemas/events';
import {
	insertMissingStates,
	selectHistories,
	updateFixtureStatuses,
	type FlagRow,
	type HealthFixture,
	type StoredState
} from './db/health-sql';
import {
	diffFlags,
	flagRows,
	initialStateFor,
	initialStateOptions,
	loadStoredStates,
	upsertStates,
	writeFlags
} from './state-store';

/** A new event of the batch and the fixture it is about. */
export interface NewEvent {
	event: SyncEvent;
	fixture: HealthFixture;
}

/**
 * Locks the state rows of `fixtures` (FOR UPDATE, in id order, so concurrent batches wait for each
 * other instead of deadlocking); a fixture without a state row gets its initial one first.
 */
export async function lockStates(
	conn: PoolConnection,
	fixtures: HealthFixture[],
	now: Date
): Promise<Map<number, StoredState>> {
	const byId = new Map(fixtures.map((f) => [f.id, f]));
	const ids = [...byId.keys()].sort((a, b) => a - b);
	const locked = await loadStoredStates(conn, ids, true);
	const missing = ids.filter((id) => !locked.has(id));
	if (missing.length) {
		await insertMissingStates(
			conn,
			missing.map((id) => ({ fixtureId: id, state: initialStateFor(byId.get(id)!) })),
			now
		);
		for (const [id, entry] of await loadStoredStates(conn, missing, true)) locked.set(id, entry);
	}
	return locked;
}

/** One fixture's state before and after the batch, and the flag rows that follow. */
interface Folded {
	fixtureId: number;
	before: FixtureState;
	state: FixtureState;
	flags: FlagRow[];
}

/**
 * Folds the new events (already inserted) into their fixtures' locked states, diffs the flags and
 * writes states, flags and the register's status in a few statements. Returns the flags raised.
 */
export async function foldNewEvents(
	conn: PoolConnection,
	fresh: NewEvent[],
	locked: Map<number, StoredState>,
	policies: Map<number, Policy>,
	now: Date
): Promise<{ fixtureId: number; kind: Flag['kind'] }[]> {
	const byFixture = new Map<number, { fixture: HealthFixture; events: FixtureEvent[] }>();
	for (const { event, fixture } of fresh) {
		let group = byFixture.get(fixture.id);
		if (!group) byFixture.set(fixture.id, (group = { fixture, events: [] }));
		group.events.push(toFixtureEvent(event));
	}
	const folded: Folded[] = [];
	for (const id of [...byFixture.keys()].sort((a, b) => a - b)) {
		const { fixture, events } = byFixture.get(id)!;
		events.sort(compareEvents);
		folded.push(await foldFixture(conn, fixture, events, locked.get(id)!, policies.get(id)!, now));
	}
	await upsertStates(
		conn,
		folded.map((f) => ({ fixtureId: f.fixtureId, state: f.state })),
		now
	);
	await writeFlags(
		conn,
		folded.flatMap((f) => f.flags)
	);
	await syncFixtureStatus(conn, folded);
	return folded.flatMap((f) =>
		f.flags.filter((r) => r.id === null).map((r) => ({ fixtureId: f.fixtureId, kind: r.kind }))
	);
}

/**
 * One fixture: incrementally when every new event comes after the last folded one, else a
 * recompute from its whole history (this transaction's inserts included).
 */
async function foldFixture(
	conn: PoolConnection,
	fixture: HealthFixture,
	events: FixtureEvent[],
	stored: StoredState,
	policy: Policy,
	now: Date
): Promise<Folded> {
	const before = stored.state;
	const last =
		before.lastEventAt && before.lastEventId
			? { occurredAt: before.lastEventAt, id: before.lastEventId }
			: null;
	const late = last !== null && compareEvents(events[0], last) <= 0;
	let state: FixtureState;
	// The state after each new event (incremental case), to find which event changed a flag.
	let trail: FixtureState[] | null = null;
	if (late) {
		const history = (await selectHistories(conn, [fixture.id])).get(fixture.id)!;
		// The database's collation orders ids case-insensitively; the fold order is the domain's.
		history.sort(compareEvents);
		state = recompute(history, policy, initialStateOptions(fixture));
	} else {
		trail = [before];
		for (const ev of events) trail.push(applyEvent(trail[trail.length - 1], ev, policy));
		state = trail[trail.length - 1];
	}
	const diff = diffFlags(stored.openFlags, evaluateFlags(state, policy, now));
	const culprit = trail
		? flagCulprit(events, trail, policy, now)
		: () => events[events.length - 1].id;
	return { fixtureId: fixture.id, before, state, flags: flagRows(fixture.id, diff, now, culprit) };
}

/**
 * For the incremental case: the new event after which a flag kind was first present (or absent),
 * found by bisection over the states after each new event (`trail[k]` is the state after k).
 */
function flagCulprit(
	events: FixtureEvent[],
	trail: FixtureState[],
	policy: Policy,
	now: Date
): (kind: Flag['kind'], present: boolean) => string {
	const kindsAfter = new Map<number, Set<Flag['kind']>>();
	const kindsAt = (k: number) => {
		let kinds = kindsAfter.get(k);
		if (!kinds) {
			kinds = new Set(evaluateFlags(trail[k], policy, now).map((f) => f.kind));
			kindsAfter.set(k, kinds);
		}
		return kinds;
	};
	return (kind, present) => {
		let lo = 1;
		let hi = events.length;
		while (lo < hi) {
			const mid = (lo + hi) >> 1;
			if (kindsAt(mid).has(kind) === present) hi = mid;
			else lo = mid + 1;
		}
		return events[lo - 1].id;
	};
}

function toFixtureEvent(e: SyncEvent): FixtureEvent {
	return { id: e.id, kind: e.kind, occurredAt: e.occurredAt, payload: e.payload } as FixtureEvent;
}

/**
 * Keeps the register's status in step when the state's status changed in this batch (a hold, a
 * release, a break-in begun or completed). Retired fixtures stay retired, and a status set by hand
 * in the register stands until the next change comes from the log.
 */
async function syncFixtureStatus(conn: PoolConnection, folded: Folded[]): Promise<void> {
	await updateFixtureStatuses(
		conn,
		folded
			.filter((f) => f.state.status !== f.before.status)
			.map((f) => ({ fixtureId: f.fixtureId, status: f.state.status }))
	);
}
