/**
 * What Nestmark's Chart.js charts share: the theme's colours (tailwind.config.ts) and the style of
 * a plain line series, so the fixture page and the break-in run draw alike.
 */

/** Theme colours: ink, brass, halt, settled, ink-faint. */
export const CHART_COLOURS = {
	ink: '#14312b',
	brass: '#b07a1e',
	halt: '#a3262a',
	settled: '#1f6f4a',
	faint: '#6f8781'
} as const;

/** A point of a line chart on a linear x axis. */
export type Pt = { x: number; y: number };

/** A thin line series without point markers (dashed when `dash` is given). */
export const line = (label: string, data: Pt[], color: string, dash: number[] = []) => ({
	label,
	data,
	borderColor: color,
	backgroundColor: color,
	borderDash: dash,
	borderWidth: 1.5,
	pointRadius: 0,
	fill: false
});
