import { describe, expect, it } from 'vitest';
import { darkRuns, runsToSvgPath } from './qr-modules';

// A hand-drawn 4 × 4 grid ("#" dark) with runs at the edges, in the middle and a full row.
const rows = ['##.#', '....', '.##.', '####'];
const grid = { size: 4, dark: (x: number, y: number) => rows[y][x] === '#' };

describe('darkRuns', () => {
	it('finds every horizontal run, including those touching the edges', () => {
		expect(darkRuns(grid)).toEqual([
			{ x: 0, y: 0, length: 2 },
			{ x: 3, y: 0, length: 1 },
			{ x: 1, y: 2, length: 2 },
			{ x: 0, y: 3, length: 4 }
		]);
	});

	it('gives no runs for an empty grid', () => {
		expect(darkRuns({ size: 3, dark: () => false })).toEqual([]);
	});
});

describe('runsToSvgPath', () => {
	it('draws each run as a closed rectangle, shifted by the quiet zone', () => {
		expect(runsToSvgPath([{ x: 1, y: 2, length: 3 }], 4)).toBe('M5 6h3v1h-3z');
	});
});
