/**
 * The fleet charts' figures (GET /api/fleet/trends and the board): read from the maintained tables
 * only — fixtures, fixture_state, flags, locations and areas — plus one time-bounded count of
 * entries. Six statements whatever the size of the fleet, none of which folds or reads event
 * payloads:
 *   1. fixtures joined to their state row (the columns copied out of the state, and from the
 *      state's JSON only the trend windows, the break-in flag and the commissioning time);
 *   2. the policy rows those fixtures use (one statement, `policiesFor`);
 *   3. the areas;
 *   4. open flags per area (GROUP BY over the flags table);
 *   5. flags raised and cleared per ISO week and kind within the range (GROUP BY in SQL);
 *   6. entries of the last 30 days per area: a GROUP BY joining fixtures to events, bounded by
 *      time and answered from the index (fixture_id, occurred_at) alone, one range per fixture.
 * The histogram, forecast and area figures describe the fleet now; `from`–`to` bounds the flags
 * chart. Calendar flags are kept current by the scheduled scan and by the board's summary, not here
 * (a scan's statements grow with the fleet).
 */
import type { RowDataPacket } from 'mysql2/promise';
import {
	areaFigures,
	flagWeeks,
	forecastSummary,
	ratioHistogram,
	repeatabilityRatio,
	watchList,
	WATCH_RATIO,
	type FleetFixture,
	type FlagWeekCount
} from '../domain/fleet-stats';
import { FLAG_KINDS, type FlagKind } from '../domain/flag-kinds';
import type { WindowPoint } from '../domain/fold-state';
import { dateMs, type FleetTrendsQuery } from '../schemas/fleet-trends';
import type { FleetTrends } from '../schemas/fleet-trends-views';
import type { FixtureType } from '../schemas/fixture';
import { getPool } from './db';
import { parseJson } from './db/health-sql';
import { assertCan, type Actor } from './guard';
import { policiesFor } from './state-store';

export type { FleetTrends };

const DAY_MS = 86_400_000;
/** Entries are counted over this many days back from now. */
export const ENTRY_DAYS = 30;

const iso = (d: Date | null) => (d === null ? null : d.toISOString());

/** Statement 1: the fleet (retired fixtures left out) with what the charts read of each state. */
async function selectFleet(area: number | undefined) {
	const [rows] = await getPool().query<RowDataPacket[]>(
		`SELECT f.id, f.code, f.name, f.type, f.policy_id, f.policy_overrides,
		        f.repeatability_spec_um, f.rated_life_cycles, l.area_id,
		        s.fixture_id AS has_state, s.repeatability_um, s.total_cycles,
		        s.cycles_since_inspection, s.cycles_since_cleaning,
		        s.last_event_at, s.last_inspection_at, s.last_cleaning_at,
		        JSON_EXTRACT(s.data, '$.trend.windows') AS windows,
		        -- MariaDB's JSON_VALUE reads a JSON true as 1; JSON_EXTRACT gives the text 'true'.
		        JSON_EXTRACT(s.data, '$.breakIn.required') = 'true' AS breaking_in,
		        JSON_VALUE(s.data, '$.since') AS since
		   FROM fixtures f
		   JOIN locations l ON l.id = f.location_id
		   LEFT JOIN fixture_state s ON s.fixture_id = f.id
		  WHERE f.status <> 'retired' ${area ? 'AND l.area_id = ?' : ''}
		  ORDER BY f.id`,
		area ? [area] : []
	);
	return rows;
}

/** Statement 5: flags raised and cleared in [fromMs, toMs) by the Monday of their week and kind. */
async function selectFlagWeeks(fromMs: number, toMs: number, area: number | undefined) {
	const scope = area
		? 'JOIN fixtures f ON f.id = g.fixture_id JOIN locations l ON l.id = f.location_id AND l.area_id = ?'
		: '';
	const part = area ? [area, new Date(fromMs), new Date(toMs)] : [new Date(fromMs), new Date(toMs)];
	const week = (col: string) =>
		`DATE_FORMAT(DATE(g.${col}) - INTERVAL WEEKDAY(g.${col}) DAY, '%Y-%m-%d')`;
	const [rows] = await getPool().query<RowDataPacket[]>(
		`SELECT week_start, kind, SUM(raised) AS raised, SUM(cleared) AS cleared FROM (
		   SELECT ${week('raised_at')} AS week_start, g.kind, 1 AS raised, 0 AS cleared
		     FROM flags g ${scope} WHERE g.raised_at >= ? AND g.raised_at < ?
		   UNION ALL
		   SELECT ${week('cleared_at')}, g.kind, 0, 1
		     FROM flags g ${scope} WHERE g.cleared_at >= ? AND g.cleared_at < ?
		 ) t GROUP BY week_start, kind`,
		[...part, ...part]
	);
	return rows.map((r): FlagWeekCount => ({
		weekStart: r.week_start,
		kind: r.kind as FlagKind,
		raised: Number(r.raised),
		cleared: Number(r.cleared)
	}));
}

/** Area id → a count, from rows of (area_id, n). */
const byArea = (rows: RowDataPacket[]) =>
	new Map(rows.map((r) => [Number(r.area_id), Number(r.n)] as const));

/**
 * The fleet charts for a query, or null when `query.area` names no area. The caller needs
 * fleet.view.
 */
export async function fleetTrends(
	actor: Actor,
	query: FleetTrendsQuery,
	now: Date = new Date()
): Promise<FleetTrends | null> {
	assertCan(actor, 'fleet.view');
	const area = query.area;
	const areaWhere = area ? 'WHERE l.area_id = ?' : '';
	const areaArgs = area ? [area] : [];
	const fromMs = dateMs(query.from);
	// `to` is included: the range ends at the next midnight.
	const toMs = dateMs(query.to) + DAY_MS;
	const pool = getPool();

	const [fleetRows, [areaRows], [openRows], weekCounts, [entryRows]] = await Promise.all([
		selectFleet(area),
		pool.query<RowDataPacket[]>(
			`SELECT id, name FROM areas ${area ? 'WHERE id = ?' : ''} ORDER BY name, id`,
			areaArgs
		),
		pool.query<RowDataPacket[]>(
			`SELECT l.area_id, COUNT(*) AS n
			   FROM flags g
			   JOIN fixtures f ON f.id = g.fixture_id
			   JOIN locations l ON l.id = f.location_id
			  WHERE g.cleared_at IS NULL ${area ? 'AND l.area_id = ?' : ''}
			  GROUP BY l.area_id`,
			areaArgs
		),
		selectFlagWeeks(fromMs, toMs, area),
		pool.query<RowDataPacket[]>(
			`SELECT l.area_id, COUNT(*) AS n
			   FROM fixtures f
			   JOIN locations l ON l.id = f.location_id
			   JOIN events e ON e.fixture_id = f.id AND e.occurred_at >= ?
			   ${areaWhere}
			  GROUP BY l.area_id`,
			[new Date(now.getTime() - ENTRY_DAYS * DAY_MS), ...areaArgs]
		)
	]);
	if (area && areaRows.length === 0) return null;

	const subjects = fleetRows.map((r) => ({
		id: r.id as number,
		code: r.code as string,
		status: 'in-service',
		commissionedOn: null,
		type: r.type as FixtureType,
		policyId: r.policy_id as number | null,
		policyOverrides: parseJson<Record<string, number | null>>(r.policy_overrides),
		repeatabilitySpec_um: r.repeatability_spec_um as number | null,
		ratedLifeCycles: r.rated_life_cycles as number | null
	}));
	const policies = await policiesFor(subjects);

	const fleet: FleetFixture[] = fleetRows.map((r) => ({
		id: r.id,
		code: r.code,
		name: r.name,
		areaId: r.area_id,
		R_um: r.repeatability_um,
		spec_um: policies.get(r.id)!.repeatabilitySpec_um,
		trend: {
			totalCycles: r.total_cycles ?? 0,
			// A fixture with no entry yet starts breaking in (see initialState).
			breakIn: { required: r.has_state === null || Number(r.breaking_in) === 1 },
			trend: { windows: parseJson<WindowPoint[]>(r.windows) ?? [] }
		},
		lastEventAt: iso(r.last_event_at),
		since: r.since ?? null,
		lastInspectionAt: iso(r.last_inspection_at),
		cyclesSinceInspection: r.cycles_since_inspection ?? 0,
		lastCleaningAt: iso(r.last_cleaning_at),
		cyclesSinceCleaning: r.cycles_since_cleaning ?? 0
	}));

	const areas = areaRows.map((a) => ({ id: Number(a.id), name: String(a.name) }));
	const areaName = new Map(areas.map((a) => [a.id, a.name]));
	const named = <T extends { areaId: number }>(row: T) => ({
		...row,
		areaName: areaName.get(row.areaId) ?? ''
	});
	const ratios = fleet.map(repeatabilityRatio).filter((r): r is number => r !== null);
	const forecast = forecastSummary(fleet, now.getTime());
	const weeks = flagWeeks(weekCounts, fromMs, toMs - 1);
	const total = (side: 'raised' | 'cleared') =>
		Object.fromEntries(
			FLAG_KINDS.map((k) => [k, weeks.reduce((n, w) => n + w[side][k], 0)])
		) as Record<FlagKind, number>;

	return {
		generatedAt: now.toISOString(),
		query: {
			from: query.from,
			to: query.to,
			area: area ? { id: area, name: areaName.get(area)! } : null
		},
		repeatability: {
			bins: ratioHistogram(ratios),
			rated: ratios.length,
			unrated: fleet.length - ratios.length,
			watchRatio: WATCH_RATIO,
			watch: watchList(fleet).map(named)
		},
		forecast: { ...forecast, fixtures: forecast.fixtures.map(named) },
		flags: { weeks, raised: total('raised'), cleared: total('cleared') },
		areas: areaFigures(areas, fleet, byArea(openRows), byArea(entryRows))
	};
}
