/**
 * Figures across the fleet for the board's charts, from what each fixture's folded state already
 * holds: its current repeatability against its spec, its trend forecast, and counts of flags and
 * entries that the server groups in SQL. Pure: the server reads the rows, this module shapes them.
 *
 * Conventions (stated on the board as well):
 * - Ratio = current R (R = 4s over the last repeatability window, ISO 230-2 style) ÷ the fixture's
 *   effective spec. Fixtures breaking in are left out, as the out-of-spec rule leaves them out:
 *   their scatter describes settling. Bins are 0.1 wide and half-open, [a, a + 0.1), the same
 *   convention as numpy.histogram's inner bins; the last bin holds every ratio ≥ 1.5.
 * - Forecast: the fixture page's Theil–Sen trend of windowed R against cycles (fixtureForecast)
 *   gives the cycles left until the line meets the spec. Cycles become days at the fixture's
 *   recent rate of use — cycles since its last inspection ÷ days from that inspection to its last
 *   entry; failing that (none, or under RATE_MIN_SPAN_DAYS), since its last cleaning; failing
 *   that, since commissioning or its first entry — counted from its last entry. "Within 90 days"
 *   includes "within 30 days". A fixture whose latest window is already above its spec is counted
 *   apart, as above spec now.
 * - Weeks are ISO 8601 weeks (Monday to Sunday, UTC); the first and last week of a range count
 *   only the days inside it.
 * - Medians take the mean of the two middle values for an even count.
 */
import { DomainInputError } from './errors';
import { FLAG_KINDS, type FlagKind } from './flag-kinds';
import { fixtureForecast, type ForecastSource } from './fold-sums';
import { median } from './forecast';
import { isoMs } from './time';

const DAY_MS = 86_400_000;

/** Width of one histogram bin, as a fraction of the spec. */
export const RATIO_BIN_WIDTH = 0.1;
/** Closed bins cover 0 to this ratio; one open bin above holds every ratio at or past it. */
export const RATIO_TOP = 1.5;
/** Fixtures whose R is above this fraction of their spec are listed beside the histogram. */
export const WATCH_RATIO = 0.8;
/** The forecast's horizons, in days. */
export const FORECAST_HORIZONS_DAYS = [30, 90, 180] as const;
/** Shortest span, in days, over which a rate of use is taken. */
export const RATE_MIN_SPAN_DAYS = 7;
/** Fixtures listed under the forecast chart (the soonest). */
export const FORECAST_LIST_MAX = 25;

const TENTHS = Math.round(RATIO_TOP / RATIO_BIN_WIDTH);

/** One bin of the repeatability histogram: ratios in [from, to), or ≥ from when `to` is null. */
export interface RatioBin {
	from: number;
	to: number | null;
	label: string;
	count: number;
}

/** The bin index of a ratio: tenths, rounded first so that 0.3 lands in [0.3, 0.4). */
export function ratioBinIndex(ratio: number): number {
	if (!Number.isFinite(ratio) || ratio < 0) {
		throw new DomainInputError('ratio', 'must be a finite number ≥ 0');
	}
	// 0.3 / 0.1 is 2.9999999999999996 in binary floating point: round away the last bits first.
	const tenths = Math.floor(Math.round(ratio * 1e9) / 1e8);
	return Math.min(tenths, TENTHS);
}

const tenth = (k: number) => (k / 10).toFixed(1);

/** Histogram of ratios in bins 0.1 wide from 0 to RATIO_TOP, and one open bin above. */
export function ratioHistogram(ratios: readonly number[]): RatioBin[] {
	const bins: RatioBin[] = Array.from({ length: TENTHS + 1 }, (_, k) => ({
		from: k / 10,
		to: k < TENTHS ? (k + 1) / 10 : null,
		label: k < TENTHS ? `${tenth(k)}–${tenth(k + 1)}` : `≥ ${tenth(k)}`,
		count: 0
	}));
	for (const r of ratios) bins[ratioBinIndex(r)].count++;
	return bins;
}

/** What the fleet figures need to know about one fixture. */
export interface FleetFixture {
	id: number;
	code: string;
	name: string;
	areaId: number;
	/** Current R (µm) over the last repeatability window; null before two readings. */
	R_um: number | null;
	/** The effective spec (µm). */
	spec_um: number;
	/** The trend windows and cycle count the forecast reads. */
	trend: ForecastSource;
	lastEventAt: string | null;
	/** Commissioning date, or the first entry's time. */
	since: string | null;
	lastInspectionAt: string | null;
	cyclesSinceInspection: number;
	lastCleaningAt: string | null;
	cyclesSinceCleaning: number;
}

/** R ÷ spec, or null when the fixture is breaking in, has no R yet, or no positive spec. */
export function repeatabilityRatio(f: FleetFixture): number | null {
	if (f.trend.breakIn.required || f.R_um === null || !(f.spec_um > 0)) return null;
	return f.R_um / f.spec_um;
}

/** Where a rate of use was taken from. */
export type RateBasis = 'inspection' | 'cleaning' | 'since';

/** A fixture's recent rate of use in cycles per day (see the module's conventions), or null. */
export function cycleRate(
	f: FleetFixture
): { cyclesPerDay: number; basis: RateBasis; spanDays: number } | null {
	if (f.lastEventAt === null) return null;
	const end = isoMs(f.lastEventAt);
	const anchors: [RateBasis, string | null, number][] = [
		['inspection', f.lastInspectionAt, f.cyclesSinceInspection],
		['cleaning', f.lastCleaningAt, f.cyclesSinceCleaning],
		['since', f.since, f.trend.totalCycles]
	];
	for (const [basis, at, cycles] of anchors) {
		if (at === null || !(cycles > 0)) continue;
		const spanDays = (end - isoMs(at)) / DAY_MS;
		if (spanDays >= RATE_MIN_SPAN_DAYS) return { cyclesPerDay: cycles / spanDays, basis, spanDays };
	}
	return null;
}

/** One fixture's forecast in days. */
export type DaysForecast =
	| { kind: 'above-spec' }
	/** `days` from now until the trend meets the spec; ≤ 0 when that day has passed. */
	| { kind: 'crossing'; days: number; cyclesToSpec: number; cyclesPerDay: number; basis: RateBasis }
	| { kind: 'not-rising' }
	| { kind: 'no-forecast'; why: 'breaking-in' | 'too-few-windows' | 'no-rate' };

/** When a fixture's trend meets its spec, in days from `nowMs` (see the module's conventions). */
export function forecastDays(f: FleetFixture, nowMs: number): DaysForecast {
	if (f.trend.breakIn.required) return { kind: 'no-forecast', why: 'breaking-in' };
	const fc = fixtureForecast(f.trend, { repeatabilitySpec_um: f.spec_um });
	if (fc === null) return { kind: 'no-forecast', why: 'too-few-windows' };
	if (fc.status === 'exceeded') return { kind: 'above-spec' };
	if (fc.status === 'no-crossing' || fc.cyclesToSpec === null) return { kind: 'not-rising' };
	const rate = cycleRate(f);
	if (rate === null) return { kind: 'no-forecast', why: 'no-rate' };
	const crossingMs = isoMs(f.lastEventAt!) + (fc.cyclesToSpec / rate.cyclesPerDay) * DAY_MS;
	return {
		kind: 'crossing',
		days: (crossingMs - nowMs) / DAY_MS,
		cyclesToSpec: fc.cyclesToSpec,
		cyclesPerDay: rate.cyclesPerDay,
		basis: rate.basis
	};
}

/** A fixture listed beside the histogram or under the forecast. */
export type FleetFixtureRow = Pick<
	FleetFixture,
	'id' | 'code' | 'name' | 'areaId' | 'R_um' | 'spec_um'
> & {
	ratio: number | null;
};

/** A fixture under the forecast chart: above spec now, or forecast to meet it within the horizon. */
export interface ForecastRow extends FleetFixtureRow {
	/** Days until the trend meets the spec (0 when already passed); null when above spec now. */
	days: number | null;
	basis: RateBasis | null;
}

/** Counts behind the forecast chart. */
export interface ForecastSummary {
	aboveSpec: number;
	/** Cumulative: fixtures forecast to meet their spec within each horizon (not above it now). */
	within: { days: number; count: number }[];
	/** Forecast to meet the spec, but beyond the longest horizon. */
	later: number;
	/** Trend flat or falling: not forecast to meet the spec. */
	notRising: number;
	/** No forecast: breaking in, too few trend windows, or no rate of use. */
	noForecast: number;
	fixtures: ForecastRow[];
}

const row = (f: FleetFixture): FleetFixtureRow => ({
	id: f.id,
	code: f.code,
	name: f.name,
	areaId: f.areaId,
	R_um: f.R_um,
	spec_um: f.spec_um,
	ratio: repeatabilityRatio(f)
});

/** Fixtures above WATCH_RATIO × spec, highest ratio first. */
export function watchList(fixtures: readonly FleetFixture[]): FleetFixtureRow[] {
	return fixtures
		.map(row)
		.filter((r) => r.ratio !== null && r.ratio > WATCH_RATIO)
		.sort((a, b) => b.ratio! - a.ratio! || a.code.localeCompare(b.code));
}

/** The forecast chart's counts and the fixtures behind its bars. */
export function forecastSummary(fixtures: readonly FleetFixture[], nowMs: number): ForecastSummary {
	const longest = FORECAST_HORIZONS_DAYS[FORECAST_HORIZONS_DAYS.length - 1];
	const out: ForecastSummary = {
		aboveSpec: 0,
		within: FORECAST_HORIZONS_DAYS.map((days) => ({ days, count: 0 })),
		later: 0,
		notRising: 0,
		noForecast: 0,
		fixtures: []
	};
	for (const f of fixtures) {
		const fc = forecastDays(f, nowMs);
		if (fc.kind === 'above-spec') {
			out.aboveSpec++;
			out.fixtures.push({ ...row(f), days: null, basis: null });
		} else if (fc.kind === 'crossing') {
			const days = Math.max(0, fc.days);
			if (days > longest) out.later++;
			else out.fixtures.push({ ...row(f), days, basis: fc.basis });
			for (const w of out.within) if (days <= w.days) w.count++;
		} else if (fc.kind === 'not-rising') out.notRising++;
		else out.noForecast++;
	}
	out.fixtures.sort((a, b) => (a.days ?? -1) - (b.days ?? -1) || a.code.localeCompare(b.code));
	out.fixtures = out.fixtures.slice(0, FORECAST_LIST_MAX);
	return out;
}

/** The Monday (UTC, YYYY-MM-DD) of the ISO week holding `ms`. */
export function mondayOf(ms: number): string {
	const day = Math.floor(ms / DAY_MS);
	// 1970-01-01 (day 0) was a Thursday: Monday-based weekday = (day + 3) mod 7.
	const weekday = (((day + 3) % 7) + 7) % 7;
	return new Date((day - weekday) * DAY_MS).toISOString().slice(0, 10);
}

/** ISO 8601 week-numbering year and week of the day holding `ms` (UTC): 2026-W49. */
export function isoWeek(ms: number): { year: number; week: number; label: string } {
	const monday = Date.parse(`${mondayOf(ms)}T00:00:00Z`);
	// The week belongs to the year of its Thursday; week 1 holds that year's first Thursday.
	const thursday = new Date(monday + 3 * DAY_MS);
	const year = thursday.getUTCFullYear();
	const week = Math.floor((thursday.getTime() - Date.UTC(year, 0, 1)) / DAY_MS / 7) + 1;
	return { year, week, label: `${year}-W${String(week).padStart(2, '0')}` };
}

/** Flags raised or cleared in one week of one kind, as grouped by the server. */
export interface FlagWeekCount {
	/** The week's Monday (YYYY-MM-DD). */
	weekStart: string;
	kind: FlagKind;
	raised: number;
	cleared: number;
}

/** One ISO week of the flags chart. */
export interface FlagWeek {
	week: string;
	start: string;
	raised: Record<FlagKind, number>;
	cleared: Record<FlagKind, number>;
}

const zeroKinds = () =>
	Object.fromEntries(FLAG_KINDS.map((k) => [k, 0])) as Record<FlagKind, number>;

/** Every ISO week from the one holding `fromMs` to the one holding `toMs`, with the counts filled in. */
export function flagWeeks(
	counts: readonly FlagWeekCount[],
	fromMs: number,
	toMs: number
): FlagWeek[] {
	if (!(toMs >= fromMs)) throw new DomainInputError('to', 'must not be before from');
	const weeks: FlagWeek[] = [];
	const byStart = new Map<string, FlagWeek>();
	const last = Date.parse(`${mondayOf(toMs)}T00:00:00Z`);
	for (let t = Date.parse(`${mondayOf(fromMs)}T00:00:00Z`); t <= last; t += 7 * DAY_MS) {
		const start = new Date(t).toISOString().slice(0, 10);
		const w = { week: isoWeek(t).label, start, raised: zeroKinds(), cleared: zeroKinds() };
		weeks.push(w);
		byStart.set(start, w);
	}
	for (const c of counts) {
		const w = byStart.get(c.weekStart);
		if (!w) throw new DomainInputError('counts', `week ${c.weekStart} is outside the range`);
		w.raised[c.kind] += c.raised;
		w.cleared[c.kind] += c.cleared;
	}
	return weeks;
}

/** An area's figures on the board. */
export interface AreaFigures {
	areaId: number;
	areaName: string;
	fixtures: number;
	openFlags: number;
	/** Median R ÷ spec over the area's fixtures that have one; null when none has. */
	medianRatio: number | null;
	/** Fixtures behind the median. */
	rated: number;
	entries30d: number;
}

/** Per area: fixtures, open flags, median R ÷ spec and entries, in the order the areas are given. */
export function areaFigures(
	areas: readonly { id: number; name: string }[],
	fixtures: readonly FleetFixture[],
	openFlagsByArea: ReadonlyMap<number, number>,
	entriesByArea: ReadonlyMap<number, number>
): AreaFigures[] {
	const byArea = new Map<number, FleetFixture[]>();
	for (const f of fixtures) {
		const list = byArea.get(f.areaId);
		if (list) list.push(f);
		else byArea.set(f.areaId, [f]);
	}
	return areas.map((a) => {
		const mine = byArea.get(a.id) ?? [];
		const ratios = mine.map(repeatabilityRatio).filter((r): r is number => r !== null);
		return {
			areaId: a.id,
			areaName: a.name,
			fixtures: mine.length,
			openFlags: openFlagsByArea.get(a.id) ?? 0,
			medianRatio: ratios.length ? median(ratios) : null,
			rated: ratios.length,
			entries30d: entriesByArea.get(a.id) ?? 0
		};
	});
}
