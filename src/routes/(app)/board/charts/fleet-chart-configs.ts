/**
 * Chart.js configurations of the board's four fleet charts, built from GET /api/fleet/trends, and
 * the words they share with their tables. Every series is named in the legend and the tooltips,
 * so no colour carries a meaning alone.
 */
import type { ChartConfiguration } from 'chart.js';
import { CHART_COLOURS } from '$lib/client/chart-style';
import { FLAG_KINDS, FLAG_LABELS, type FlagKind } from '$lib/schemas/fixture';
import type { FleetTrends } from '$lib/schemas/fleet-trends-views';

const { ink: INK, brass: BRASS, halt: HALT, settled: SETTLED, faint: FAINT } = CHART_COLOURS;

/** Flag kinds from the most urgent, as the board orders them. */
export const KIND_ORDER: readonly FlagKind[] = [
	'replace-now',
	'out-of-spec',
	'drift',
	'replace-soon',
	'break-in-due',
	'inspection-due',
	'cleaning-due'
];

/** One colour per flag kind, from the theme's families (the legend names each one). */
const KIND_COLOURS: Record<FlagKind, string> = {
	'replace-now': HALT,
	'out-of-spec': '#d0663f',
	drift: BRASS,
	'replace-soon': '#7d5512',
	'break-in-due': INK,
	'inspection-due': '#4d5a66',
	'cleaning-due': SETTLED
};

// Every kind the domain knows has a place in the order (a new kind must be placed on purpose).
if (KIND_ORDER.length !== FLAG_KINDS.length) throw new Error('KIND_ORDER misses a flag kind');

/** Said in place of a chart when chart.js cannot be loaded. */
export const NO_CHART = 'The chart could not be loaded; its table has every figure.';

/** Two decimals for a ratio: 0.86. */
export const ratioText = (r: number | null) => (r === null ? '—' : r.toFixed(2));
/** R and spec in µm, three significant figures. */
export const um = (x: number | null) => (x === null ? '—' : `${Number(x.toPrecision(3))} µm`);
/** Whole days, "now" for none left. */
export const daysText = (d: number | null) =>
	d === null ? 'above spec now' : d < 1 ? 'now' : `in about ${Math.round(d)} days`;

const common = {
	responsive: true,
	maintainAspectRatio: false,
	animation: false as const,
	plugins: { legend: { display: false } }
};

/** Histogram of R ÷ spec; bins past the watch ratio in brass, past the spec in red. */
export function histogramConfig(t: FleetTrends): ChartConfiguration<'bar'> {
	const bins = t.repeatability.bins;
	return {
		type: 'bar',
		data: {
			labels: bins.map((b) => b.label),
			datasets: [
				{
					label: 'Fixtures',
					data: bins.map((b) => b.count),
					backgroundColor: bins.map((b) =>
						b.from >= 1 ? HALT : b.from >= t.repeatability.watchRatio ? BRASS : INK
					),
					barPercentage: 1,
					categoryPercentage: 0.95
				}
			]
		},
		options: {
			...common,
			scales: {
				x: { title: { display: true, text: 'R ÷ spec' }, ticks: { autoSkip: true } },
				y: {
					title: { display: true, text: 'Fixtures' },
					beginAtZero: true,
					ticks: { precision: 0 }
				}
			}
		}
	};
}

/** The forecast bars, with their words. */
export function forecastBars(t: FleetTrends): { label: string; count: number }[] {
	return [
		{ label: 'Above spec now', count: t.forecast.aboveSpec },
		...t.forecast.within.map((w) => ({ label: `Within ${w.days} days`, count: w.count }))
	];
}

/** Fixtures above spec now and forecast to meet it within 30 / 90 / 180 days. */
export function forecastConfig(t: FleetTrends): ChartConfiguration<'bar'> {
	const bars = forecastBars(t);
	return {
		type: 'bar',
		data: {
			labels: bars.map((b) => b.label),
			datasets: [
				{
					label: 'Fixtures',
					data: bars.map((b) => b.count),
					backgroundColor: [HALT, BRASS, '#c99a4a', FAINT]
				}
			]
		},
		options: {
			...common,
			scales: {
				y: {
					beginAtZero: true,
					ticks: { precision: 0 },
					title: { display: true, text: 'Fixtures' }
				}
			}
		}
	};
}

/** Weeks with any flag raised or cleared (the table lists only these). */
export function activeWeeks(t: FleetTrends) {
	return t.flags.weeks.filter((w) => KIND_ORDER.some((k) => w.raised[k] || w.cleared[k]));
}

/** "Drifting 2, Cleaning due 1" for a week's counts by kind; "—" when none. */
export function kindCounts(counts: Record<FlagKind, number>): string {
	const parts = KIND_ORDER.filter((k) => counts[k]).map((k) => `${FLAG_LABELS[k]} ${counts[k]}`);
	return parts.length ? parts.join(', ') : '—';
}

/** Raised above the axis and cleared below it, stacked by kind, one bar per ISO week. */
export function flagWeeksConfig(t: FleetTrends): ChartConfiguration<'bar'> {
	const weeks = t.flags.weeks;
	const datasets = KIND_ORDER.flatMap((k) => [
		{
			label: FLAG_LABELS[k],
			data: weeks.map((w) => w.raised[k]),
			backgroundColor: KIND_COLOURS[k],
			stack: 'flags'
		},
		{
			label: `${FLAG_LABELS[k]}, cleared`,
			data: weeks.map((w) => -w.cleared[k]),
			backgroundColor: `${KIND_COLOURS[k]}99`,
			stack: 'flags'
		}
	]);
	return {
		type: 'bar',
		data: { labels: weeks.map((w) => w.week.slice(5)), datasets },
		options: {
			...common,
			plugins: {
				legend: {
					display: true,
					position: 'bottom',
					labels: {
						boxWidth: 10,
						font: { size: 10 },
						// One legend entry per kind: the raised series (the cleared one is its paler twin).
						filter: (item) => (item.datasetIndex ?? 0) % 2 === 0
					}
				},
				tooltip: {
					callbacks: {
						label: (ctx) =>
							`${ctx.dataset.label}${ctx.datasetIndex % 2 === 0 ? ', raised' : ''}: ${Math.abs(Number(ctx.raw))}`,
						title: (items) => (items[0] ? weeks[items[0].dataIndex].week : '')
					}
				}
			},
			scales: {
				x: { stacked: true, ticks: { autoSkip: true, maxRotation: 0 } },
				y: {
					stacked: true,
					ticks: { precision: 0, callback: (v) => Math.abs(Number(v)) },
					title: { display: true, text: 'Cleared ↓   Raised ↑' }
				}
			}
		}
	};
}

/** Median R ÷ spec per area, horizontal bars. */
export function areaConfig(t: FleetTrends): ChartConfiguration<'bar'> {
	return {
		type: 'bar',
		data: {
			labels: t.areas.map((a) => a.areaName),
			datasets: [
				{
					label: 'Median R ÷ spec',
					data: t.areas.map((a) => a.medianRatio ?? 0),
					backgroundColor: t.areas.map((a) =>
						(a.medianRatio ?? 0) > t.repeatability.watchRatio ? BRASS : INK
					)
				}
			]
		},
		options: {
			...common,
			indexAxis: 'y',
			scales: {
				x: { beginAtZero: true, suggestedMax: 1, title: { display: true, text: 'Median R ÷ spec' } }
			}
		}
	};
}
