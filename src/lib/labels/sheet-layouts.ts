/**
 * Label sheet geometry, in millimetres, measured from the top-left corner of the page (the way a
 * sheet of labels is specified and measured with a rule). The PDF renderer converts to points.
 *
 * Nestmark's label sizes are named after shop-floor gauges of growing size: Pin, Shim, Block.
 * Labels are placed from the top-left margin with a fixed pitch (label size + gap), so the
 * first label sits exactly at the margin and any space left over goes to the right and bottom.
 */

/** PDF user-space points per millimetre (1 pt = 1/72 in, 1 in = 25.4 mm). */
export const PT_PER_MM = 72 / 25.4;

/** Millimetres to PDF points. */
export function mmToPt(mm: number): number {
	return mm * PT_PER_MM;
}

/** Sheet papers. A4 is ISO 216 (210 × 297 mm); US Letter is ANSI A, 8.5 × 11 in. */
export const PAPERS = {
	a4: { id: 'a4', name: 'A4', width_mm: 210, height_mm: 297 },
	letter: { id: 'letter', name: 'US Letter', width_mm: 215.9, height_mm: 279.4 }
} as const;
export type SheetPaperId = keyof typeof PAPERS;

/** 'label' means one label per page, the page cut to the label (for label printers). */
export const PAPER_IDS = ['a4', 'letter', 'label'] as const;
export type PaperId = (typeof PAPER_IDS)[number];

export const PAPER_LABELS: Record<PaperId, string> = {
	a4: 'A4 sheet (210 × 297 mm)',
	letter: 'US Letter sheet (8.5 × 11 in)',
	label: 'One label per page (label printer)'
};

/** A label size Nestmark lays out, with the sheet margin and gap it starts from. */
export interface LabelStock {
	id: StockId;
	name: string;
	width_mm: number;
	height_mm: number;
	defaultMargin_mm: number;
	defaultGap_mm: number;
	/** Where this size suits, shown beside the choice. */
	hint: string;
}

export const STOCK_IDS = ['pin', 'shim', 'block'] as const;
export type StockId = (typeof STOCK_IDS)[number];

export const LABEL_STOCKS: Record<StockId, LabelStock> = {
	pin: {
		id: 'pin',
		name: 'Pin 38 × 19',
		width_mm: 38,
		height_mm: 19,
		defaultMargin_mm: 8,
		defaultGap_mm: 1,
		hint: 'Small parts: probe racks, reference-flat mounts.'
	},
	shim: {
		id: 'shim',
		name: 'Shim 50 × 25',
		width_mm: 50,
		height_mm: 25,
		defaultMargin_mm: 8,
		defaultGap_mm: 2,
		hint: 'Most couplings and vises.'
	},
	block: {
		id: 'block',
		name: 'Block 70 × 37',
		width_mm: 70,
		height_mm: 37,
		defaultMargin_mm: 8,
		defaultGap_mm: 3,
		hint: 'Pallets and fixture plates, read from a distance.'
	}
};

/** Limits of the settings a person may choose, in mm. */
export const LIMITS = { marginMax_mm: 40, gapMax_mm: 20 } as const;

/** A label's top-left corner on its page, in mm from the page's top-left corner. */
export interface LabelCell {
	/** 0-based position on the sheet, row by row. */
	index: number;
	row: number;
	column: number;
	x_mm: number;
	y_mm: number;
}

export interface SheetLayout {
	stock: LabelStock;
	paper: PaperId;
	page: { width_mm: number; height_mm: number };
	margin_mm: number;
	gap_mm: number;
	columns: number;
	rows: number;
	perSheet: number;
	cells: LabelCell[];
}

export interface SheetOptions {
	stock: StockId;
	paper: PaperId;
	/** Distance from every page edge to the nearest label; default: the stock's. */
	margin_mm?: number;
	/** Space between neighbouring labels, across and down; default: the stock's. */
	gap_mm?: number;
}

export type LayoutErrors = Partial<Record<'layout' | 'paper' | 'margin' | 'gap', string>>;
export type LayoutResult = { ok: true; layout: SheetLayout } | { ok: false; errors: LayoutErrors };

// Sizes are decimal millimetres (215.9); a grid that fits exactly must not lose a column to
// floating-point noise.
const EPS = 1e-9;

/** How many labels of `size` fit in `span` with `gap` between them. */
function fitCount(span: number, size: number, gap: number): number {
	if (span + EPS < size) return 0;
	return Math.floor((span + gap + EPS) / (size + gap));
}

/** Rounds away float noise (5 decimals is far below any printer's resolution). */
function r5(v: number): number {
	return Math.round(v * 1e5) / 1e5;
}

/** The grid of one sheet, or field-level messages saying why it cannot be laid out. */
export function computeSheetLayout(options: SheetOptions): LayoutResult {
	const errors: LayoutErrors = {};
	const stock = LABEL_STOCKS[options.stock];
	if (!stock) errors.layout = 'Choose one of the label sizes.';
	if (!PAPER_IDS.includes(options.paper)) errors.paper = 'Choose A4, US Letter or one per page.';
	if (!stock || errors.paper) return { ok: false, errors };

	if (options.paper === 'label') {
		const cell: LabelCell = { index: 0, row: 0, column: 0, x_mm: 0, y_mm: 0 };
		return {
			ok: true,
			layout: {
				stock,
				paper: 'label',
				page: { width_mm: stock.width_mm, height_mm: stock.height_mm },
				margin_mm: 0,
				gap_mm: 0,
				columns: 1,
				rows: 1,
				perSheet: 1,
				cells: [cell]
			}
		};
	}

	const margin = options.margin_mm ?? stock.defaultMargin_mm;
	const gap = options.gap_mm ?? stock.defaultGap_mm;
	if (!Number.isFinite(margin) || margin < 0 || margin > LIMITS.marginMax_mm) {
		errors.margin = `The margin must be between 0 and ${LIMITS.marginMax_mm} mm.`;
	}
	if (!Number.isFinite(gap) || gap < 0 || gap > LIMITS.gapMax_mm) {
		errors.gap = `The gap must be between 0 and ${LIMITS.gapMax_mm} mm.`;
	}
	if (errors.margin || errors.gap) return { ok: false, errors };

	const paper = PAPERS[options.paper];
	const columns = fitCount(paper.width_mm - 2 * margin, stock.width_mm, gap);
	const rows = fitCount(paper.height_mm - 2 * margin, stock.height_mm, gap);
	if (columns < 1 || rows < 1) {
		return {
			ok: false,
			errors: {
				margin: `With a ${margin} mm margin not one ${stock.name} mm label fits on ${paper.name}; make the margin smaller.`
			}
		};
	}

	const cells: LabelCell[] = [];
	for (let row = 0; row < rows; row++) {
		for (let column = 0; column < columns; column++) {
			cells.push({
				index: cells.length,
				row,
				column,
				x_mm: r5(margin + column * (stock.width_mm + gap)),
				y_mm: r5(margin + row * (stock.height_mm + gap))
			});
		}
	}
	return {
		ok: true,
		layout: {
			stock,
			paper: options.paper,
			page: { width_mm: paper.width_mm, height_mm: paper.height_mm },
			margin_mm: margin,
			gap_mm: gap,
			columns,
			rows,
			perSheet: columns * rows,
			cells
		}
	};
}

/** Where each of `count` labels goes: page number (0-based) and cell, skipping used positions. */
export function placeLabels(
	count: number,
	layout: Pick<SheetLayout, 'cells' | 'perSheet'>,
	/** 1-based position of the first free label on the first sheet. */
	startAt = 1
): { page: number; cell: LabelCell }[] {
	const out: { page: number; cell: LabelCell }[] = [];
	const offset = Math.min(Math.max(1, Math.floor(startAt)), layout.perSheet) - 1;
	for (let i = 0; i < count; i++) {
		const slot = offset + i;
		out.push({
			page: Math.floor(slot / layout.perSheet),
			cell: layout.cells[slot % layout.perSheet]
		});
	}
	return out;
}

/** Number of pages `count` labels need when the first sheet starts at position `startAt`. */
export function sheetsNeeded(count: number, perSheet: number, startAt = 1): number {
	if (count <= 0) return 0;
	const offset = Math.min(Math.max(1, Math.floor(startAt)), perSheet) - 1;
	return Math.ceil((offset + count) / perSheet);
}

/** A rectangle in mm, relative to the label's top-left corner. */
export interface Box {
	x: number;
	y: number;
	width: number;
	height: number;
}

/** What goes where on one label. */
export interface LabelBoxes {
	/** The QR symbol including its quiet zone: a square. */
	qr: Box;
	/** The human-readable code, large. */
	code: Box;
	/** The fixture name, up to two lines. */
	name: Box;
	/** Nestmark's mark: a square. */
	mark: Box;
}

/**
 * Clear border inside the die-cut edge, in mm. Printers and label stock are both placed to
 * about ±0.5 mm, so nothing that must be read sits closer to the edge than this (common practice).
 */
export const LABEL_INSET_MM = 1;

/** The boxes of one label: QR on the left, code, name and mark stacked on the right. */
export function labelBoxes(stock: Pick<LabelStock, 'width_mm' | 'height_mm'>): LabelBoxes {
	const w = stock.width_mm;
	const h = stock.height_mm;
	const inset = LABEL_INSET_MM;
	const qrSide = h - 2 * inset;
	const textX = inset + qrSide;
	const textWidth = w - textX - inset;
	const markSide = r5(0.24 * h);
	return {
		qr: { x: inset, y: inset, width: qrSide, height: qrSide },
		code: { x: textX, y: r5(inset + 0.06 * h), width: textWidth, height: r5(0.3 * h) },
		name: { x: textX, y: r5(inset + 0.38 * h), width: textWidth, height: r5(0.26 * h) },
		mark: {
			x: r5(w - inset - markSide),
			y: r5(h - inset - markSide),
			width: markSide,
			height: markSide
		}
	};
}

/**
 * Breaks `text` into at most `maxLines` lines no wider than `maxWidth` (as `measure` reports),
 * breaking at spaces where it can; text that does not fit ends with an ellipsis on the last line.
 */
export function fitLines(
	text: string,
	maxWidth: number,
	maxLines: number,
	measure: (s: string) => number
): string[] {
	const words = text.trim().split(/\s+/).filter(Boolean);
	const lines: string[] = [];
	let i = 0;
	while (i < words.length && lines.length < maxLines) {
		let line = words[i];
		// A single word wider than the line is cut, so it never overflows.
		if (measure(line) > maxWidth) {
			let cut = line;
			while (cut.length > 1 && measure(cut) > maxWidth) cut = cut.slice(0, -1);
			lines.push(cut);
			words[i] = line.slice(cut.length);
			continue;
		}
		i++;
		while (i < words.length && measure(`${line} ${words[i]}`) <= maxWidth) {
			line = `${line} ${words[i]}`;
			i++;
		}
		lines.push(line);
	}
	if (i < words.length && lines.length > 0) {
		let last = lines[lines.length - 1];
		while (last.length > 0 && measure(`${last}…`) > maxWidth) last = last.slice(0, -1);
		lines[lines.length - 1] = `${last.trimEnd()}…`;
	}
	return lines;
}
