import {
	PDFDict,
	PDFDocument,
	PDFName,
	PDFNumber,
	StandardFonts,
	concatTransformationMatrix,
	drawObject,
	popGraphicsState,
	pushGraphicsState,
	rgb,
	type PDFFont,
	type PDFPage,
	type PDFRef
} from 'pdf-lib';
import { MARK } from '$lib/content/mark';
import {
	PAPERS,
	fitLines,
	labelBoxes,
	mmToPt,
	placeLabels,
	type Box,
	type LabelCell,
	type SheetLayout
} from '$lib/labels/sheet-layouts';
import { encodable } from '../pdf-text';
import { QR_QUIET_ZONE, darkRuns, labelQrMatrix } from './qr';

/** What one label shows. */
export interface LabelContent {
	code: string;
	name: string;
}

export interface RenderOptions {
	layout: SheetLayout;
	/** 1-based position of the first free label on the first sheet. */
	startAt?: number;
	/** Origin the QR URLs point at (see labelOrigin). */
	origin: string;
}

/** Info-dictionary key holding the number of labels, for tools that sort or check print jobs. */
export const LABEL_COUNT_KEY = 'NestmarkLabelCount';

// Cap heights of the standard fonts (Adobe Font Metrics files: Courier-Bold 562, Helvetica 718),
// used to centre capitals in their box.
const CAP = { courierBold: 0.562, helvetica: 0.718 };
const INK = rgb(0x14 / 255, 0x31 / 255, 0x2b / 255);

/** Numbers for a content stream: fixed-point, no exponent, no trailing zeros. */
function n(v: number): string {
	return String(Math.round(v * 1e4) / 1e4);
}

/** `#rrggbb` to PDF colour operands. */
function rgbOperands(hex: string): string {
	const v = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255);
	return v.map(n).join(' ');
}

/**
 * A QR symbol as a form XObject in module units (y down), quiet zone painted white so the
 * symbol reads even on tinted label stock.
 */
function qrXObject(doc: PDFDocument, matrix: ReturnType<typeof labelQrMatrix>): PDFRef {
	const q = QR_QUIET_ZONE;
	const s = matrix.size;
	const ops = [`1 g`, `${-q} ${-q} ${s + 2 * q} ${s + 2 * q} re f`, `0 g`];
	for (const r of darkRuns(matrix)) ops.push(`${r.x} ${r.y} ${r.length} 1 re`);
	ops.push('f');
	const stream = doc.context.flateStream(ops.join('\n'), {
		Type: 'XObject',
		Subtype: 'Form',
		BBox: [-q, -q, s + q, s + q],
		Resources: {}
	});
	return doc.context.register(stream);
}

/** Path operators of a circle (four Bézier quarter arcs). */
function circleOps(cx: number, cy: number, r: number): string {
	const k = 0.5522847498 * r; // the usual cubic approximation of a quarter circle
	return [
		`${n(cx + r)} ${n(cy)} m`,
		`${n(cx + r)} ${n(cy + k)} ${n(cx + k)} ${n(cy + r)} ${n(cx)} ${n(cy + r)} c`,
		`${n(cx - k)} ${n(cy + r)} ${n(cx - r)} ${n(cy + k)} ${n(cx - r)} ${n(cy)} c`,
		`${n(cx - r)} ${n(cy - k)} ${n(cx - k)} ${n(cy - r)} ${n(cx)} ${n(cy - r)} c`,
		`${n(cx + k)} ${n(cy - r)} ${n(cx + r)} ${n(cy - k)} ${n(cx + r)} ${n(cy)} c`,
		'h'
	].join('\n');
}

/** Nestmark's mark as a form XObject in its 64-unit space (y down), drawn once per document. */
function markXObject(doc: PDFDocument): PDFRef {
	const { tile, vee, ball, dot } = MARK;
	const s = tile.size;
	const r = tile.radius;
	const k = 0.5522847498 * r;
	const tilePath = [
		`${r} 0 m`,
		`${s - r} 0 l`,
		`${n(s - r + k)} 0 ${s} ${n(r - k)} ${s} ${r} c`,
		`${s} ${s - r} l`,
		`${s} ${n(s - r + k)} ${n(s - r + k)} ${s} ${s - r} ${s} c`,
		`${r} ${s} l`,
		`${n(r - k)} ${s} 0 ${n(s - r + k)} 0 ${s - r} c`,
		`0 ${r} l`,
		`0 ${n(r - k)} ${n(r - k)} 0 ${r} 0 c`,
		'h'
	].join('\n');
	const [a, b, c] = vee.points;
	const ops = [
		`${rgbOperands(tile.fill)} rg`,
		tilePath,
		'f',
		// Round joins and caps, as on screen.
		`${rgbOperands(vee.stroke)} RG ${vee.width} w 1 j 1 J`,
		`${a[0]} ${a[1]} m ${b[0]} ${b[1]} l ${c[0]} ${c[1]} l S`,
		`${rgbOperands(ball.fill)} rg`,
		circleOps(ball.cx, ball.cy, ball.r),
		'f',
		`${rgbOperands(dot.fill)} rg`,
		circleOps(dot.cx, dot.cy, dot.r),
		'f'
	];
	const stream = doc.context.flateStream(ops.join('\n'), {
		Type: 'XObject',
		Subtype: 'Form',
		BBox: [0, 0, s, s],
		Resources: {}
	});
	return doc.context.register(stream);
}

interface Fonts {
	code: PDFFont;
	name: PDFFont;
}

/** Draws a form XObject so that its unit box maps to `box` (mm) on the label at `cell`. */
function placeXObject(
	page: PDFPage,
	name: PDFName,
	pageHeight_mm: number,
	cell: LabelCell,
	box: Box,
	units: number,
	offset: number
) {
	const scale = mmToPt(box.width) / units;
	const x = mmToPt(cell.x_mm + box.x) + offset * scale;
	const top = mmToPt(pageHeight_mm - cell.y_mm - box.y) - offset * scale;
	page.pushOperators(
		pushGraphicsState(),
		// y flipped: the XObjects are drawn y-down, like the page is measured.
		concatTransformationMatrix(scale, 0, 0, -scale, x, top),
		drawObject(name),
		popGraphicsState()
	);
}

function drawText(
	page: PDFPage,
	fonts: Fonts,
	pageHeight_mm: number,
	cell: LabelCell,
	boxes: ReturnType<typeof labelBoxes>,
	label: LabelContent
) {
	const toX = (mm: number) => mmToPt(cell.x_mm + mm);
	const toY = (mm: number) => mmToPt(pageHeight_mm - cell.y_mm - mm);

	// The code: as large as fits its box, capitals centred vertically.
	const c = boxes.code;
	const codeSize = Math.min(
		mmToPt(c.width) / fonts.code.widthOfTextAtSize(label.code, 1),
		(mmToPt(c.height) * 0.9) / CAP.courierBold
	);
	page.drawText(label.code, {
		x: toX(c.x),
		y: toY(c.y + c.height / 2) - (codeSize * CAP.courierBold) / 2,
		size: codeSize,
		font: fonts.code,
		color: INK
	});

	// The name: up to two lines, at most 10 pt, shortened with an ellipsis.
	const nb = boxes.name;
	const lineHeight = mmToPt(nb.height) / 2;
	const nameSize = Math.min(10, lineHeight / 1.25);
	const text = encodable(fonts.name, label.name);
	const lines = fitLines(text, mmToPt(nb.width), 2, (s) =>
		fonts.name.widthOfTextAtSize(s, nameSize)
	);
	lines.forEach((line, i) => {
		page.drawText(line, {
			x: toX(nb.x),
			y: toY(nb.y) - lineHeight * i - lineHeight / 2 - (nameSize * CAP.helvetica) / 2,
			size: nameSize,
			font: fonts.name,
			color: INK
		});
	});
}

/** Renders labels onto sheets (or one label per page) as a PDF with exact millimetre geometry. */
export async function renderLabelsPdf(
	labels: LabelContent[],
	{ layout, startAt = 1, origin }: RenderOptions
): Promise<Uint8Array> {
	const doc = await PDFDocument.create();
	const paperName = layout.paper === 'label' ? 'one per page' : PAPERS[layout.paper].name;
	doc.setTitle(`Nestmark labels — ${labels.length} × ${layout.stock.name} mm, ${paperName}`);
	doc.setSubject(labels.map((l) => l.code).join(' '));
	doc.setCreator('Nestmark');
	doc.setProducer('Nestmark label renderer (pdf-lib)');
	doc.setCreationDate(new Date());
	// The setters above made the document information dictionary; add the count beside them.
	const info = doc.context.lookup(doc.context.trailerInfo.Info, PDFDict);
	info.set(PDFName.of(LABEL_COUNT_KEY), PDFNumber.of(labels.length));

	const fonts: Fonts = {
		code: await doc.embedFont(StandardFonts.CourierBold),
		name: await doc.embedFont(StandardFonts.Helvetica)
	};
	const boxes = labelBoxes(layout.stock);
	const markRef = markXObject(doc);
	const qrs = new Map<string, { ref: PDFRef; units: number }>();
	const pages: { page: PDFPage; mark: PDFName }[] = [];
	const size: [number, number] = [mmToPt(layout.page.width_mm), mmToPt(layout.page.height_mm)];
	const H = layout.page.height_mm;

	const placements = placeLabels(labels.length, layout, startAt);
	for (let i = 0; i < labels.length; i++) {
		const label = labels[i];
		const { page: pageIndex, cell } = placements[i];
		while (pages.length <= pageIndex) {
			const page = doc.addPage(size);
			pages.push({ page, mark: page.node.newXObject('Mark', markRef) });
		}
		const { page, mark } = pages[pageIndex];

		// A code printed twice (one label per coupling half) shares its symbol.
		let qr = qrs.get(label.code);
		if (!qr) {
			const matrix = labelQrMatrix(label.code, origin);
			qr = { ref: qrXObject(doc, matrix), units: matrix.size + 2 * QR_QUIET_ZONE };
			qrs.set(label.code, qr);
		}
		const qrName = page.node.newXObject('QR', qr.ref);
		placeXObject(page, qrName, H, cell, boxes.qr, qr.units, QR_QUIET_ZONE);
		placeXObject(page, mark, H, cell, boxes.mark, MARK.viewBox, 0);
		drawText(page, fonts, H, cell, boxes, label);

		// Big sheets take a while; let other requests through between labels.
		if (i % 50 === 49) await new Promise((resolve) => setImmediate(resolve));
	}
	if (pages.length === 0) doc.addPage(size);
	return doc.save();
}
