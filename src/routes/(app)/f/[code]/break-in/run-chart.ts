/**
 * The live chart of a break-in run (Chart.js configuration): rolling s and R = 4s over the run's
 * readings, the settling windows the rule judges, the settle band the next window must land in
 * (last window's R ± the policy's tolerance) and the spec line. x is the cycle since the break-in
 * requirement began, so runs continued across sessions line up.
 */
import type { ChartConfiguration } from 'chart.js';
import { CHART_COLOURS, line, type Pt } from '$lib/client/chart-style';
import type { RollingPoint, RunVerdict, SettleRule } from '$lib/domain/break-in-run';

const { ink: INK, brass: BRASS, halt: HALT, settled: SETTLED, faint: FAINT } = CHART_COLOURS;
const flat = (x0: number, x1: number, y: number): Pt[] => [
	{ x: x0, y },
	{ x: x1, y }
];

/** Chart configuration for the run so far. */
export function runChartConfig(
	rolling: RollingPoint[],
	verdict: RunVerdict,
	rule: SettleRule
): ChartConfiguration<'line'> {
	const x1 = Math.max(verdict.cycles, rule.breakInMinCycles, 1);
	const shift = (p: RollingPoint) => verdict.cyclesBefore + p.cycle;
	const datasets = [
		line(
			`R = 4s, last ${rule.settleWindow} readings`,
			rolling.map((p) => ({ x: shift(p), y: p.R })),
			INK
		),
		line(
			's, last readings',
			rolling.map((p) => ({ x: shift(p), y: p.s })),
			FAINT,
			[2, 3]
		),
		{
			...line(
				'R of each settling window',
				verdict.windows.map((w) => ({ x: w.cycle, y: w.R })),
				BRASS
			),
			showLine: false,
			pointRadius: 5,
			pointStyle: 'rectRot'
		},
		line(
			`Spec ${rule.repeatabilitySpec_um} µm`,
			flat(0, x1, rule.repeatabilitySpec_um),
			HALT,
			[6, 4]
		)
	];
	const last = verdict.windows.at(-1);
	if (last) {
		const tol = rule.settleTolerance_um;
		datasets.push(
			line(`Settle band: last window ± ${tol} µm`, flat(0, x1, last.R + tol), SETTLED, [3, 3]),
			line('Settle band (lower)', flat(0, x1, Math.max(0, last.R - tol)), SETTLED, [3, 3])
		);
	}
	return {
		type: 'line',
		data: { datasets },
		options: {
			responsive: true,
			maintainAspectRatio: false,
			animation: false,
			parsing: false,
			plugins: {
				legend: {
					labels: { filter: (item) => item.text !== 'Settle band (lower)', boxHeight: 2 }
				}
			},
			scales: {
				x: {
					type: 'linear',
					min: 0,
					max: x1,
					title: { display: true, text: 'Cycles since break-in began' }
				},
				y: { beginAtZero: true, title: { display: true, text: 'µm' } }
			}
		}
	};
}
