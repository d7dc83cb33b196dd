/**
 * Health as the API and the fixture page read it: open flags across the register, and one
 * fixture's state, flags, figures and the series behind its charts.
 */
import { and, desc, eq, isNull, sql } from 'drizzle-orm';
import type { RowDataPacket } from 'mysql2/promise';
import { fixtureForecast, recentRepeatability, type FixtureState } from '../domain/health';
import { forecastCrossing } from '../domain/forecast';
import type { Policy } from '../domain/policy';
import { individualsChart } from '../domain/spc';
import { breakInCurve, type CurveReading } from '../domain/break-in-curves';
import { normaliseFixtureCode } from '../domain/fixture-code';
import type { FlagsQuery } from '../schemas/flags-query';
import type {
	AxisChart,
	BreakInRun,
	FixtureHealth,
	OpenFlagRow,
	ReadingPoint,
	TrendLine
} from '../schemas/health-views';
import { db, getPool, schema } from './db';
import { scanOnRead } from './due-scan';
import { loadHealthFixtures } from './health';
import { initialStateFor, policiesFor } from './state-store';

export type { AxisChart, BreakInRun, FixtureHealth, OpenFlagRow, ReadingPoint, TrendLine };

/** Readings returned for the charts (the latest ones). */
export const CHART_READINGS = 500;
/** Break-in runs drawn as settling curves (the latest ones). */
export const CHART_BREAK_IN_RUNS = 8;
/** Phase-I points for the chart limits (as the domain's drift rule uses). */
const BASELINE = 20;

/** Whether a read first brings calendar flags up to date (they fall due without any event). */
export interface ReadOptions {
	dueScan?: boolean;
}

/** Open flags, newest first, optionally of one kind or in one area. */
export async function openFlags(
	query: FlagsQuery,
	{ dueScan = false }: ReadOptions = {}
): Promise<OpenFlagRow[]> {
	if (dueScan) await scanOnRead();
	const f = schema.flags;
	const fx = schema.fixtures;
	const rows = await db
		.select({
			id: f.id,
			kind: f.kind,
			reason: f.reason,
			figures: f.figures,
			raisedAt: f.raisedAt,
			raisedByEventId: f.raisedByEventId,
			code: fx.code,
			name: fx.name,
			type: fx.type,
			status: fx.status,
			locationId: schema.locations.id,
			locationName: schema.locations.name,
			areaId: schema.areas.id,
			areaName: schema.areas.name
		})
		.from(f)
		.innerJoin(fx, eq(fx.id, f.fixtureId))
		.innerJoin(schema.locations, eq(schema.locations.id, fx.locationId))
		.innerJoin(schema.areas, eq(schema.areas.id, schema.locations.areaId))
		.where(
			and(
				isNull(f.clearedAt),
				query.kind ? eq(f.kind, query.kind) : undefined,
				query.area ? eq(schema.areas.id, query.area) : undefined
			)
		)
		.orderBy(desc(f.raisedAt), desc(f.id));
	return rows.map((r) => ({
		id: r.id,
		kind: r.kind,
		reason: r.reason,
		figures: r.figures,
		raisedAt: r.raisedAt.toISOString(),
		raisedByEventId: r.raisedByEventId,
		fixture: { code: r.code, name: r.name, type: r.type, status: r.status },
		location: {
			id: r.locationId,
			name: r.locationName,
			area: { id: r.areaId, name: r.areaName }
		}
	}));
}

const AXES = [
	['x', 'dx'],
	['y', 'dy'],
	['z', 'dz']
] as const;

type RawReading = { dx?: number; dy?: number; dz?: number };

/** The latest readings of a fixture's reseats and break-in runs, oldest first. */
async function latestReadings(fixtureId: number): Promise<ReadingPoint[]> {
	const [rows] = await getPool().query<RowDataPacket[]>(
		`SELECT id, kind, occurred_at, payload FROM events
		  WHERE fixture_id = ? AND kind IN ('reseat', 'break-in')
		    -- An object of axes (reseat) or a non-empty array (break-in run); absent gives NULL.
		    AND JSON_LENGTH(payload, '$.readings') > 0
		  ORDER BY occurred_at DESC, id DESC LIMIT ?`,
		[fixtureId, CHART_READINGS]
	);
	const out: Omit<ReadingPoint, 'n'>[] = [];
	for (const r of rows.reverse()) {
		const payload = (typeof r.payload === 'string' ? JSON.parse(r.payload) : r.payload) as {
			readings?: RawReading | RawReading[];
		};
		const list = Array.isArray(payload.readings)
			? payload.readings
			: payload.readings
				? [payload.readings]
				: [];
		for (const reading of list) {
			out.push({
				eventId: r.id,
				occurredAt: (r.occurred_at as Date).toISOString(),
				dx: reading.dx ?? null,
				dy: reading.dy ?? null,
				dz: reading.dz ?? null
			});
		}
	}
	return out.slice(-CHART_READINGS).map((p, i) => ({ n: i + 1, ...p }));
}

/** The latest break-in runs with readings, oldest first, with their rolling R against the spec. */
async function breakInRuns(fixtureId: number, policy: Policy): Promise<BreakInRun[]> {
	const [rows] = await getPool().query<RowDataPacket[]>(
		`SELECT id, occurred_at, payload FROM events
		  WHERE fixture_id = ? AND kind = 'break-in' AND JSON_LENGTH(payload, '$.readings') > 0
		  ORDER BY occurred_at DESC, id DESC LIMIT ?`,
		[fixtureId, CHART_BREAK_IN_RUNS]
	);
	return rows.reverse().map((r) => {
		const payload = (typeof r.payload === 'string' ? JSON.parse(r.payload) : r.payload) as {
			cycles: number;
			readings: CurveReading[];
		};
		// The settling window of the policy: a run with fewer readings draws no curve.
		const window = policy.settleWindow;
		const curve = breakInCurve(
			payload.readings,
			payload.cycles,
			window,
			policy.repeatabilitySpec_um
		);
		return {
			eventId: r.id,
			occurredAt: (r.occurred_at as Date).toISOString(),
			cycles: payload.cycles,
			readings: payload.readings.length,
			window,
			...curve
		};
	});
}

/**
 * I-MR chart per measured axis over the service readings: those logged after the last break-in
 * completed, as the drift rule judges them (settling readings would set limits from scatter that
 * has since gone). None while a break-in is running. Limits from the first BASELINE points shown.
 */
function axisCharts(readings: ReadingPoint[], state: FixtureState): AxisChart[] {
	const b = state.breakIn;
	if (b.required) return [];
	const after = b.completedAt === null ? -Infinity : Date.parse(b.completedAt);
	const service = readings.filter((r) => Date.parse(r.occurredAt) > after);
	const charts: AxisChart[] = [];
	for (const [axis, key] of AXES) {
		const points = service.filter((r) => r[key] !== null);
		if (points.length < 3) continue;
		const values = points.map((r) => r[key]!);
		const baseline = Math.min(BASELINE, values.length);
		charts.push({
			axis,
			values,
			at: points.map((p) => p.n),
			baseline,
			...individualsChart(values, { baseline })
		});
	}
	return charts;
}

function trendLines(windows: { cycle: number; R: number }[], spec: number): TrendLine[] {
	if (windows.length < 2 || windows[0].cycle === windows[windows.length - 1].cycle) return [];
	const points = windows.map((w) => ({ x: w.cycle, y: w.R }));
	return [
		{ method: 'ols', convention: null, ...forecastCrossing(points, spec, { method: 'ols' }) },
		{
			method: 'theil-sen',
			convention: 'separate',
			...forecastCrossing(points, spec, { method: 'theil-sen', intercept: 'separate' })
		}
	];
}

/** One fixture's health, or null when there is no such code. */
export async function fixtureHealth(
	code: string,
	{ dueScan = false }: ReadOptions = {}
): Promise<FixtureHealth | null> {
	const reading = normaliseFixtureCode(code);
	if (!reading.ok) return null;
	const [row] = await db
		.select({ id: schema.fixtures.id, name: schema.fixtures.name, status: schema.fixtures.status })
		.from(schema.fixtures)
		.where(eq(schema.fixtures.code, reading.code))
		.limit(1);
	if (!row) return null;
	if (dueScan) await scanOnRead(row.id);
	const [fixture] = await loadHealthFixtures([row.id]);
	const policy = (await policiesFor([fixture])).get(fixture.id)!;

	const f = schema.flags;
	const [stateRows, flagRows, readings, runs] = await Promise.all([
		db
			.select({ data: schema.fixtureState.data })
			.from(schema.fixtureState)
			.where(eq(schema.fixtureState.fixtureId, fixture.id)),
		db
			.select()
			.from(f)
			.where(eq(f.fixtureId, fixture.id))
			.orderBy(desc(sql`${f.clearedAt} IS NULL`), desc(f.raisedAt), desc(f.id))
			.limit(60),
		latestReadings(fixture.id),
		breakInRuns(fixture.id, policy)
	]);
	const state = (stateRows[0]?.data as unknown as FixtureState) ?? initialStateFor(fixture);
	const flagOut = (r: (typeof flagRows)[number]) => ({
		id: r.id,
		kind: r.kind,
		reason: r.reason,
		figures: r.figures,
		raisedAt: r.raisedAt.toISOString(),
		raisedByEventId: r.raisedByEventId
	});

	return {
		fixture: {
			id: fixture.id,
			code: fixture.code,
			name: row.name,
			type: fixture.type,
			status: row.status
		},
		policy,
		state,
		hasState: stateRows.length > 0,
		figures: {
			repeatability: recentRepeatability(state),
			spec_um: policy.repeatabilitySpec_um,
			forecast: fixtureForecast(state, policy)
		},
		flags: {
			open: flagRows.filter((r) => r.clearedAt === null).map(flagOut),
			recent: flagRows
				.filter((r) => r.clearedAt !== null)
				.slice(0, 20)
				.map((r) => ({
					...flagOut(r),
					clearedAt: r.clearedAt!.toISOString(),
					clearedByEventId: r.clearedByEventId
				}))
		},
		series: {
			repeatability: state.trend.windows.map((w) => ({ cycle: w.cycle, R: w.R })),
			breakIn: state.breakIn.windows.map((w) => ({ cycle: w.cycle, R: w.R })),
			breakInRuns: runs,
			forecasts: trendLines(state.trend.windows, policy.repeatabilitySpec_um),
			readings,
			spc: axisCharts(readings, state)
		}
	};
}
