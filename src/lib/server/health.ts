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
import type { PoolConnection, RowDataPacket } from 'mysql2/promise';
import {
	compareEvents,
	evaluateFlags,
	recompute,
	type Flag,
	type FixtureState
} from '../domain/health';
import type { Policy } from '../domain/policy';
import type { FixtureEvent } from '../schemas/events';
import type { FixtureType } from '../schemas/fixture';
import { getPool } from './db';
import { canonicalJson } from './fixtures';
import { initialStateFor, initialStateOptions, stateColumns } from './ingest';
import { effectivePolicy, type PolicySubject } from './policies';

/** Fixtures handled per transaction. */
const CHUNK = 200;

/** Flags that can become due with the passing of time alone. */
export const CALENDAR_FLAG_KINDS: readonly Flag['kind'][] = ['cleaning-due', 'inspection-due'];

/** What health work needs to know about a fixture. */
export interface HealthFixture extends PolicySubject {
	id: number;
	code: string;
	commissionedOn: string | null;
}

const parseJson = <T>(v: unknown): T | null =>
	v === null || v === undefined ? null : typeof v === 'string' ? (JSON.parse(v) as T) : (v as T);

const FIXTURE_COLUMNS = `id, code, type, policy_id, policy_overrides, repeatability_spec_um,
	rated_life_cycles, DATE_FORMAT(commissioned_on, '%Y-%m-%d') AS commissioned_on`;

function toFixture(r: RowDataPacket): HealthFixture {
	return {
		id: r.id,
		code: r.code,
		type: r.type as FixtureType,
		policyId: r.policy_id,
		policyOverrides: parseJson(r.policy_overrides),
		repeatabilitySpec_um: r.repeatability_spec_um,
		ratedLifeCycles: r.rated_life_cycles,
		commissionedOn: r.commissioned_on
	};
}

/** Fixtures by id (all of them when `ids` is omitted), in id order. */
export async function loadHealthFixtures(ids?: number[]): Promise<HealthFixture[]> {
	if (ids && !ids.length) return [];
	const [rows] = await getPool().query<RowDataPacket[]>(
		`SELECT ${FIXTURE_COLUMNS} FROM fixtures ${ids ? 'WHERE id IN (?)' : ''} ORDER BY id`,
		ids ? [ids] : []
	);
	return rows.map(toFixture);
}

/** The effective policy of each fixture, asked once per distinct set of policy inputs. */
export async function policiesFor(fixtures: HealthFixture[]): Promise<Map<number, Policy>> {
	const byKey = new Map<string, { subject: PolicySubject; ids: number[] }>();
	for (const f of fixtures) {
		const subject: PolicySubject = {
			type: f.type,
			policyId: f.policyId,
			policyOverrides: f.policyOverrides,
			repeatabilitySpec_um: f.repeatabilitySpec_um,
			ratedLifeCycles: f.ratedLifeCycles
		};
		const key = canonicalJson(subject);
		const entry = byKey.get(key);
		if (entry) entry.ids.push(f.id);
		else byKey.set(key, { subject, ids: [f.id] });
	}
	const out = new Map<number, Policy>();
	for (const { subject, ids } of byKey.values()) {
		const entries = await effectivePolicy(subject);
		const policy = Object.fromEntries(entries.map((e) => [e.field, e.value])) as unknown as Policy;
		for (const id of ids) out.set(id, policy);
	}
	return out;
}

/** The histories of some fixtures in folding order. */
async function loadHistories(
	conn: PoolConnection,
	ids: number[]
): Promise<Map<number, FixtureEvent[]>> {
	const out = new Map<number, FixtureEvent[]>(ids.map((id) => [id, []]));
	if (!ids.length) return out;
	const [rows] = await conn.query<RowDataPacket[]>(
		'SELECT id, fixture_id, kind, occurred_at, payload FROM events WHERE fixture_id IN (?)',
		[ids]
	);
	for (const r of rows) {
		out.get(r.fixture_id)!.push({
			id: r.id,
			kind: r.kind,
			occurredAt: (r.occurred_at as Date).toISOString(),
			payload: parseJson(r.payload)
		} as FixtureEvent);
	}
	// The database's collation orders ids case-insensitively; the fold order is the domain's.
	for (const list of out.values()) list.sort(compareEvents);
	return out;
}

interface StoredFlag {
	id: number;
	kind: Flag['kind'];
	reason: string;
	figures: Flag['figures'] | null;
}

/** State rows and open flags of some fixtures, optionally locked (FOR UPDATE, id order). */
async function loadStates(
	conn: PoolConnection,
	ids: number[],
	lock: boolean
): Promise<Map<number, { state: FixtureState | null; open: StoredFlag[] }>> {
	const out = new Map<number, { state: FixtureState | null; open: StoredFlag[] }>(
		ids.map((id) => [id, { state: null, open: [] }])
	);
	if (!ids.length) return out;
	const [states] = await conn.query<RowDataPacket[]>(
		`SELECT fixture_id, data FROM fixture_state WHERE fixture_id IN (?) ORDER BY fixture_id
		 ${lock ? 'FOR UPDATE' : ''}`,
		[ids]
	);
	for (const r of states) out.get(r.fixture_id)!.state = parseJson<FixtureState>(r.data);
	const [flags] = await conn.query<RowDataPacket[]>(
		`SELECT id, fixture_id, kind, reason, figures FROM flags
		  WHERE fixture_id IN (?) AND cleared_at IS NULL`,
		[ids]
	);
	for (const r of flags) {
		out.get(r.fixture_id)!.open.push({
			id: r.id,
			kind: r.kind,
			reason: r.reason,
			figures: parseJson(r.figures)
		});
	}
	return out;
}

/** What re-evaluating one fixture's flags changed. */
export interface FlagChange {
	fixtureId: number;
	raised: Flag['kind'][];
	cleared: Flag['kind'][];
	updated: Flag['kind'][];
}

/**
 * Brings a fixture's open flags in line with `wanted` (only the kinds in `kinds`, all when
 * omitted): new kinds are raised, missing ones cleared, changed reasons or figures updated.
 */
async function writeFlagDiff(
	conn: PoolConnection,
	fixtureId: number,
	open: StoredFlag[],
	wanted: Flag[],
	now: Date,
	kinds?: readonly Flag['kind'][]
): Promise<FlagChange> {
	const change: FlagChange = { fixtureId, raised: [], cleared: [], updated: [] };
	const inScope = (k: Flag['kind']) => !kinds || kinds.includes(k);
	const openByKind = new Map(open.filter((f) => inScope(f.kind)).map((f) => [f.kind, f]));
	for (const flag of wanted.filter((f) => inScope(f.kind))) {
		const o = openByKind.get(flag.kind);
		openByKind.delete(flag.kind);
		if (!o) {
			await conn.query(
				`INSERT INTO flags (fixture_id, kind, reason, figures, raised_at) VALUES (?, ?, ?, ?, ?)`,
				[fixtureId, flag.kind, flag.reason, JSON.stringify(flag.figures), now]
			);
			change.raised.push(flag.kind);
		} else if (
			o.reason !== flag.reason ||
			canonicalJson(o.figures ?? {}) !== canonicalJson(flag.figures)
		) {
			await conn.query('UPDATE flags SET reason = ?, figures = ? WHERE id = ?', [
				flag.reason,
				JSON.stringify(flag.figures),
				o.id
			]);
			change.updated.push(flag.kind);
		}
	}
	for (const o of openByKind.values()) {
		await conn.query('UPDATE flags SET cleared_at = ? WHERE id = ?', [now, o.id]);
		change.cleared.push(o.kind);
	}
	return change;
}

async function inTransaction<T>(fn: (conn: PoolConnection) => Promise<T>): Promise<T> {
	const conn = await getPool().getConnection();
	try {
		await conn.query('SET TRANSACTION ISOLATION LEVEL READ COMMITTED');
		await conn.beginTransaction();
		try {
			const out = await fn(conn);
			await conn.commit();
			return out;
		} catch (err) {
			await conn.rollback().catch(() => undefined);
			throw err;
		}
	} finally {
		conn.release();
	}
}

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
		await inTransaction(async (conn) => {
			const stored = await loadStates(conn, chunk, true);
			for (const f of fixtures) {
				const { state, open } = stored.get(f.id)!;
				if (!state) continue;
				const wanted = evaluateFlags(state, policies.get(f.id)!, now);
				const change = await writeFlagDiff(conn, f.id, open, wanted, now, options.kinds);
				if (change.raised.length || change.cleared.length || change.updated.length) {
					changes.push(change);
				}
			}
		});
	}
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
	let ids = fixtureIds;
	if (!ids) {
		const [rows] = await getPool().query<RowDataPacket[]>(
			'SELECT fixture_id FROM fixture_state ORDER BY fixture_id'
		);
		ids = rows.map((r) => r.fixture_id as number);
	}
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
	const all = await loadHealthFixtures(options.ids);
	const report: RebuildReport = { checked: 0, differing: [], fixed: !!options.fix };
	for (const fixtures of chunks(all)) {
		const policies = await policiesFor(fixtures);
		const ids = fixtures.map((f) => f.id);
		await inTransaction(async (conn) => {
			const stored = await loadStates(conn, ids, !!options.fix);
			const histories = await loadHistories(conn, ids);
			const toWrite: { f: HealthFixture; state: FixtureState }[] = [];
			for (const f of fixtures) {
				const history = histories.get(f.id)!;
				const { state } = stored.get(f.id)!;
				report.checked++;
				// No events and no state: nothing was ever folded, nothing to compare.
				if (!history.length && !state) continue;
				const rebuilt = history.length
					? recompute(history, policies.get(f.id)!, initialStateOptions(f))
					: initialStateFor(f);
				const fields = state ? differingFields(state, rebuilt) : ['(no stored state)'];
				if (!fields.length) continue;
				report.differing.push({ fixtureId: f.id, code: f.code, fields });
				toWrite.push({ f, state: rebuilt });
			}
			if (!options.fix || !toWrite.length) return;
			await conn.query(
				`INSERT INTO fixture_state (fixture_id, data, event_count, total_cycles,
				   cycles_since_cleaning, cycles_since_inspection, cycles_since_part_swap,
				   repeatability_um, wear_grade, last_event_at, last_cleaning_at, last_inspection_at,
				   updated_at)
				 VALUES ?
				 ON DUPLICATE KEY UPDATE data = VALUES(data), event_count = VALUES(event_count),
				   total_cycles = VALUES(total_cycles),
				   cycles_since_cleaning = VALUES(cycles_since_cleaning),
				   cycles_since_inspection = VALUES(cycles_since_inspection),
				   cycles_since_part_swap = VALUES(cycles_since_part_swap),
				   repeatability_um = VALUES(repeatability_um), wear_grade = VALUES(wear_grade),
				   last_event_at = VALUES(last_event_at), last_cleaning_at = VALUES(last_cleaning_at),
				   last_inspection_at = VALUES(last_inspection_at), updated_at = VALUES(updated_at)`,
				[toWrite.map(({ f, state }) => stateColumns(f.id, state, now))]
			);
			for (const { f, state } of toWrite) {
				const wanted = evaluateFlags(state, policies.get(f.id)!, now);
				await writeFlagDiff(conn, f.id, stored.get(f.id)!.open, wanted, now);
			}
		});
	}
	return report;
}
