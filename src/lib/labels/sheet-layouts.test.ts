import { describe, expect, it } from 'vitest';
import {
	LABEL_STOCKS,
	PAPERS,
	PT_PER_MM,
	computeSheetLayout,
	fitLines,
	labelBoxes,
	mmToPt,
	placeLabels,
	sheetsNeeded,
	type SheetLayout,
	type SheetOptions
} from './sheet-layouts';

function layoutOf(options: SheetOptions): SheetLayout {
	const r = computeSheetLayout(options);
	if (!r.ok) throw new Error(JSON.stringify(r.errors));
	return r.layout;
}

describe('units and papers', () => {
	it('converts millimetres to PDF points at 72/25.4', () => {
		// ISO 32000-1 §8.3.2.3: default user space unit is 1/72 inch; 1 inch = 25.4 mm (exact).
		expect(PT_PER_MM).toBeCloseTo(2.834645669, 9);
		expect(mmToPt(25.4)).toBeCloseTo(72, 12);
		// ISO 216 A4 is 210 × 297 mm = 595.276 × 841.890 pt.
		expect(mmToPt(PAPERS.a4.width_mm)).toBeCloseTo(595.2756, 4);
		expect(mmToPt(PAPERS.a4.height_mm)).toBeCloseTo(841.8898, 4);
		// ANSI Letter is 8.5 × 11 in = 612 × 792 pt.
		expect(mmToPt(PAPERS.letter.width_mm)).toBeCloseTo(612, 9);
		expect(mmToPt(PAPERS.letter.height_mm)).toBeCloseTo(792, 9);
	});
});

describe('computeSheetLayout', () => {
	it('lays Pin 38 × 19 labels five across and fourteen down on A4 with the default 8 mm margin', () => {
		const l = layoutOf({ stock: 'pin', paper: 'a4' });
		expect([l.columns, l.rows, l.perSheet]).toEqual([5, 14, 70]);
		expect(l.margin_mm).toBe(8);
		expect(l.gap_mm).toBe(1);
		expect(l.page).toEqual({ width_mm: 210, height_mm: 297 });
		expect(l.cells[0]).toEqual({ index: 0, row: 0, column: 0, x_mm: 8, y_mm: 8 });
		// pitch = 38 + 1 across, 19 + 1 down
		expect(l.cells[1]).toMatchObject({ row: 0, column: 1, x_mm: 47, y_mm: 8 });
		expect(l.cells[5]).toMatchObject({ row: 1, column: 0, x_mm: 8, y_mm: 28 });
		expect(l.cells[69]).toMatchObject({ row: 13, column: 4, x_mm: 164, y_mm: 268 });
		// The fifth column ends exactly at the right margin: 164 + 38 = 202 = 210 − 8.
		expect(l.cells[69].x_mm + 38).toBe(210 - 8);
	});

	it('gives the expected counts for every size on A4 and US Letter', () => {
		const counts = (paper: 'a4' | 'letter') =>
			(['pin', 'shim', 'block'] as const).map((stock) => {
				const l = layoutOf({ stock, paper });
				return [l.columns, l.rows];
			});
		// floor((W − 2m + g) / (w + g)) by hand for each case
		expect(counts('a4')).toEqual([
			[5, 14],
			[3, 10],
			[2, 7]
		]);
		expect(counts('letter')).toEqual([
			[5, 13],
			[3, 9],
			[2, 6]
		]);
	});

	it('keeps every label inside the margins and never overlapping', () => {
		for (const stock of ['pin', 'shim', 'block'] as const) {
			for (const paper of ['a4', 'letter'] as const) {
				for (const [margin_mm, gap_mm] of [
					[0, 0],
					[5, 2.5],
					[12.7, 0.3]
				]) {
					const l = layoutOf({ stock, paper, margin_mm, gap_mm });
					const { width_mm: w, height_mm: h } = LABEL_STOCKS[stock];
					for (const c of l.cells) {
						expect(c.x_mm).toBeGreaterThanOrEqual(margin_mm - 1e-9);
						expect(c.y_mm).toBeGreaterThanOrEqual(margin_mm - 1e-9);
						expect(c.x_mm + w).toBeLessThanOrEqual(l.page.width_mm - margin_mm + 1e-9);
						expect(c.y_mm + h).toBeLessThanOrEqual(l.page.height_mm - margin_mm + 1e-9);
					}
					// One more column or row would not fit.
					expect(margin_mm + l.columns * (w + gap_mm) + w).toBeGreaterThan(
						l.page.width_mm - margin_mm
					);
					expect(margin_mm + l.rows * (h + gap_mm) + h).toBeGreaterThan(
						l.page.height_mm - margin_mm
					);
				}
			}
		}
	});

	it('counts a column that fits exactly despite decimal paper sizes', () => {
		// Letter: 215.9 − 2 × 11.95 = 192.0 = 5 × 38 + 4 × 0.5 — five columns, not four.
		const l = layoutOf({ stock: 'pin', paper: 'letter', margin_mm: 11.95, gap_mm: 0.5 });
		expect(l.columns).toBe(5);
		expect(l.cells[4].x_mm).toBe(11.95 + 4 * 38.5);
		// A4: 210 − 2 × 3.5 = 203 = 4 × 50 + 3 × 1 — four Shim columns.
		expect(layoutOf({ stock: 'shim', paper: 'a4', margin_mm: 3.5, gap_mm: 1 }).columns).toBe(4);
		expect(layoutOf({ stock: 'shim', paper: 'a4', margin_mm: 3.51, gap_mm: 1 }).columns).toBe(3);
	});

	it('makes the page the label itself for one-per-page printing', () => {
		const l = layoutOf({ stock: 'shim', paper: 'label', margin_mm: 30 });
		expect(l.page).toEqual({ width_mm: 50, height_mm: 25 });
		expect(l.perSheet).toBe(1);
		expect(l.cells).toEqual([{ index: 0, row: 0, column: 0, x_mm: 0, y_mm: 0 }]);
	});

	it('rejects margins and gaps out of range with field messages', () => {
		expect(computeSheetLayout({ stock: 'pin', paper: 'a4', margin_mm: -1 })).toEqual({
			ok: false,
			errors: { margin: 'The margin must be between 0 and 40 mm.' }
		});
		const r = computeSheetLayout({ stock: 'pin', paper: 'a4', margin_mm: Number.NaN, gap_mm: 21 });
		expect(r.ok).toBe(false);
		if (!r.ok) {
			expect(Object.keys(r.errors).sort()).toEqual(['gap', 'margin']);
		}
	});

	it('still fits every size at the largest margin allowed', () => {
		// Letter 215.9 − 2 × 40 = 135.9 mm across holds one Block (70 + 3 > 135.9 − 70);
		// 279.4 − 80 = 199.4 mm down holds floor((199.4 + 3) / 40) = 5.
		const l = layoutOf({ stock: 'block', paper: 'letter', margin_mm: 40 });
		expect([l.columns, l.rows]).toEqual([1, 5]);
		for (const stock of ['pin', 'shim', 'block'] as const) {
			expect(computeSheetLayout({ stock, paper: 'a4', margin_mm: 40, gap_mm: 20 }).ok).toBe(true);
		}
	});

	it('rejects an unknown size or paper', () => {
		const r = computeSheetLayout({ stock: 'huge' as never, paper: 'a3' as never });
		expect(r.ok).toBe(false);
		if (!r.ok) expect(Object.keys(r.errors).sort()).toEqual(['layout', 'paper']);
	});
});

describe('placing labels across sheets', () => {
	const l = layoutOf({ stock: 'block', paper: 'a4' }); // 2 × 7 = 14 per sheet

	it('fills row by row and moves to the next page', () => {
		const p = placeLabels(16, l);
		expect(p.map((x) => x.page)).toEqual([...Array(14).fill(0), 1, 1]);
		expect(p[1].cell).toMatchObject({ row: 0, column: 1 });
		expect(p[2].cell).toMatchObject({ row: 1, column: 0 });
		expect(p[14].cell.index).toBe(0);
	});

	it('starts a partly used sheet at the given position', () => {
		const p = placeLabels(3, l, 13);
		expect(p.map((x) => [x.page, x.cell.index])).toEqual([
			[0, 12],
			[0, 13],
			[1, 0]
		]);
		expect(sheetsNeeded(3, 14, 13)).toBe(2);
		expect(sheetsNeeded(14, 14, 1)).toBe(1);
		expect(sheetsNeeded(15, 14, 1)).toBe(2);
		expect(sheetsNeeded(0, 14, 5)).toBe(0);
	});
});

describe('labelBoxes', () => {
	for (const stock of Object.values(LABEL_STOCKS)) {
		it(`keeps every box of ${stock.name} inside the label, the QR square clear of the text`, () => {
			const b = labelBoxes(stock);
			expect(b.qr.width).toBe(b.qr.height);
			expect(b.qr.width).toBe(stock.height_mm - 2);
			for (const box of [b.qr, b.code, b.name, b.mark]) {
				expect(box.x).toBeGreaterThanOrEqual(1);
				expect(box.y).toBeGreaterThanOrEqual(1);
				expect(box.x + box.width).toBeLessThanOrEqual(stock.width_mm - 1 + 1e-9);
				expect(box.y + box.height).toBeLessThanOrEqual(stock.height_mm - 1 + 1e-9);
			}
			// The QR's quiet zone is inside its box, so text must start at or right of its edge.
			for (const box of [b.code, b.name, b.mark]) {
				expect(box.x).toBeGreaterThanOrEqual(b.qr.x + b.qr.width - 1e-9);
			}
			// Code above name above mark, no overlap.
			expect(b.code.y + b.code.height).toBeLessThanOrEqual(b.name.y);
			expect(b.name.y + b.name.height).toBeLessThanOrEqual(b.mark.y);
		});
	}

	it('places the Pin label exactly', () => {
		expect(labelBoxes(LABEL_STOCKS.pin)).toEqual({
			qr: { x: 1, y: 1, width: 17, height: 17 },
			code: { x: 18, y: 2.14, width: 19, height: 5.7 },
			name: { x: 18, y: 8.22, width: 19, height: 4.94 },
			mark: { x: 32.44, y: 13.44, width: 4.56, height: 4.56 }
		});
	});
});

describe('fitLines', () => {
	const chars = (s: string) => s.length;

	it('keeps short text on one line', () => {
		expect(fitLines('Pallet A', 10, 2, chars)).toEqual(['Pallet A']);
	});

	it('breaks at spaces onto the next line', () => {
		expect(fitLines('Lathe 2 pallet kinematic', 14, 2, chars)).toEqual([
			'Lathe 2 pallet',
			'kinematic'
		]);
	});

	it('ends with an ellipsis when the text does not fit, never wider than the line', () => {
		const lines = fitLines('Interferometer reference flat mount north bench', 14, 2, chars);
		expect(lines).toEqual(['Interferometer', 'reference fla…']);
		for (const l of lines) expect(l.length).toBeLessThanOrEqual(14);
	});

	it('cuts a single word longer than the line', () => {
		expect(fitLines('Probechangerack', 6, 2, chars)).toEqual(['Probec', 'hange…']);
	});

	it('returns no lines for blank text', () => {
		expect(fitLines('   ', 10, 2, chars)).toEqual([]);
	});
});
