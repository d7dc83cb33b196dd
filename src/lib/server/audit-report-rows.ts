/**
 * The audit report's reads: one page of a section at a time, in time order, through indexes —
 * events of a kind by (kind, occurred_at), flags by raised_at or cleared_at, due flags open at
 * the range's end by (kind, cleared_at) — so a report never reads the reseats, and no read
 * grows with the whole log. Pages continue after a cursor (time, id), never by OFFSET.
 */
import type { RowDataPacket } from 'mysql2/promise';
import { getPool } from './db';

/** The range (start included, end excluded) and the area, if any. */
export interface ReportBounds {
	start: Date;
	end: Date;
	areaId: number | null;
}

/** Where a page starts: after the row with this time and id. */
export interface After {
	at: Date;
	id: string | number;
}

/** The fixture columns every row carries. */
export interface FixtureColumns {
	fixture_id: number;
	code: string;
	name: string;
	location: string;
	area: string;
}

export interface EventRowData extends FixtureColumns {
	id: string;
	kind: string;
	occurred_at: Date;
	received_at: Date;
	payload: Record<string, unknown>;
	by_name: string;
}

export interface FlagRowData extends FixtureColumns {
	id: number;
	kind: string;
	reason: string;
	raised_at: Date;
	cleared_at: Date | null;
	cleared_by_kind: string | null;
	cleared_by_name: string | null;
}

/** The flag kinds that mean work has fallen due (the overdue section's convention). */
export const DUE_FLAG_KINDS = ['break-in-due', 'cleaning-due', 'inspection-due'] as const;

const PLACE_JOIN = `JOIN fixtures f ON f.id = X.fixture_id
	JOIN locations l ON l.id = f.location_id
	JOIN areas a ON a.id = l.area_id`;
const FIXTURE_COLS = 'f.code, f.name, l.name AS location, a.name AS area';

const placeJoin = (alias: string) => PLACE_JOIN.replace('X.', `${alias}.`);
const personName = (alias: string, idColumn: string) =>
	// People who signed in by e-mail link may have no name (see STACK.md).
	`COALESCE(NULLIF(${alias}.name, ''), ${alias}.email, ${idColumn})`;

function afterClause(column: string, idColumn: string, after: After | null, params: unknown[]) {
	if (!after) return '';
	params.push(after.at, after.at, after.id);
	return ` AND (${column} > ? OR (${column} = ? AND ${idColumn} > ?))`;
}

function parsePayload(p: unknown): Record<string, unknown> {
	return (typeof p === 'string' ? JSON.parse(p) : p) as Record<string, unknown>;
}

/** A page of events of `kinds` in the range, oldest first. */
export async function eventPage(
	kinds: readonly string[],
	b: ReportBounds,
	after: After | null,
	limit: number
): Promise<EventRowData[]> {
	const params: unknown[] = [kinds, b.start, b.end];
	let where = 'e.kind IN (?) AND e.occurred_at >= ? AND e.occurred_at < ?';
	let areaJoin = '';
	if (b.areaId !== null) {
		areaJoin =
			'JOIN fixtures af ON af.id = e.fixture_id JOIN locations al ON al.id = af.location_id';
		where += ' AND al.area_id = ?';
		params.push(b.areaId);
	}
	where += afterClause('e.occurred_at', 'e.id', after, params);
	params.push(limit);
	const [rows] = await getPool().query<RowDataPacket[]>(
		// The page's ids first, from the (kind, occurred_at, id, fixture_id) index alone and in its
		// order, so the read stops at the page's end and skips other areas without touching their
		// rows; then only the page's rows are read. STRAIGHT_JOIN keeps the optimiser from starting
		// at the few areas and reading every fixture's events.
		`SELECT e.id, e.kind, e.occurred_at, e.received_at, e.payload, e.fixture_id, ${FIXTURE_COLS},
		        ${personName('u', 'e.user_id')} AS by_name
		   FROM (SELECT STRAIGHT_JOIN e.id FROM events e FORCE INDEX (events_kind_occurred_idx)
		           ${areaJoin}
		          WHERE ${where}
		          ORDER BY e.occurred_at, e.id
		          LIMIT ?) AS page
		   JOIN events e ON e.id = page.id
		   ${placeJoin('e')}
		   LEFT JOIN users u ON u.id = e.user_id
		  ORDER BY e.occurred_at, e.id`,
		params
	);
	return rows.map((r) => ({ ...(r as EventRowData), payload: parsePayload(r.payload) }));
}

/** How many events of `kinds` the range holds. */
export async function eventCount(kinds: readonly string[], b: ReportBounds): Promise<number> {
	const params: unknown[] = [kinds, b.start, b.end];
	// The (kind, occurred_at, id, fixture_id) index alone answers, with or without an area.
	const sql =
		b.areaId === null
			? 'SELECT COUNT(*) AS n FROM events e WHERE e.kind IN (?) AND e.occurred_at >= ? AND e.occurred_at < ?'
			: `SELECT STRAIGHT_JOIN COUNT(*) AS n FROM events e FORCE INDEX (events_kind_occurred_idx)
			     JOIN fixtures f ON f.id = e.fixture_id JOIN locations l ON l.id = f.location_id
			    WHERE e.kind IN (?) AND e.occurred_at >= ? AND e.occurred_at < ? AND l.area_id = ?`;
	if (b.areaId !== null) params.push(b.areaId);
	const [rows] = await getPool().query<RowDataPacket[]>(sql, params);
	return Number(rows[0].n);
}

/** Which flags a flag section lists. */
export type FlagSelection = 'raised' | 'cleared' | 'overdue';

/** The condition and the time column (for order and cursor) of a flag section. */
function flagWhere(which: FlagSelection, b: ReportBounds, params: unknown[]) {
	if (which === 'raised') {
		params.push(b.start, b.end);
		return {
			where: 'fl.raised_at >= ? AND fl.raised_at < ?',
			column: 'fl.raised_at',
			index: 'FORCE INDEX (flags_raised_idx)'
		};
	}
	if (which === 'cleared') {
		params.push(b.start, b.end);
		return {
			where: 'fl.cleared_at >= ? AND fl.cleared_at < ?',
			column: 'fl.cleared_at',
			index: 'FORCE INDEX (flags_cleared_idx)'
		};
	}
	// Open at the end: raised before it, and not cleared until it (or later).
	params.push(DUE_FLAG_KINDS, b.end, b.end);
	return {
		where: 'fl.kind IN (?) AND fl.raised_at < ? AND (fl.cleared_at IS NULL OR fl.cleared_at >= ?)',
		column: 'fl.raised_at',
		index: ''
	};
}

/** A page of a flag section, oldest first by its time column. */
export async function flagPage(
	which: FlagSelection,
	b: ReportBounds,
	after: After | null,
	limit: number
): Promise<FlagRowData[]> {
	const params: unknown[] = [];
	const { where: base, column, index } = flagWhere(which, b, params);
	let where = base;
	if (b.areaId !== null) {
		where += ' AND l.area_id = ?';
		params.push(b.areaId);
	}
	where += afterClause(column, 'fl.id', after, params);
	params.push(limit);
	const [rows] = await getPool().query<RowDataPacket[]>(
		`SELECT STRAIGHT_JOIN fl.id, fl.kind, fl.reason, fl.raised_at, fl.cleared_at, fl.fixture_id, ${FIXTURE_COLS},
		        ce.kind AS cleared_by_kind,
		        CASE WHEN ce.id IS NULL THEN NULL ELSE ${personName('cu', 'ce.user_id')} END
		          AS cleared_by_name
		   FROM flags fl ${index} ${placeJoin('fl')}
		   LEFT JOIN events ce ON ce.id = fl.cleared_by_event_id
		   LEFT JOIN users cu ON cu.id = ce.user_id
		  WHERE ${where}
		  ORDER BY ${column}, fl.id
		  LIMIT ?`,
		params
	);
	return rows as FlagRowData[];
}

/** How many flags a flag section holds. */
export async function flagCount(which: FlagSelection, b: ReportBounds): Promise<number> {
	const params: unknown[] = [];
	const { where, index } = flagWhere(which, b, params);
	const join =
		b.areaId === null
			? ''
			: 'JOIN fixtures f ON f.id = fl.fixture_id JOIN locations l ON l.id = f.location_id';
	if (b.areaId !== null) params.push(b.areaId);
	const [rows] = await getPool().query<RowDataPacket[]>(
		`SELECT STRAIGHT_JOIN COUNT(*) AS n FROM flags fl ${index} ${join}
		  WHERE ${where}${b.areaId === null ? '' : ' AND l.area_id = ?'}`,
		params
	);
	return Number(rows[0].n);
}

/** The break-in-due flags of some fixtures, to judge how their runs ended. */
export async function breakInFlags(fixtureIds: readonly number[]): Promise<
	{
		fixture_id: number;
		raised_at: Date;
		cleared_at: Date | null;
		cleared_by_event_id: string | null;
	}[]
> {
	if (!fixtureIds.length) return [];
	const [rows] = await getPool().query<RowDataPacket[]>(
		`SELECT fixture_id, raised_at, cleared_at, cleared_by_event_id FROM flags
		  WHERE fixture_id IN (?) AND kind = 'break-in-due'`,
		[fixtureIds]
	);
	return rows as Awaited<ReturnType<typeof breakInFlags>>;
}

/** An area and its site's name, or null when there is none with this id. */
export async function reportArea(id: number): Promise<{ id: number; name: string } | null> {
	const [rows] = await getPool().query<RowDataPacket[]>(
		`SELECT a.id, a.name, s.name AS site FROM areas a JOIN sites s ON s.id = a.site_id WHERE a.id = ?`,
		[id]
	);
	return rows[0] ? { id: rows[0].id, name: `${rows[0].site} · ${rows[0].name}` } : null;
}

/** Every area with its site's name, for the report's area choice. */
export async function reportAreas(): Promise<{ id: number; name: string }[]> {
	const [rows] = await getPool().query<RowDataPacket[]>(
		`SELECT a.id, a.name, s.name AS site FROM areas a JOIN sites s ON s.id = a.site_id
		  ORDER BY s.name, a.name`
	);
	return rows.map((r) => ({ id: r.id, name: `${r.site} · ${r.name}` }));
}
