/**
 * Nestmark's mark as data — a ball seated in a vee groove on a rounded tile — in a 64 × 64 unit
 * square. The one source of the shape: MarkShapes.svelte draws it for the logo and the label
 * preview, and the label PDF draws the same numbers, so screen and print cannot drift apart.
 */
export const MARK = {
	viewBox: 64,
	tile: { size: 64, radius: 14, fill: '#14312b' },
	vee: {
		points: [
			[10, 24],
			[32, 50],
			[54, 24]
		] as const,
		stroke: '#b07a1e',
		width: 6
	},
	ball: { cx: 32, cy: 30, r: 11, fill: '#f6f4ee' },
	dot: { cx: 32, cy: 30, r: 3.5, fill: '#14312b' }
} as const;

/** SVG path data of the tile: a square with rounded corners, drawn clockwise. */
export function markTilePath(): string {
	const { size: s, radius: r } = MARK.tile;
	return (
		`M${r} 0H${s - r}A${r} ${r} 0 0 1 ${s} ${r}V${s - r}A${r} ${r} 0 0 1 ${s - r} ${s}` +
		`H${r}A${r} ${r} 0 0 1 0 ${s - r}V${r}A${r} ${r} 0 0 1 ${r} 0Z`
	);
}

/** SVG path data of the vee's centre line. */
export function markVeePath(): string {
	const [a, b, c] = MARK.vee.points;
	return `M${a[0]} ${a[1]}L${b[0]} ${b[1]}L${c[0]} ${c[1]}`;
}
