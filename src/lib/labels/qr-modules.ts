/**
 * Pure helpers over a QR symbol's module grid (whatever produced it), shared by the PDF
 * renderer on the server and the label preview in the browser.
 */

import { isValidFixtureCode } from '$lib/domain/fixture-code';

/**
 * Error correction level Q restores about 25 % of the symbol's codewords (ISO/IEC 18004 levels:
 * L 7 %, M 15 %, Q 25 %, H 30 %), enough for a scratched or oily label on the shop floor, while the
 * short URL keeps the symbol small (version 3 to 5 for typical origins).
 */
export const QR_ERROR_CORRECTION = 'Q' as const;

/** ISO/IEC 18004 requires a quiet zone at least 4 modules wide on every side of the symbol. */
export const QR_QUIET_ZONE = 4;

/** The absolute URL a fixture's label encodes: `<origin>/f/<code>`. */
export function labelUrl(code: string, origin: string): string {
	if (!isValidFixtureCode(code)) throw new RangeError(`"${code}" is not a valid fixture code`);
	return `${new URL(origin).origin}/f/${code}`;
}

/** A square grid of modules; `dark(x, y)` for 0 ≤ x, y < size, y down. */
export interface ModuleGrid {
	size: number;
	dark: (x: number, y: number) => boolean;
}

/** A horizontal run of dark modules in one row. */
export interface ModuleRun {
	x: number;
	y: number;
	length: number;
}

/**
 * Dark modules merged into horizontal runs, row by row: what a vector renderer fills as
 * rectangles (fewer, larger shapes than one per module, and no hairline seams between them).
 */
export function darkRuns(m: ModuleGrid): ModuleRun[] {
	const runs: ModuleRun[] = [];
	for (let y = 0; y < m.size; y++) {
		let x = 0;
		while (x < m.size) {
			if (!m.dark(x, y)) {
				x++;
				continue;
			}
			const start = x;
			while (x < m.size && m.dark(x, y)) x++;
			runs.push({ x: start, y, length: x - start });
		}
	}
	return runs;
}

/** SVG path data filling every run as a 1-module-high rectangle, in module units. */
export function runsToSvgPath(runs: ModuleRun[], offset = 0): string {
	return runs.map((r) => `M${r.x + offset} ${r.y + offset}h${r.length}v1h-${r.length}z`).join('');
}
