/**
 * Reading and writing derived fixture health: the fixture facts a fold needs, effective policies
 * in bulk, the stored state rows with their open flags, and the flag writes. Shared by ingest
 * (event by event, ./ingest.ts) and by the health jobs (rebuild, calendar scan, policy change,
 * ./health.ts), so both start folds alike and write flags alike.
 */
import { getTableColumns } from 'drizzle-orm';
import type { PoolConnection, RowDataPacket } from 'mysql2/promise';
import {
	initialState,
	recentRepeatability,
	type Flag,
	type FixtureState,
	type InitialStateOptions
} from '../domain/health';
import type { Policy } from '../domain/policy';
import type { FixtureType } from '../schemas/fixture';
import { canonicalJson } from './fixtures';
import { getPool } from './db';
import { policies } from './db/schema';
import { indexPolicyRows, policyValues, resolvePolicy, type PolicySubject } from './policies';

/** What folding and flagging need to know about a fixture. */
export interface HealthFixture extends PolicySubject {
	id: number;
	code: string;
	status: string;
	commissionedOn: string | null;
}

/** The columns of `fixtures` that toHealthFixture reads. */
export const HEALTH_FIXTURE_COLUMNS = `id, code, type, status, policy_id, policy_overrides,
	repeatability_spec_um, rated_life_cycles,
	DATE_FORMAT(commissioned_on, '%Y-%m-%d') AS commissioned_on`;

/** JSON columns come back from MariaDB as text; parses them (null stays null). */
export function parseJson<T>(value: unknown): T | null {
	if (value === null || value === undefined) return null;
	return (typeof value === 'string' ? JSON.parse(value) : value) as T;
}

/** A row selected with HEALTH_FIXTURE_COLUMNS. */
export function toHealthFixture(r: RowDataPacket): HealthFixture {
	return {
		id: r.id,
		code: r.code,
		type: r.type as FixtureType,
		status: r.status,
		policyId: r.policy_id,
		policyOverrides: parseJson(r.policy_overrides),
		repeatabilitySpec_um: r.repeatability_spec_um,
		ratedLifeCycles: r.rated_life_cycles,
		commissionedOn: r.commissioned_on
	};
}

/** What can run a statement: the pool, or a connection a caller already holds. */
export type Queryable = Pick<PoolConnection, 'query'>;

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
	const [rows] = await (q ?? getPool()).query<RowDataPacket[]>(
		`SELECT * FROM policies WHERE fixture_type IN (?)${classIds.length ? ' OR id IN (?)' : ''}`,
		classIds.length ? [types, classIds] : [types]
	);
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

/** A flag row: open (clearedAt null) or being cleared; id null for one not yet written. */
export interface FlagRow {
	id: number | null;
	fixtureId: number;
	kind: Flag['kind'];
	reason: string;
	figures: Flag['figures'];
	raisedAt: Date;
	raisedByEventId: string | null;
	clearedAt: Date | null;
	clearedByEventId: string | null;
}

/** A stored state row and the fixture's open flags. */
export interface StoredState {
	state: FixtureState;
	openFlags: FlagRow[];
}

/**
 * Reads the fixtures' state rows with their open flags in one statement (the flags come along as a
 * JSON array per fixture); with `lock`, FOR UPDATE in fixture id order, so concurrent writers wait
 * for each other instead of deadlocking. Fixtures without a state row are absent from the map.
 */
export async function loadStoredStates(
	conn: PoolConnection,
	ids: number[],
	lock: boolean
): Promise<Map<number, StoredState>> {
	const out = new Map<number, StoredState>();
	if (!ids.length) return out;
	const [rows] = await conn.query<RowDataPacket[]>(
		`SELECT s.fixture_id, s.data,
		   (SELECT JSON_ARRAYAGG(JSON_OBJECT('id', f.id, 'kind', f.kind, 'reason', f.reason,
		      'figures', JSON_QUERY(COALESCE(f.figures, '{}'), '$'), 'raisedAt', f.raised_at,
		      'raisedBy', f.raised_by_event_id))
		      FROM flags f WHERE f.fixture_id = s.fixture_id AND f.cleared_at IS NULL) AS open_flags
		 FROM fixture_state s WHERE s.fixture_id IN (?) ORDER BY s.fixture_id
		 ${lock ? 'FOR UPDATE' : ''}`,
		[ids]
	);
	for (const r of rows) {
		const fixtureId = r.fixture_id as number;
		const flags =
			parseJson<
				{
					id: number;
					kind: Flag['kind'];
					reason: string;
					figures: Flag['figures'];
					raisedAt: string;
					raisedBy: string | null;
				}[]
			>(r.open_flags) ?? [];
		out.set(fixtureId, {
			state: parseJson<FixtureState>(r.data)!,
			openFlags: flags.map((f) => ({
				id: f.id,
				fixtureId,
				kind: f.kind,
				reason: f.reason,
				figures: f.figures,
				// DATETIME text from the database, in UTC.
				raisedAt: new Date(`${f.raisedAt.replace(' ', 'T')}Z`),
				raisedByEventId: f.raisedBy,
				clearedAt: null,
				clearedByEventId: null
			}))
		});
	}
	return out;
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
	conn: PoolConnection,
	rows: { fixtureId: number; state: FixtureState }[],
	now: Date
): Promise<void> {
	if (!rows.length) return;
	await conn.query(
		`INSERT INTO fixture_state (fixture_id, data, event_count, total_cycles, cycles_since_cleaning,
		   cycles_since_inspection, cycles_since_part_swap, repeatability_um, wear_grade,
		   last_event_at, last_cleaning_at, last_inspection_at, updated_at)
		 VALUES ?
		 ON DUPLICATE KEY UPDATE data = VALUES(data), event_count = VALUES(event_count),
		   total_cycles = VALUES(total_cycles), cycles_since_cleaning = VALUES(cycles_since_cleaning),
		   cycles_since_inspection = VALUES(cycles_since_inspection),
		   cycles_since_part_swap = VALUES(cycles_since_part_swap),
		   repeatability_um = VALUES(repeatability_um), wear_grade = VALUES(wear_grade),
		   last_event_at = VALUES(last_event_at), last_cleaning_at = VALUES(last_cleaning_at),
		   last_inspection_at = VALUES(last_inspection_at), updated_at = VALUES(updated_at)`,
		[rows.map((r) => stateColumns(r.fixtureId, r.state, now))]
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
export async function writeFlags(conn: PoolConnection, flags: FlagRow[]): Promise<void> {
	if (!flags.length) return;
	await conn.query(
		`INSERT INTO flags (id, fixture_id, kind, reason, figures, raised_at, raised_by_event_id,
		   cleared_at, cleared_by_event_id)
		 VALUES ?
		 ON DUPLICATE KEY UPDATE reason = VALUES(reason), figures = VALUES(figures),
		   cleared_at = VALUES(cleared_at), cleared_by_event_id = VALUES(cleared_by_event_id)`,
		[
			flags.map((f) => [
				f.id,
				f.fixtureId,
				f.kind,
				f.reason,
				JSON.stringify(f.figures),
				f.raisedAt,
				f.raisedByEventId,
				f.clearedAt,
				f.clearedByEventId
			])
		]
	);
}
