import { inflateSync } from 'node:zlib';
import jsQR from 'jsqr';
import {
	PDFArray,
	PDFDict,
	PDFDocument,
	PDFName,
	PDFNumber,
	PDFRawStream,
	decodePDFRawStream,
	type PDFPage
} from 'pdf-lib';
import { describe, expect, it } from 'vitest';
import { checkCharacter } from '$lib/domain/fixture-code';
import {
	computeSheetLayout,
	labelBoxes,
	mmToPt,
	placeLabels,
	type SheetLayout
} from '$lib/labels/sheet-layouts';
import { LABEL_COUNT_KEY, renderLabelsPdf } from './pdf';
import {
	QR_QUIET_ZONE,
	darkRuns,
	labelOrigin,
	labelQrMatrix,
	labelQrPng,
	labelQrSvg,
	labelUrl
} from './qr';

const ORIGIN = 'https://nestmark.larchmere.example';
const code = (body: string) => `NM-${body}${checkCharacter(body)}`;
const A = code('4K7Q');
const B = code('ZZ29');
const C = code('HT5M');

// ---- rasters for the reference decoder (jsQR wants RGBA pixels) -----------------------------

interface Raster {
	width: number;
	height: number;
	data: Uint8ClampedArray;
}

/** White raster with a dark `scale` × `scale` square per dark module; `pad` modules around. */
function rasterFromModules(
	size: number,
	dark: (x: number, y: number) => boolean,
	scale: number,
	pad: number
): Raster {
	const side = (size + 2 * pad) * scale;
	const data = new Uint8ClampedArray(side * side * 4).fill(255);
	for (let y = 0; y < size; y++) {
		for (let x = 0; x < size; x++) {
			if (!dark(x, y)) continue;
			for (let dy = 0; dy < scale; dy++) {
				for (let dx = 0; dx < scale; dx++) {
					const i = (((y + pad) * scale + dy) * side + (x + pad) * scale + dx) * 4;
					data[i] = data[i + 1] = data[i + 2] = 0;
				}
			}
		}
	}
	return { width: side, height: side, data };
}

/**
 * Minimal PNG reader for 8-bit, non-interlaced greyscale/RGB/RGBA images (what qrcode writes):
 * chunks per the PNG specification (ISO/IEC 15948) §5, filters §9.
 */
function decodePng(png: Buffer): Raster {
	expect(png.subarray(0, 8)).toEqual(Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]));
	let pos = 8;
	let width = 0;
	let height = 0;
	let channels = 0;
	const idat: Buffer[] = [];
	while (pos < png.length) {
		const len = png.readUInt32BE(pos);
		const type = png.toString('latin1', pos + 4, pos + 8);
		const body = png.subarray(pos + 8, pos + 8 + len);
		if (type === 'IHDR') {
			width = body.readUInt32BE(0);
			height = body.readUInt32BE(4);
			expect(body[8]).toBe(8); // bit depth
			expect(body[12]).toBe(0); // not interlaced
			channels = ({ 0: 1, 2: 3, 6: 4 } as Record<number, number>)[body[9]];
			expect(channels).toBeDefined();
		} else if (type === 'IDAT') idat.push(body);
		pos += 12 + len;
	}
	const raw = inflateSync(Buffer.concat(idat));
	const stride = width * channels;
	const px = new Uint8Array(height * stride);
	for (let y = 0; y < height; y++) {
		const filter = raw[y * (stride + 1)];
		for (let x = 0; x < stride; x++) {
			const v = raw[y * (stride + 1) + 1 + x];
			const a = x >= channels ? px[y * stride + x - channels] : 0;
			const b = y > 0 ? px[(y - 1) * stride + x] : 0;
			const c = x >= channels && y > 0 ? px[(y - 1) * stride + x - channels] : 0;
			const p = a + b - c;
			const [pa, pb, pc] = [Math.abs(p - a), Math.abs(p - b), Math.abs(p - c)];
			const paeth = pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
			const pred = [0, a, b, (a + b) >> 1, paeth][filter];
			px[y * stride + x] = (v + pred) & 0xff;
		}
	}
	const data = new Uint8ClampedArray(width * height * 4);
	for (let i = 0; i < width * height; i++) {
		const s = i * channels;
		const [r, g, b] = channels >= 3 ? [px[s], px[s + 1], px[s + 2]] : [px[s], px[s], px[s]];
		data.set([r, g, b, channels === 4 ? px[s + 3] : 255], i * 4);
	}
	return { width, height, data };
}

function decodeQr(r: Raster): string | undefined {
	return jsQR(r.data, r.width, r.height)?.data;
}

// ---- reading a PDF back -----------------------------------------------------------------------

function streamText(s: PDFRawStream): string {
	return Buffer.from(decodePDFRawStream(s).decode()).toString('latin1');
}

function pageContent(page: PDFPage): string {
	const contents = page.node.Contents();
	if (contents instanceof PDFRawStream) return streamText(contents);
	const arr = contents as PDFArray;
	return arr
		.asArray()
		.map((ref) => {
			const stream = page.doc.context.lookup(ref);
			if (!(stream instanceof PDFRawStream)) throw new Error('content is not a raw stream');
			return streamText(stream);
		})
		.join('\n');
}

interface PlacedQr {
	/** cm operands: scale across, scale down (negative: y flipped), x, y of the symbol origin */
	a: number;
	d: number;
	e: number;
	f: number;
	url: string | undefined;
	size: number;
}

/** Every QR form XObject drawn on the page, where, and what a reference decoder reads from it. */
function placedQrs(page: PDFPage): PlacedQr[] {
	const xobjects = page.node.Resources()!.lookup(PDFName.of('XObject'), PDFDict);
	const out: PlacedQr[] = [];
	const re = /q\s+(\S+) 0 0 (\S+) (\S+) (\S+) cm\s+\/(\S+) Do\s+Q/g;
	for (const m of pageContent(page).matchAll(re)) {
		if (!m[5].startsWith('QR')) continue;
		const form = xobjects.lookup(PDFName.of(m[5]));
		if (!(form instanceof PDFRawStream)) throw new Error(`${m[5]} is not a form XObject`);
		const bbox = form.dict.lookup(PDFName.of('BBox'), PDFArray).asArray();
		const [x0, , x1] = bbox.map((v) => (v as PDFNumber).asNumber());
		const size = x1 - x0 - 2 * QR_QUIET_ZONE;
		const dark = new Set<string>();
		for (const r of streamText(form).matchAll(/(-?\d+) (-?\d+) (\d+) 1 re/g)) {
			if (Number(r[1]) < 0) continue; // the white quiet-zone rectangle
			for (let i = 0; i < Number(r[3]); i++) dark.add(`${Number(r[1]) + i},${r[2]}`);
		}
		const raster = rasterFromModules(size, (x, y) => dark.has(`${x},${y}`), 4, QR_QUIET_ZONE);
		out.push({
			a: Number(m[1]),
			d: Number(m[2]),
			e: Number(m[3]),
			f: Number(m[4]),
			url: decodeQr(raster),
			size
		});
	}
	return out;
}

function layout(...args: Parameters<typeof computeSheetLayout>): SheetLayout {
	const r = computeSheetLayout(...args);
	if (!r.ok) throw new Error(JSON.stringify(r.errors));
	return r.layout;
}

// ---- tests ------------------------------------------------------------------------------------

describe('label URL and QR symbol', () => {
	it('encodes the absolute card URL of a valid code, from any origin form', () => {
		expect(labelUrl(A, ORIGIN)).toBe(`${ORIGIN}/f/${A}`);
		expect(labelUrl(A, 'http://127.0.0.1:3100/')).toBe(`http://127.0.0.1:3100/f/${A}`);
		expect(() => labelUrl('NM-4K7QQ', ORIGIN)).toThrow(RangeError);
	});

	it('takes the origin from ORIGIN, falling back to the request origin', () => {
		const saved = process.env.ORIGIN;
		try {
			process.env.ORIGIN = 'https://labels.example:8443/';
			expect(labelOrigin('http://127.0.0.1:5173')).toBe('https://labels.example:8443');
			delete process.env.ORIGIN;
			expect(labelOrigin('http://127.0.0.1:5173/x')).toBe('http://127.0.0.1:5173');
			expect(() => labelOrigin()).toThrow(/ORIGIN/);
		} finally {
			if (saved === undefined) delete process.env.ORIGIN;
			else process.env.ORIGIN = saved;
		}
	});

	it('builds a symbol jsQR reads back as the exact URL', () => {
		const m = labelQrMatrix(A, ORIGIN);
		// ISO/IEC 18004: a version-v symbol is 17 + 4v modules across.
		expect(m.size).toBe(17 + 4 * m.version);
		expect(decodeQr(rasterFromModules(m.size, m.dark, 4, QR_QUIET_ZONE))).toBe(`${ORIGIN}/f/${A}`);
	});

	it('merges dark modules into runs that cover exactly the dark modules', () => {
		const m = labelQrMatrix(B, ORIGIN);
		const covered = new Set<string>();
		for (const r of darkRuns(m)) {
			expect(m.dark(r.x - 1, r.y) && r.x > 0).toBe(false); // a run starts after a light module
			for (let i = 0; i < r.length; i++) covered.add(`${r.x + i},${r.y}`);
		}
		let darkCount = 0;
		for (let y = 0; y < m.size; y++) {
			for (let x = 0; x < m.size; x++) {
				if (m.dark(x, y)) {
					darkCount++;
					expect(covered.has(`${x},${y}`)).toBe(true);
				}
			}
		}
		expect(covered.size).toBe(darkCount);
	});

	it('writes a PNG with a clear 4-module quiet zone that jsQR decodes to the URL', async () => {
		const scale = 6;
		const png = decodePng(await labelQrPng(C, ORIGIN, scale));
		const m = labelQrMatrix(C, ORIGIN);
		expect(png.width).toBe((m.size + 2 * QR_QUIET_ZONE) * scale);
		expect(decodeQr(png)).toBe(`${ORIGIN}/f/${C}`);
		// Every pixel of the quiet zone is light (ISO/IEC 18004: at least 4 modules wide).
		const qz = QR_QUIET_ZONE * scale;
		for (let y = 0; y < png.height; y++) {
			for (let x = 0; x < png.width; x++) {
				const inside = x >= qz && y >= qz && x < png.width - qz && y < png.height - qz;
				if (!inside) expect(png.data[(y * png.width + x) * 4]).toBe(255);
			}
		}
	});

	it('writes an SVG whose path, rasterised, decodes to the URL', async () => {
		const svg = await labelQrSvg(A, 'http://127.0.0.1:3100');
		const m = labelQrMatrix(A, 'http://127.0.0.1:3100');
		const side = m.size + 2 * QR_QUIET_ZONE;
		expect(svg).toContain(`viewBox="0 0 ${side} ${side}"`);
		// qrcode draws each run as a 1-unit stroke: "M x y+0.5 h len m dx dy h len …".
		const d = /<path stroke="[^"]+" d="([^"]+)"/.exec(svg)![1];
		const dark = new Set<string>();
		let x = 0;
		let y = 0;
		for (const [, op, a, b] of d.matchAll(/([Mmh])(-?[\d.]+)(?: (-?[\d.]+))?/g)) {
			if (op === 'M') [x, y] = [Number(a), Number(b)];
			else if (op === 'm') [x, y] = [x + Number(a), y + Number(b)];
			else {
				for (let i = 0; i < Number(a); i++) dark.add(`${x + i},${Math.floor(y)}`);
				x += Number(a);
			}
		}
		const raster = rasterFromModules(side, (px, py) => dark.has(`${px},${py}`), 4, 0);
		expect(decodeQr(raster)).toBe(`http://127.0.0.1:3100/f/${A}`);
	});
});

describe('label sheet PDF', () => {
	it('has A4 pages in points, one QR per label at its exact place, each decoding to its URL', async () => {
		const l = layout({ stock: 'shim', paper: 'a4', margin_mm: 10, gap_mm: 2 });
		const labels = [
			{ code: A, name: 'Lathe 1 pallet — three-vee, 52100 balls' },
			{ code: B, name: 'CMM probe-change rack, port 3' },
			{ code: C, name: 'Reference flat mount ⌀150 (north bench)' }
		];
		const bytes = await renderLabelsPdf(labels, { layout: l, startAt: 2, origin: ORIGIN });
		const pdf = await PDFDocument.load(bytes);

		expect(pdf.getPageCount()).toBe(1);
		const page = pdf.getPage(0);
		// 210 × 297 mm × 72/25.4 = 595.276 × 841.890 pt (ISO 216 A4)
		expect(page.getWidth()).toBeCloseTo(595.2756, 3);
		expect(page.getHeight()).toBeCloseTo(841.8898, 3);
		const info = pdf.context.lookup(pdf.context.trailerInfo.Info, PDFDict);
		expect(info.lookup(PDFName.of(LABEL_COUNT_KEY), PDFNumber).asNumber()).toBe(3);

		const qrs = placedQrs(page);
		expect(qrs.map((q) => q.url)).toEqual(labels.map((x) => `${ORIGIN}/f/${x.code}`));

		// Geometry: the symbol (quiet zone included) fills the label's QR box exactly, and the
		// first label sits in position 2 (row 0, column 1), 10 mm + 52 mm from the left edge.
		const boxes = labelBoxes(l.stock);
		const where = placeLabels(3, l, 2);
		expect(where[0].cell).toMatchObject({ row: 0, column: 1, x_mm: 62, y_mm: 10 });
		qrs.forEach((q, i) => {
			const units = q.size + 2 * QR_QUIET_ZONE;
			const scale = mmToPt(boxes.qr.width) / units;
			expect(q.a).toBeCloseTo(scale, 3);
			expect(q.d).toBeCloseTo(-scale, 3);
			const { x_mm, y_mm } = where[i].cell;
			expect(q.e).toBeCloseTo(mmToPt(x_mm + boxes.qr.x) + QR_QUIET_ZONE * scale, 2);
			expect(q.f).toBeCloseTo(mmToPt(297 - y_mm - boxes.qr.y) - QR_QUIET_ZONE * scale, 2);
		});

		// The human-readable code is printed (pdf-lib writes standard-font text as hex strings).
		const content = pageContent(page);
		for (const x of labels) {
			expect(content).toContain(`<${Buffer.from(x.code).toString('hex').toUpperCase()}> Tj`);
		}
		// The mark is drawn once per page as a vector form and placed on every label.
		expect(content.match(/\/Mark\S* Do/g)).toHaveLength(3);
	});

	it('fills as many US Letter sheets as the labels need', async () => {
		const l = layout({ stock: 'block', paper: 'letter' }); // 2 × 6 = 12 per sheet
		const labels = Array.from({ length: 25 }, (_, i) => ({
			code: code(`${'23456789ABCDEFGHJK'[i % 18]}${'MNPQRS'[i % 6]}7Q`),
			name: `Fixture ${i + 1}`
		}));
		const pdf = await PDFDocument.load(
			await renderLabelsPdf(labels, { layout: l, origin: ORIGIN })
		);
		expect(pdf.getPageCount()).toBe(3);
		for (const page of pdf.getPages()) {
			// 8.5 × 11 in = 612 × 792 pt
			expect(page.getWidth()).toBeCloseTo(612, 3);
			expect(page.getHeight()).toBeCloseTo(792, 3);
		}
		const perPage = pdf.getPages().map((p) => placedQrs(p));
		expect(perPage.map((p) => p.length)).toEqual([12, 12, 1]);
		expect(perPage.flat().map((q) => q.url)).toEqual(labels.map((x) => `${ORIGIN}/f/${x.code}`));
	});

	it('makes one label-sized page per label for a label printer', async () => {
		const l = layout({ stock: 'pin', paper: 'label' });
		const pdf = await PDFDocument.load(
			await renderLabelsPdf(
				[
					{ code: A, name: 'A' },
					{ code: A, name: 'A, second half' }
				],
				{ layout: l, origin: ORIGIN }
			)
		);
		expect(pdf.getPageCount()).toBe(2);
		for (const page of pdf.getPages()) {
			// 38 × 19 mm = 107.717 × 53.858 pt
			expect(page.getWidth()).toBeCloseTo(107.7165, 3);
			expect(page.getHeight()).toBeCloseTo(53.8583, 3);
			expect(placedQrs(page).map((q) => q.url)).toEqual([`${ORIGIN}/f/${A}`]);
		}
	});
});
