/** The fleet charts as the API and the board show them: plain types, no I/O (built in $lib/server/fleet-trends). */
import type {
	AreaFigures,
	FlagWeek,
	FleetFixtureRow,
	ForecastSummary,
	RatioBin
} from '../domain/fleet-stats';
import type { FlagKind } from '../domain/flag-kinds';

export type { AreaFigures, FlagWeek, FleetFixtureRow, ForecastSummary, RatioBin };

/** A fixture named on a chart, with its area's name. */
export type NamedFixtureRow = FleetFixtureRow & { areaName: string };

/** Everything the four fleet charts draw. */
export interface FleetTrends {
	generatedAt: string;
	/** The range of the flags chart (dates included, UTC) and the area the charts are narrowed to. */
	query: { from: string; to: string; area: { id: number; name: string } | null };
	repeatability: {
		bins: RatioBin[];
		/** Fixtures in the histogram (settled, with a current R). */
		rated: number;
		/** Fixtures left out: breaking in, or too few readings yet. */
		unrated: number;
		watchRatio: number;
		watch: NamedFixtureRow[];
	};
	forecast: Omit<ForecastSummary, 'fixtures'> & {
		fixtures: (ForecastSummary['fixtures'][number] & { areaName: string })[];
	};
	flags: {
		weeks: FlagWeek[];
		/** Totals over the range, by kind. */
		raised: Record<FlagKind, number>;
		cleared: Record<FlagKind, number>;
	};
	areas: AreaFigures[];
}
