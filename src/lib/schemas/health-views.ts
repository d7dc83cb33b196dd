/** Health as the API and the fixture page show it: plain types, no I/O (built in $lib/server/health-report). */
import type { BreakInCurve } from '../domain/break-in-curves';
import type { Forecast } from '../domain/forecast';
import type { fixtureForecast, FixtureState, recentRepeatability } from '../domain/health';
import type { Policy } from '../domain/policy';
import type { IndividualsChart } from '../domain/spc';

/** An open flag with its fixture and place. */
export interface OpenFlagRow {
	id: number;
	kind: string;
	reason: string;
	figures: Record<string, number | string | null> | null;
	raisedAt: string;
	raisedByEventId: string | null;
	fixture: { code: string; name: string; type: string; status: string };
	location: { id: number; name: string; area: { id: number; name: string } };
}

/** One reading of the chart series: the seating's number among those shown and its axes. */
export interface ReadingPoint {
	n: number;
	eventId: string;
	occurredAt: string;
	dx: number | null;
	dy: number | null;
	dz: number | null;
}

/** Individuals / moving-range chart of one axis. */
export interface AxisChart extends IndividualsChart {
	axis: 'x' | 'y' | 'z';
	values: number[];
	/** Seating number (ReadingPoint.n) of each value. */
	at: number[];
	baseline: number;
}

/** A trend line over the windowed R with its spec crossing. */
export interface TrendLine extends Forecast {
	method: 'ols' | 'theil-sen';
	/** The intercept convention (Theil–Sen only). */
	convention: 'separate' | null;
}

/** One past break-in run and its rolling R (see breakInCurve). */
export interface BreakInRun extends BreakInCurve {
	eventId: string;
	occurredAt: string;
	cycles: number;
	readings: number;
	/** Window of the rolling R (the policy's settling window). */
	window: number;
}

/** Everything GET /api/fixtures/[code]/health returns. */
export interface FixtureHealth {
	fixture: { id: number; code: string; name: string; type: string; status: string };
	policy: Policy;
	state: FixtureState;
	hasState: boolean;
	figures: {
		repeatability: ReturnType<typeof recentRepeatability>;
		spec_um: number;
		forecast: ReturnType<typeof fixtureForecast>;
	};
	flags: {
		open: Omit<OpenFlagRow, 'fixture' | 'location'>[];
		recent: (Omit<OpenFlagRow, 'fixture' | 'location'> & {
			clearedAt: string;
			clearedByEventId: string | null;
		})[];
	};
	series: {
		/** Windowed R against total cycles (the windows the forecast uses). */
		repeatability: { cycle: number; R: number }[];
		breakIn: { cycle: number; R: number }[];
		/** The latest break-in runs with readings, oldest first, each with its rolling R. */
		breakInRuns: BreakInRun[];
		forecasts: TrendLine[];
		readings: ReadingPoint[];
		spc: AxisChart[];
	};
}
