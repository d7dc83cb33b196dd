/**
 * The raw SQL of the health write path: ingest (../ingest.ts), the state store
 * (../state-store.ts) and the health jobs (../health.ts) run these statements and no others.
 *
 * Why raw and not Drizzle: these are the hot statements of a sync batch and of a rebuild, and
 * each is written to do a whole batch in one round trip — multi-row `INSERT … VALUES ?` with
 * `ON DUPLICATE KEY UPDATE … VALUES(col)`, `INSERT IGNORE`, a `CASE` update, `FOR UPDATE` in id
 * order, open flags gathered per state row with JSON_ARRAYAGG. The query builder either cannot
 * say these in MariaDB's dialect or spends more time building them than the database spends
 * running them (see `npm run bench`). Everything else in the server layer uses Drizzle.
 */
import type { PoolConnection, RowDataPacket } from 'mysql2/promise';
import type { Flag, FixtureState } from '../../domain/health';
import type { FixtureType } from '../../schemas/fixture';
import type { FixtureEvent } from '../../schemas/events';
import type { PolicySubject } from '../policies';

/** What can run a statement: the pool, or a connection a caller already holds. */
export type Queryable = Pick<PoolConnection, 'query'>;

/** What folding and flagging need to know about a fixture. */
export interface HealthFixture extends PolicySubject {
	id: number;
	code: string;
	status: string;
	commissionedOn: string | null;
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

/** JSON columns come back from MariaDB as text; parses them (null stays null). */
export function parseJson<T>(value: unknown): T | null {
	if (value === null || value === undefined) return null;
	return (typeof value === 'string' ? JSON.parse(value) : value) as T;
}

/* ------------------------------------------------------------------------------------------ */
/* Fixtures                                                                                   */

const HEALTH_FIXTURE_COLUMNS = `id, code, type, status, policy_id, policy_overrides,
	repeatability_spec_um, rated_life_cycles,
	DATE_FORMAT(commissioned_on, '%Y-%m-%d') AS commissioned_on`;

function toHealthFixture(r: RowDataPacket): HealthFixture {
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

/** Fixtures by canonical code. */
export async function selectFixturesByCode(
	q: Queryable,
	codes: string[]
): Promise<HealthFixture[]> {
	if (!codes.length) return [];
	const [rows] = await q.query<RowDataPacket[]>(
		`SELECT ${HEALTH_FIXTURE_COLUMNS} FROM fixtures WHERE code IN (?)`,
		[codes]
	);
	return rows.map(toHealthFixture);
}

/** Fixtures by id (all of them when `ids` is omitted), in id order. */
export async function selectFixturesById(q: Queryable, ids?: number[]): Promise<HealthFixture[]> {
	if (ids && !ids.length) return [];
	const [rows] = await q.query<RowDataPacket[]>(
		`SELECT ${HEALTH_FIXTURE_COLUMNS} FROM fixtures ${ids ? 'WHERE id IN (?)' : ''} ORDER BY id`,
		ids ? [ids] : []
	);
	return rows.map(toHealthFixture);
}

/**
 * Sets the register's status from the log (id → status), leaving retired fixtures retired; one
 * statement for the whole batch.
 */
export async function updateFixtureStatuses(
	conn: Queryable,
	statuses: { fixtureId: number; status: string }[]
): Promise<void> {
	if (!statuses.length) return;
	const cases = statuses.map(() => 'WHEN ? THEN ?').join(' ');
	await conn.query(
		`UPDATE fixtures SET status = CASE id ${cases} END WHERE id IN (?) AND status <> 'retired'`,
		[...statuses.flatMap((s) => [s.fixtureId, s.status]), statuses.map((s) => s.fixtureId)]
	);
}

/** Policy rows of some fixture types and policy classes, as stored (snake_case keys). */
export async function selectPolicyRows(
	q: Queryable,
	types: string[],
	classIds: number[]
): Promise<RowDataPacket[]> {
	const [rows] = await q.query<RowDataPacket[]>(
		`SELECT * FROM policies WHERE fixture_type IN (?)${classIds.length ? ' OR id IN (?)' : ''}`,
		classIds.length ? [types, classIds] : [types]
	);
	return rows;
}

/* ------------------------------------------------------------------------------------------ */
/* Events                                                                                     */

/** One events row to insert. */
export interface EventInsert {
	id: string;
	fixtureId: number;
	kind: string;
	occurredAt: Date;
	receivedAt: Date;
	userId: string;
	deviceId: string;
	payload: unknown;
	contentHash: string;
}

/** Inserts events in one statement (a duplicate id fails the whole statement with 1062). */
export async function insertEvents(conn: Queryable, rows: EventInsert[]): Promise<void> {
	await conn.query(
		`INSERT INTO events
		   (id, fixture_id, kind, occurred_at, received_at, user_id, device_id, payload, content_hash)
		 VALUES ?`,
		[
			rows.map((r) => [
				r.id,
				r.fixtureId,
				r.kind,
				r.occurredAt,
				r.receivedAt,
				r.userId,
				r.deviceId,
				JSON.stringify(r.payload),
				r.contentHash
			])
		]
	);
}

/** Content hashes of those of `ids` already stored, by lower-case id. */
export async function selectContentHashes(
	conn: Queryable,
	ids: string[]
): Promise<Map<string, string>> {
	const stored = new Map<string, string>();
	if (!ids.length) return stored;
	const [rows] = await conn.query<RowDataPacket[]>(
		'SELECT id, content_hash FROM events WHERE id IN (?)',
		[ids]
	);
	for (const r of rows) stored.set(String(r.id).toLowerCase(), r.content_hash);
	return stored;
}

/**
 * The histories of some fixtures, each in the database's order; callers sort them with the
 * domain's compareEvents (the collation orders ids case-insensitively, the fold does not).
 */
export async function selectHistories(
	conn: Queryable,
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
	return out;
}

/* ------------------------------------------------------------------------------------------ */
/* States and flags                                                                           */

/** Ids of every fixture that has a state row, in id order. */
export async function selectStatedFixtureIds(q: Queryable): Promise<number[]> {
	const [rows] = await q.query<RowDataPacket[]>(
		'SELECT fixture_id FROM fixture_state ORDER BY fixture_id'
	);
	return rows.map((r) => r.fixture_id as number);
}

/** Adds state rows for fixtures that have none yet (an existing row is left as it is). */
export async function insertMissingStates(
	conn: Queryable,
	rows: { fixtureId: number; state: FixtureState }[],
	now: Date
): Promise<void> {
	if (!rows.length) return;
	await conn.query('INSERT IGNORE INTO fixture_state (fixture_id, data, updated_at) VALUES ?', [
		rows.map((r) => [r.fixtureId, JSON.stringify(r.state), now])
	]);
}

/**
 * Reads the fixtures' state rows with their open flags in one statement (the flags come along as a
 * JSON array per fixture); with `lock`, FOR UPDATE in fixture id order, so concurrent writers wait
 * for each other instead of deadlocking. Fixtures without a state row are absent from the map.
 */
export async function selectStoredStates(
	conn: Queryable,
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

/** Writes fixture_state rows (the JSON and the columns copied out of it) in one statement. */
export async function upsertStateRows(conn: Queryable, rows: unknown[][]): Promise<void> {
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
		[rows]
	);
}

/** Raises, updates and clears flags in one statement (new rows have no id yet). */
export async function upsertFlagRows(conn: Queryable, flags: FlagRow[]): Promise<void> {
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
