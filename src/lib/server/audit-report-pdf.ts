/**
 * The audit report as a PDF (pdf-lib, standard fonts): a cover with the range and the section
 * counts, then each section from a new page as a table of text, with the range and the time it
 * was made in every page's header and "Page n of N" in the footer. Inspection photos appear as
 * small thumbnails (JPEG and PNG; others are counted). Sections are read a page at a time.
 */
import {
	PDFDocument,
	StandardFonts,
	rgb,
	type PDFFont,
	type PDFImage,
	type PDFPage
} from 'pdf-lib';
import {
	REPORT_CONVENTIONS,
	REPORT_SECTION_TITLES,
	reportStamp,
	sectionCount
} from '../content/audit-report';
import { fitLines } from '../labels/sheet-layouts';
import { sniffImage } from '../images/image-type';
import {
	REPORT_PDF_SECTION_ROWS as PDF_SECTION_CAP,
	REPORT_SECTIONS
} from '../schemas/audit-report';
import type { AuditReport } from '../schemas/audit-report-views';
import { readPhoto } from './attachments';
import { sectionPages } from './audit-report';
import type { ReportBounds } from './audit-report-rows';
import { PDF_COLUMNS, type PdfColumn } from './audit-report-pdf-columns';
import { encodable } from './pdf-text';

/** Thumbnails embedded in one PDF; further photos are counted in words. */
const PDF_THUMB_CAP = 150;

const A4: [number, number] = [595.28, 841.89];
const MARGIN = { left: 40, right: 40, top: 62, bottom: 52 };
const WIDTH = A4[0] - MARGIN.left - MARGIN.right;
const SIZE = 8.5;
const LEAD = 10.5;
const PAD = 3;
const THUMB = 38;
const INK = rgb(0x14 / 255, 0x31 / 255, 0x2b / 255);
const SOFT = rgb(0.35, 0.4, 0.38);
const RULE = rgb(0.8, 0.82, 0.8);
const HEAD_FILL = rgb(0.93, 0.94, 0.92);

interface Fonts {
	regular: PDFFont;
	bold: PDFFont;
}

// pdf-lib adds a font resource to the page on every drawText that names a font; thousands of
// lines a page made large, slow documents. Switch the page's font only when it changes.
const pageFonts = new WeakMap<PDFPage, PDFFont>();

/** Draws one line of text (already encodable) at (x, y) in `font`. */
function put(
	page: PDFPage,
	text: string,
	o: { x: number; y: number; size: number; font: PDFFont; color: ReturnType<typeof rgb> }
) {
	if (pageFonts.get(page) !== o.font) {
		page.setFont(o.font);
		pageFonts.set(page, o.font);
	}
	page.drawText(text, { x: o.x, y: o.y, size: o.size, color: o.color });
}

/** Lays out pages top to bottom, starting a new page when the next block does not fit. */
class Layout {
	page!: PDFPage;
	y = 0;
	constructor(
		readonly doc: PDFDocument,
		readonly fonts: Fonts
	) {
		this.newPage();
	}
	newPage() {
		this.page = this.doc.addPage(A4);
		this.y = A4[1] - MARGIN.top;
	}
	fits(height: number) {
		return this.y - height >= MARGIN.bottom;
	}
	/** A paragraph wrapped to the width. */
	paragraph(s: string, size = SIZE, font = this.fonts.regular, color = INK) {
		for (const line of wrap(encodable(font, s), WIDTH, measurer(font, size))) {
			if (!this.fits(size * 1.3)) this.newPage();
			put(this.page, line, { x: MARGIN.left, y: this.y - size, size, font, color });
			this.y -= size * 1.3;
		}
	}
}

const widths = new WeakMap<PDFFont, Map<string, number>>();

/**
 * Width of encodable text at `size`: the sum of its characters' advance widths (the standard
 * fonts are not kerned by pdf-lib), cached per character, since wrapping measures every line
 * many times.
 */
function measurer(font: PDFFont, size: number): (t: string) => number {
	let table = widths.get(font);
	if (!table) widths.set(font, (table = new Map()));
	const per = table;
	return (t) => {
		let w = 0;
		for (const ch of t) {
			let cw = per.get(ch);
			if (cw === undefined) per.set(ch, (cw = font.widthOfTextAtSize(ch, 1)));
			w += cw;
		}
		return w * size;
	};
}

/** Lines of `s` (its own line breaks kept) that fit `width`. */
function wrap(s: string, width: number, measure: (t: string) => number): string[] {
	return s
		.split('\n')
		.flatMap((para) => (para.trim() ? fitLines(para, width, 200, measure) : ['']));
}

/** A table: header row repeated on each page, rows kept whole (never split across pages). */
async function drawTable<T>(
	L: Layout,
	columns: PdfColumn<T>[],
	rows: AsyncIterable<T[]>,
	images: (row: T) => Promise<PDFImage[]>
) {
	const total = columns.reduce((n, c) => n + c.width, 0);
	const widths = columns.map((c) => (c.width / total) * WIDTH);
	const xs = widths.map((_, i) => MARGIN.left + widths.slice(0, i).reduce((a, b) => a + b, 0));
	const measure = (font: PDFFont) => measurer(font, SIZE);
	// Each cell's lines, top-aligned in its column, on the row that starts at L.y.
	const drawCells = (cells: string[][], font: PDFFont) =>
		cells.forEach((lines, i) =>
			lines.forEach((line, j) =>
				put(L.page, line, {
					x: xs[i] + PAD,
					y: L.y - PAD - (j + 1) * LEAD + 2.5,
					size: SIZE,
					font,
					color: INK
				})
			)
		);
	const header = () => {
		const cells = columns.map((c, i) =>
			wrap(encodable(L.fonts.bold, c.title), widths[i] - 2 * PAD, measure(L.fonts.bold))
		);
		const h = Math.max(...cells.map((l) => l.length)) * LEAD + 2 * PAD;
		L.page.drawRectangle({ x: MARGIN.left, y: L.y - h, width: WIDTH, height: h, color: HEAD_FILL });
		drawCells(cells, L.fonts.bold);
		L.y -= h;
	};
	header();
	for await (const batch of rows) {
		for (const row of batch) {
			const pics = await images(row);
			const cells = columns.map((c, i) =>
				c.photos
					? []
					: wrap(
							encodable(L.fonts.regular, c.cell(row)),
							widths[i] - 2 * PAD,
							measure(L.fonts.regular)
						)
			);
			const textH = Math.max(1, ...cells.map((l) => l.length)) * LEAD;
			const h = Math.max(textH, pics.length ? THUMB : 0) + 2 * PAD;
			if (!L.fits(h)) {
				L.newPage();
				header();
			}
			drawCells(cells, L.fonts.regular);
			const photoCol = columns.findIndex((c) => c.photos);
			if (photoCol >= 0) {
				let x = xs[photoCol] + PAD;
				for (const img of pics) {
					const w = (img.width / img.height) * THUMB;
					if (x + w > xs[photoCol] + widths[photoCol]) break;
					L.page.drawImage(img, { x, y: L.y - PAD - THUMB, width: w, height: THUMB });
					x += w + 3;
				}
				const rest = columns[photoCol].cell(row);
				if (rest) {
					put(L.page, encodable(L.fonts.regular, rest), {
						x: xs[photoCol] + PAD,
						y: L.y - PAD - (pics.length ? THUMB + LEAD : LEAD) + 2.5,
						size: SIZE - 1,
						font: L.fonts.regular,
						color: SOFT
					});
				}
			}
			L.y -= h;
			L.page.drawLine({
				start: { x: MARGIN.left, y: L.y },
				end: { x: MARGIN.left + WIDTH, y: L.y },
				thickness: 0.4,
				color: RULE
			});
		}
		// Long reports take a while; let other requests through between pages of rows.
		await new Promise((resolve) => setImmediate(resolve));
	}
}

/** Thumbnails of a row's photos, embedded once each, within the document's cap. */
function thumbnails(doc: PDFDocument) {
	let embedded = 0;
	return async (ids: readonly string[]): Promise<PDFImage[]> => {
		const out: PDFImage[] = [];
		for (const id of ids.slice(0, 2)) {
			if (embedded >= PDF_THUMB_CAP) break;
			const photo = await readPhoto(id, 'thumb').catch(() => null);
			const type = photo && sniffImage(photo.bytes)?.type;
			if (!photo || !type) continue;
			// pdf-lib embeds JPEG and PNG; a WebP thumbnail is left as a count.
			if (type === 'image/jpeg') out.push(await doc.embedJpg(photo.bytes));
			else if (type === 'image/png') out.push(await doc.embedPng(photo.bytes));
			else continue;
			embedded++;
		}
		return out;
	};
}

function drawRunningLines(doc: PDFDocument, fonts: Fonts, report: AuditReport) {
	const pages = doc.getPages();
	const area = report.area ? report.area.name : 'All areas';
	const left = `Nestmark audit report · ${report.from} to ${report.to} · ${area}`;
	const right = `Generated ${reportStamp(report.generatedAt)}`;
	pages.forEach((page, i) => {
		const size = 8;
		const draw = (s: string, x: number, y: number, alignRight = false) => {
			const t = encodable(fonts.regular, s);
			const w = fonts.regular.widthOfTextAtSize(t, size);
			put(page, t, { x: alignRight ? x - w : x, y, size, font: fonts.regular, color: SOFT });
		};
		draw(left, MARGIN.left, A4[1] - 36);
		draw(right, A4[0] - MARGIN.right, A4[1] - 36, true);
		page.drawLine({
			start: { x: MARGIN.left, y: A4[1] - 42 },
			end: { x: A4[0] - MARGIN.right, y: A4[1] - 42 },
			thickness: 0.5,
			color: RULE
		});
		draw(`${report.rangeWords} · ${right}`, MARGIN.left, 30);
		draw(`Page ${i + 1} of ${pages.length}`, A4[0] - MARGIN.right, 30, true);
	});
}

/** The whole report (every section, up to PDF_SECTION_CAP rows each) as a PDF. */
export async function renderAuditReportPdf(
	report: AuditReport,
	bounds: ReportBounds
): Promise<Uint8Array> {
	const doc = await PDFDocument.create();
	doc.setTitle(`Nestmark audit report ${report.from} to ${report.to}`);
	doc.setSubject(`${report.rangeWords}; ${report.area ? report.area.name : 'all areas'}`);
	doc.setCreator('Nestmark');
	doc.setProducer('Nestmark audit report (pdf-lib)');
	doc.setCreationDate(new Date(report.generatedAt));
	const fonts: Fonts = {
		regular: await doc.embedFont(StandardFonts.Helvetica),
		bold: await doc.embedFont(StandardFonts.HelveticaBold)
	};
	const L = new Layout(doc, fonts);

	L.paragraph('Audit report', 20, fonts.bold);
	L.y -= 4;
	L.paragraph(report.rangeWords, 12);
	L.paragraph(report.area ? `Area: ${report.area.name}` : 'All areas', 11);
	L.paragraph(`Generated ${reportStamp(report.generatedAt)}`, 10, fonts.regular, SOFT);
	L.y -= 10;
	for (const s of REPORT_SECTIONS) {
		const total = report.sections[s]?.total ?? 0;
		L.paragraph(`${REPORT_SECTION_TITLES[s]}: ${sectionCount(s, total)}`, 10);
	}
	L.y -= 10;
	for (const note of Object.values(REPORT_CONVENTIONS)) {
		L.paragraph(note, 8.5, fonts.regular, SOFT);
		L.y -= 3;
	}

	const thumbs = thumbnails(doc);
	for (const section of REPORT_SECTIONS) {
		L.newPage();
		const total = report.sections[section]?.total ?? 0;
		L.paragraph(REPORT_SECTION_TITLES[section], 14, fonts.bold);
		const shown = Math.min(total, PDF_SECTION_CAP);
		L.paragraph(
			total > shown
				? `${sectionCount(section, total)} in the range; the first ${shown.toLocaleString('en-GB')} are listed. Narrow the range or choose an area for the rest.`
				: `${sectionCount(section, total)} in the range.`,
			9,
			fonts.regular,
			SOFT
		);
		L.y -= 4;
		if (total === 0) continue;
		const columns = PDF_COLUMNS[section] as PdfColumn<unknown>[];
		await drawTable(
			L,
			columns,
			// Small pages: the layout yields to other requests between them.
			sectionPages(section, bounds, { pageRows: 100, cap: PDF_SECTION_CAP }),
			section === 'inspections'
				? (row) => thumbs((row as { photoIds: string[] }).photoIds)
				: async () => []
		);
	}
	drawRunningLines(doc, fonts, report);
	return doc.save();
}
