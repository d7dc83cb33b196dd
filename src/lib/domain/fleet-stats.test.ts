import { describe, expect, it } from 'vitest';
import {
	areaFigures,
	cycleRate,
	flagWeeks,
	forecastDays,
	forecastSummary,
	isoWeek,
	mondayOf,
	ratioBinIndex,
	ratioHistogram,
	repeatabilityRatio,
	watchList,
	type FleetFixture
} from './fleet-stats';

const DAY = 86_400_000;
const NOW = Date.parse('2026-12-05T12:00:00.000Z');
const iso = (ms: number) => new Date(ms).toISOString();
const daysAgo = (d: number) => iso(NOW - d * DAY);

/** A settled fixture with no trend yet; tests override what they need. */
function fixture(over: Partial<FleetFixture> = {}): FleetFixture {
	return {
		id: 1,
		code: 'NM-AAAAA',
		name: 'Test fixture',
		areaId: 1,
		R_um: 0.5,
		spec_um: 1,
		trend: { totalCycles: 400, breakIn: { required: false }, trend: { windows: [] } },
		lastEventAt: daysAgo(10),
		since: daysAgo(400),
		lastInspectionAt: daysAgo(30),
		cyclesSinceInspection: 100,
		lastCleaningAt: daysAgo(12),
		cyclesSinceCleaning: 10,
		...over
	};
}

/** Windowed R rising 0.1 µm per 100 cycles from 0.5 at cycle 100: meets a 1 µm spec at cycle 600. */
const RISING = [
	{ cycle: 100, R: 0.5 },
	{ cycle: 200, R: 0.6 },
	{ cycle: 300, R: 0.7 },
	{ cycle: 400, R: 0.8 }
];
const rising = (totalCycles = 400) => ({
	totalCycles,
	breakIn: { required: false },
	trend: { windows: RISING }
});

describe('ratio histogram (bins [a, a + 0.1), as numpy.histogram; last bin ≥ 1.5)', () => {
	// Convention of the half-open bins: NumPy reference, numpy.histogram — "all but the last
	// (righthand-most) bin is half-open"; here the last bin is open-ended instead.
	it('puts a ratio on a bin edge in the bin that starts there', () => {
		expect(ratioBinIndex(0)).toBe(0);
		// 0.3 / 0.1 = 2.9999999999999996 in binary floating point [computed]: still bin [0.3, 0.4).
		expect(ratioBinIndex(0.3)).toBe(3);
		expect(ratioBinIndex(0.7)).toBe(7);
		expect(ratioBinIndex(0.8)).toBe(8);
		expect(ratioBinIndex(0.79999)).toBe(7);
		expect(ratioBinIndex(1.4999)).toBe(14);
		expect(ratioBinIndex(1.5)).toBe(15);
		expect(ratioBinIndex(12)).toBe(15);
	});

	it('refuses a negative or non-finite ratio', () => {
		expect(() => ratioBinIndex(-0.1)).toThrow(/ratio/);
		expect(() => ratioBinIndex(Number.NaN)).toThrow(/ratio/);
	});

	it('has 15 bins 0.1 wide and one open bin, and counts every ratio once', () => {
		const bins = ratioHistogram([0.05, 0.31, 0.35, 0.81, 1.2, 1.5, 3]);
		expect(bins).toHaveLength(16);
		expect(bins[0]).toEqual({ from: 0, to: 0.1, label: '0.0–0.1', count: 1 });
		expect(bins[3].count).toBe(2);
		expect(bins[8].count).toBe(1);
		expect(bins[12].count).toBe(1);
		expect(bins[15]).toEqual({ from: 1.5, to: null, label: '≥ 1.5', count: 2 });
		expect(bins.reduce((n, b) => n + b.count, 0)).toBe(7);
	});
});

describe('ratio and the watch list', () => {
	it('is R ÷ spec, and none while breaking in or without R', () => {
		expect(repeatabilityRatio(fixture({ R_um: 0.45, spec_um: 0.5 }))).toBeCloseTo(0.9, 12);
		expect(repeatabilityRatio(fixture({ R_um: null }))).toBeNull();
		const breakingIn = { ...rising(), breakIn: { required: true } };
		expect(repeatabilityRatio(fixture({ trend: breakingIn }))).toBeNull();
	});

	it('lists fixtures above 0.8 × spec (strictly), highest first', () => {
		const list = watchList([
			fixture({ id: 1, code: 'NM-A', R_um: 0.8 }),
			fixture({ id: 2, code: 'NM-B', R_um: 0.95 }),
			fixture({ id: 3, code: 'NM-C', R_um: 1.3 }),
			fixture({ id: 4, code: 'NM-D', R_um: 0.2 })
		]);
		expect(list.map((r) => r.code)).toEqual(['NM-C', 'NM-B']);
		expect(list[0].ratio).toBeCloseTo(1.3, 12);
	});
});

describe('rate of use', () => {
	// Computed: 100 cycles over the 20 days from the inspection (30 days ago) to the last entry
	// (10 days ago) = 5 cycles a day.
	it('is taken since the last inspection when that spans a week or more', () => {
		expect(cycleRate(fixture())).toEqual({ cyclesPerDay: 5, basis: 'inspection', spanDays: 20 });
	});

	it('falls back to the last cleaning, then to commissioning, when a span is under a week', () => {
		const recentInspection = fixture({ lastInspectionAt: daysAgo(12), cyclesSinceCleaning: 40 });
		// Inspection only 2 days before the last entry; cleaning 12 days ago also 2 days: commissioning.
		expect(cycleRate(recentInspection)).toMatchObject({ basis: 'since' });
		// 400 cycles over 390 days [computed].
		expect(cycleRate(recentInspection)!.cyclesPerDay).toBeCloseTo(400 / 390, 12);
		const cleaned = fixture({ lastInspectionAt: null, lastCleaningAt: daysAgo(24) });
		// 10 cycles over 14 days [computed].
		expect(cycleRate(cleaned)).toMatchObject({ basis: 'cleaning', spanDays: 14 });
	});

	it('is unknown without any entry or cycles', () => {
		expect(cycleRate(fixture({ lastEventAt: null }))).toBeNull();
		const idle = fixture({
			cyclesSinceInspection: 0,
			cyclesSinceCleaning: 0,
			trend: { ...rising(0) }
		});
		expect(cycleRate(idle)).toBeNull();
	});
});

describe('forecast in days (Theil–Sen trend, as on the fixture page)', () => {
	it('turns the cycles left to the spec into days at the rate of use, from the last entry', () => {
		// Theil–Sen on RISING: every pairwise slope is 0.001 µm/cycle; intercept (separate)
		// median(R) − b·median(cycle) = 0.65 − 0.25 = 0.4; spec 1 met at cycle 600 [computed].
		// 200 cycles left at 5 a day = 40 days after the last entry, which was 10 days ago.
		const f = forecastDays(fixture({ trend: rising() }), NOW);
		expect(f.kind).toBe('crossing');
		if (f.kind !== 'crossing') return;
		expect(f.cyclesToSpec).toBeCloseTo(200, 6);
		expect(f.days).toBeCloseTo(30, 6);
		expect(f.basis).toBe('inspection');
	});

	it('says above spec when the latest window is above it, and not rising for a flat trend', () => {
		expect(forecastDays(fixture({ trend: rising(), spec_um: 0.75 }), NOW)).toEqual({
			kind: 'above-spec'
		});
		const flat = { ...rising(), trend: { windows: RISING.map((w) => ({ ...w, R: 0.5 })) } };
		expect(forecastDays(fixture({ trend: flat }), NOW)).toEqual({ kind: 'not-rising' });
	});

	it('makes none while breaking in, with fewer than four windows, or without a rate', () => {
		const breakingIn = { ...rising(), breakIn: { required: true } };
		expect(forecastDays(fixture({ trend: breakingIn }), NOW)).toMatchObject({
			why: 'breaking-in'
		});
		const three = { ...rising(), trend: { windows: RISING.slice(0, 3) } };
		expect(forecastDays(fixture({ trend: three }), NOW)).toMatchObject({
			why: 'too-few-windows'
		});
		expect(forecastDays(fixture({ trend: rising(), lastEventAt: null }), NOW)).toMatchObject({
			why: 'no-rate'
		});
	});

	it('counts cumulatively within 30 / 90 / 180 days, and apart above spec, later and none', () => {
		// Computed per fixture: the trend meets the spec at cycle 600; the last entry was 10 days
		// ago, so days from now = cycles left ÷ rate − 10 (rate = cycles since inspection ÷ 20 days).
		// No case sits on a horizon, where rounding in the fit could tip it either way.
		const at = (id: number, totalCycles: number, over: Partial<FleetFixture> = {}) =>
			fixture({ id, code: `NM-${id}`, trend: rising(totalCycles), ...over });
		const fleet = [
			at(1, 410), // 190 left at 5/day → 28 days
			at(2, 550), // 50 left → 0 days
			at(3, 650), // past the crossing cycle, latest window below spec → due now (0)
			at(4, 0, { cyclesSinceInspection: 20 }), // 600 left at 1/day → 590 days: later
			at(5, 410, { cyclesSinceInspection: 40 }), // 190 left at 2/day → 85 days
			at(6, 400, { cyclesSinceInspection: 24 }), // 200 left at 1.2/day → 156.67 days
			at(7, 400, { spec_um: 0.75 }), // above spec now
			at(8, 400, { trend: { ...rising(), breakIn: { required: true } } }), // no forecast
			fixture({ id: 9, code: 'NM-9' }) // no windows: no forecast
		];
		const s = forecastSummary(fleet, NOW);
		expect(s.aboveSpec).toBe(1);
		expect(s.within).toEqual([
			{ days: 30, count: 3 },
			{ days: 90, count: 4 },
			{ days: 180, count: 5 }
		]);
		expect(s.later).toBe(1);
		expect(s.notRising).toBe(0);
		expect(s.noForecast).toBe(2);
		expect(s.fixtures.map((r) => r.code)).toEqual(['NM-7', 'NM-2', 'NM-3', 'NM-1', 'NM-5', 'NM-6']);
		expect(s.fixtures[0].days).toBeNull();
		expect(s.fixtures[5].days).toBeCloseTo(200 / 1.2 - 10, 6);
	});
});

describe('ISO 8601 weeks', () => {
	// ISO 8601-1:2019 week dates; the examples are those of Wikipedia's "ISO week date" article
	// (from memory), which follow the standard's rule that week 1 holds the year's first Thursday.
	it.each([
		['2005-01-01', '2004-W53'],
		['2005-01-02', '2004-W53'],
		['2005-12-31', '2005-W52'],
		['2007-01-01', '2007-W01'],
		['2007-12-30', '2007-W52'],
		['2007-12-31', '2008-W01'],
		['2008-01-01', '2008-W01'],
		['2008-12-28', '2008-W52'],
		['2008-12-29', '2009-W01'],
		['2009-12-31', '2009-W53'],
		['2010-01-03', '2009-W53'],
		['2010-01-04', '2010-W01']
	])('%s is in %s', (day, label) => {
		expect(isoWeek(Date.parse(`${day}T15:00:00Z`)).label).toBe(label);
	});

	it('starts a week on Monday (UTC)', () => {
		// 2026-12-05 is a Saturday (calendar); 2026-11-30 a Monday; 1970-01-01 a Thursday.
		expect(mondayOf(Date.parse('2026-12-05T23:59:59Z'))).toBe('2026-11-30');
		expect(mondayOf(Date.parse('2026-11-30T00:00:00Z'))).toBe('2026-11-30');
		expect(mondayOf(Date.parse('1970-01-01T00:00:00Z'))).toBe('1969-12-29');
	});

	it('fills every week of the range and adds the grouped counts by kind', () => {
		const weeks = flagWeeks(
			[
				{ weekStart: '2026-11-16', kind: 'drift', raised: 2, cleared: 0 },
				{ weekStart: '2026-11-30', kind: 'drift', raised: 0, cleared: 1 },
				{ weekStart: '2026-11-30', kind: 'cleaning-due', raised: 3, cleared: 3 }
			],
			Date.parse('2026-11-18T00:00:00Z'),
			Date.parse('2026-12-05T12:00:00Z')
		);
		expect(weeks.map((w) => w.week)).toEqual(['2026-W47', '2026-W48', '2026-W49']);
		expect(weeks[0].raised.drift).toBe(2);
		expect(weeks[1].raised.drift).toBe(0);
		expect(weeks[2].cleared).toMatchObject({ drift: 1, 'cleaning-due': 3, 'replace-now': 0 });
	});

	it('refuses counts outside the range and a range that ends before it starts', () => {
		expect(() =>
			flagWeeks([{ weekStart: '2020-01-06', kind: 'drift', raised: 1, cleared: 0 }], NOW, NOW)
		).toThrow(/outside/);
		expect(() => flagWeeks([], NOW, NOW - DAY)).toThrow(/before/);
	});
});

describe('per-area figures', () => {
	// Median: NIST/SEMATECH e-Handbook of Statistical Methods §1.3.5.1 (from memory): the middle
	// value, or the mean of the two middle values for an even count.
	it('counts fixtures, open flags and entries and takes the median ratio', () => {
		const fleet = [
			fixture({ id: 1, areaId: 1, R_um: 0.2 }),
			fixture({ id: 2, areaId: 1, R_um: 0.9 }),
			fixture({ id: 3, areaId: 1, R_um: 0.4 }),
			fixture({ id: 4, areaId: 1, R_um: 0.6 }),
			fixture({ id: 5, areaId: 1, R_um: null }),
			fixture({ id: 6, areaId: 2, R_um: 0.3, spec_um: 0.5 })
		];
		const rows = areaFigures(
			[
				{ id: 1, name: 'Bay' },
				{ id: 2, name: 'Lab' },
				{ id: 3, name: 'Empty room' }
			],
			fleet,
			new Map([[1, 4]]),
			new Map([
				[1, 17],
				[2, 3]
			])
		);
		expect(rows[0]).toMatchObject({ fixtures: 5, openFlags: 4, rated: 4, entries30d: 17 });
		// median(0.2, 0.4, 0.6, 0.9) = (0.4 + 0.6)/2 = 0.5
		expect(rows[0].medianRatio).toBeCloseTo(0.5, 12);
		expect(rows[1].medianRatio).toBeCloseTo(0.6, 12);
		expect(rows[2]).toEqual({
			areaId: 3,
			areaName: 'Empty room',
			fixtures: 0,
			openFlags: 0,
			medianRatio: null,
			rated: 0,
			entries30d: 0
		});
	});
});
