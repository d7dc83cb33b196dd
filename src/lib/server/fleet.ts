/**
 * The fleet board: what needs attention today across the register. Reads only the maintained
 * tables — fixtures and their places, open flags, fixture_state, the latest saved geometry — and
 * events only by primary-key-like lookups (the latest entry of each listed fixture, through the
 * (fixture_id, occurred_at) index). A summary costs the same few statements whatever the size of
 * the fleet: no statement per fixture, no fold or aggregate over the event log.
 */
import { and, asc, eq, inArray, isNull, ne, sql, type SQL } from 'drizzle-orm';
import { DUE_WORK_KINDS, FLAG_URGENCY, byUrgency } from '../domain/flag-urgency';
import type { FlagKind } from '../domain/flag-kinds';
import type { FleetQuery } from '../schemas/fleet';
import {
	ATTENTION_PAGE_SIZE,
	type AttentionRow,
	type BoardFlag,
	type FleetSummary,
	type LastEntry
} from '../schemas/fleet-views';
import { db } from './db';
import {
	areas,
	couplingGeometries,
	events,
	fixtureState,
	fixtures,
	flags,
	locations,
	sites,
	users
} from './db/schema';
import { assertCan, type Actor } from './guard';
import { filters, withPlace } from './register-rows';

export type { AttentionRow, FleetSummary };

/** A DATETIME as ISO 8601: Drizzle hands raw `sql` columns over as MariaDB's text. */
function iso(v: unknown): string {
	if (v instanceof Date) return v.toISOString();
	const s = String(v);
	return new Date(/[zZ]|[+-]\d\d:?\d\d$/.test(s) ? s : `${s.replace(' ', 'T')}Z`).toISOString();
}

/**
 * The fixtures a view covers: the register's own filters (search, area, type, status). Retired
 * fixtures need no attention, so they are left out unless asked for by status.
 */
function fixtureFilter(query: Partial<FleetQuery>): SQL | undefined {
	return and(
		filters({ q: query.q, area: query.area, type: query.type, status: query.status }),
		query.status ? undefined : ne(fixtures.status, 'retired')
	);
}

const urgencyList = sql.join(
	FLAG_URGENCY.map((k) => sql`${k}`),
	sql`, `
);

/** Per fixture: its most urgent open flag (rank in FLAG_URGENCY) and its oldest. */
function openFlagsOf(query: Partial<FleetQuery>, kinds?: readonly FlagKind[]) {
	return db
		.select({
			fixtureId: flags.fixtureId,
			top: sql<number>`MIN(FIELD(${flags.kind}, ${urgencyList}))`.as('top'),
			oldest: sql<string>`MIN(${flags.raisedAt})`.as('oldest')
		})
		.from(flags)
		.where(and(isNull(flags.clearedAt), kinds ? inArray(flags.kind, kinds) : undefined))
		.groupBy(flags.fixtureId)
		.having(query.kind ? sql`SUM(${flags.kind} = ${query.kind}) > 0` : undefined)
		.as('open_flags');
}

interface RowOptions {
	/** Only flags of these kinds count (and are shown); default all. */
	kinds?: readonly FlagKind[];
	/** 'urgency': most urgent flag, then the oldest; 'oldest': the oldest flag first. */
	order: 'urgency' | 'oldest';
	limit: number;
	/** Rows to skip (earlier pages). */
	offset?: number;
}

/** Fixtures with open flags, sorted, one page of them, with the total before the cut. */
async function attention(
	query: Partial<FleetQuery>,
	options: RowOptions
): Promise<{ total: number; rows: AttentionRow[] }> {
	const open = openFlagsOf(query, options.kinds);

	const found = await withPlace(
		db
			.select({
				id: fixtures.id,
				code: fixtures.code,
				name: fixtures.name,
				type: fixtures.type,
				status: fixtures.status,
				site: sites.name,
				areaId: areas.id,
				area: areas.name,
				location: locations.name,
				oldest: open.oldest,
				lastEventAt: fixtureState.lastEventAt,
				// Window functions run before LIMIT: the number of matches, in the same statement.
				total: sql<number>`COUNT(*) OVER ()`
			})
			.from(fixtures)
			.$dynamic()
	)
		.innerJoin(open, eq(open.fixtureId, fixtures.id))
		.leftJoin(fixtureState, eq(fixtureState.fixtureId, fixtures.id))
		.where(fixtureFilter(query))
		.orderBy(
			...(options.order === 'urgency' ? [asc(open.top)] : []),
			asc(open.oldest),
			asc(fixtures.code)
		)
		.limit(options.limit)
		.offset(options.offset ?? 0);
	// Past the last page the window has no row to count on: count apart (rare; still one statement).
	if (found.length === 0) {
		return { total: options.offset ? await countFlagged(query, options.kinds) : 0, rows: [] };
	}

	const ids = found.map((r) => r.id);
	const [flagRows, lastRows] = await Promise.all([
		db
			.select({
				fixtureId: flags.fixtureId,
				id: flags.id,
				kind: flags.kind,
				reason: flags.reason,
				figures: flags.figures,
				raisedAt: flags.raisedAt
			})
			.from(flags)
			.where(
				and(
					inArray(flags.fixtureId, ids),
					isNull(flags.clearedAt),
					options.kinds ? inArray(flags.kind, options.kinds) : undefined
				)
			),
		// The latest entry of each: fixture_state keeps its time, the index finds the row.
		db
			.select({
				fixtureId: events.fixtureId,
				kind: events.kind,
				occurredAt: events.occurredAt,
				by: sql<string | null>`COALESCE(${users.name}, ${users.email})`
			})
			.from(fixtureState)
			.innerJoin(
				events,
				and(
					eq(events.fixtureId, fixtureState.fixtureId),
					eq(events.occurredAt, fixtureState.lastEventAt)
				)
			)
			.leftJoin(users, eq(users.id, events.userId))
			.where(inArray(fixtureState.fixtureId, ids))
	]);

	const flagsOf = new Map<number, BoardFlag[]>();
	for (const f of flagRows) {
		const list = flagsOf.get(f.fixtureId) ?? [];
		list.push({
			id: f.id,
			kind: f.kind,
			reason: f.reason,
			figures: f.figures,
			raisedAt: f.raisedAt.toISOString()
		});
		flagsOf.set(f.fixtureId, list);
	}
	const lastOf = new Map<number, LastEntry>();
	// Two entries at the same instant: either is "the last"; the first found stands.
	for (const e of lastRows) {
		if (!lastOf.has(e.fixtureId)) {
			lastOf.set(e.fixtureId, {
				kind: e.kind,
				occurredAt: e.occurredAt.toISOString(),
				by: e.by
			});
		}
	}
	return {
		total: Number(found[0].total),
		rows: found.map((r) => ({
			code: r.code,
			name: r.name,
			type: r.type,
			status: r.status,
			site: r.site,
			area: { id: r.areaId, name: r.area },
			location: r.location,
			flags: byUrgency(flagsOf.get(r.id) ?? []),
			oldestRaisedAt: iso(r.oldest),
			lastEntry: lastOf.get(r.id) ?? null
		}))
	};
}

/** Fixtures with open flags that match (asked only for a page past the end). */
async function countFlagged(
	query: Partial<FleetQuery>,
	kinds?: readonly FlagKind[]
): Promise<number> {
	const open = openFlagsOf(query, kinds);
	const [row] = await withPlace(
		db
			.select({ n: sql<number>`COUNT(*)` })
			.from(fixtures)
			.$dynamic()
	)
		.innerJoin(open, eq(open.fixtureId, fixtures.id))
		.where(fixtureFilter(query));
	return Number(row?.n ?? 0);
}

/**
 * The tiles, in one statement: fixtures with an open flag of each kind (the flag-kind filter
 * aside: the tiles show every kind), fixtures on hold, and fixtures whose latest saved geometry is
 * not exactly constrained (its constraint status is cached on each saved version, ./geometry.ts).
 */
async function tileCounts(
	query: Partial<FleetQuery>
): Promise<{ byKind: Map<FlagKind, number>; onHold: number; notExact: number }> {
	const where = fixtureFilter(query) ?? sql`TRUE`;
	// The filters read the location only for an area (never the area or site rows themselves).
	const place = query.area
		? sql`JOIN ${locations} ON ${locations.id} = ${fixtures.locationId}`
		: sql``;
	const [rows] = (await db.execute(sql`
		SELECT ${flags.kind} AS k, COUNT(DISTINCT ${flags.fixtureId}) AS n
		  FROM ${fixtures} ${place}
		  JOIN ${flags} ON ${flags.fixtureId} = ${fixtures.id} AND ${flags.clearedAt} IS NULL
		 WHERE ${where}
		 GROUP BY ${flags.kind}
		UNION ALL
		SELECT 'on-hold', COUNT(*) FROM ${fixtures} ${place}
		 WHERE ${where} AND ${fixtures.status} = 'on-hold'
		UNION ALL
		SELECT 'not-exact', COUNT(*) FROM ${fixtures} ${place}
		  JOIN ${couplingGeometries} ON ${couplingGeometries.fixtureId} = ${fixtures.id}
		   AND ${couplingGeometries.version} = (
		     SELECT MAX(g.version) FROM ${couplingGeometries} g WHERE g.fixture_id = ${fixtures.id})
		 WHERE ${where} AND ${couplingGeometries.constraintStatus} <> 'exact'`)) as unknown as [
		{ k: string; n: number | string }[]
	];
	const counts = new Map(rows.map((r) => [r.k, Number(r.n)]));
	return {
		byKind: new Map(FLAG_URGENCY.map((kind) => [kind, counts.get(kind) ?? 0])),
		onHold: counts.get('on-hold') ?? 0,
		notExact: counts.get('not-exact') ?? 0
	};
}

/**
 * The board: open flags by kind (most urgent kind first), fixtures on hold and with geometry that
 * is not exact, and the fixtures that need attention — most urgent flag first, then the one open
 * longest, a page at a time. Four statements (five for a page past the end), whatever the size
 * of the fleet.
 */
export async function fleetSummary(
	actor: Actor,
	asked: Partial<FleetQuery>,
	now: Date = new Date()
): Promise<FleetSummary> {
	assertCan(actor, 'fleet.view');
	const query: FleetQuery = { ...asked, page: asked.page ?? 1 };
	const [tiles, found] = await Promise.all([
		tileCounts(query),
		attention(query, {
			order: 'urgency',
			limit: ATTENTION_PAGE_SIZE,
			offset: (query.page - 1) * ATTENTION_PAGE_SIZE
		})
	]);
	return {
		generatedAt: now.toISOString(),
		query,
		today: FLAG_URGENCY.map((kind) => ({ kind, count: tiles.byKind.get(kind) ?? 0 })),
		onHold: tiles.onHold,
		notExact: tiles.notExact,
		attention: { ...found, page: query.page, pageSize: ATTENTION_PAGE_SIZE }
	};
}

/** Fixtures a technician's list shows at most. */
export const DUE_WORK_LIMIT = 200;

/**
 * Routine work that has fallen due — break-in, inspection, cleaning — across the fleet, the one
 * due longest first. People have no areas yet, so everyone sees every fixture.
 */
export async function dueWork(actor: Actor): Promise<{ total: number; rows: AttentionRow[] }> {
	assertCan(actor, 'fixture.view');
	return attention({}, { kinds: DUE_WORK_KINDS, order: 'oldest', limit: DUE_WORK_LIMIT });
}
