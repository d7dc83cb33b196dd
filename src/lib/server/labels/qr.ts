import QRCode from 'qrcode';
import { isValidFixtureCode } from '$lib/domain/fixture-code';

/**
 * Error correction level Q restores up to about 25 % of the symbol (ISO/IEC 18004 table 1), which
 * survives a scratched or oily label on the shop floor; the URL is short enough that the symbol
 * stays small (version 3 or 4 for typical origins).
 */
export const QR_ERROR_CORRECTION = 'Q' as const;

/** ISO/IEC 18004 §5.3.8 (2015): the quiet zone is at least 4 modules wide on every side. */
export const QR_QUIET_ZONE = 4;

/** The app's public origin for printed labels: ORIGIN from the environment, else `fallback`. */
export function labelOrigin(fallback?: string): string {
	const origin = process.env.ORIGIN || fallback;
	if (!origin) throw new Error('ORIGIN is not set, so labels cannot carry an absolute URL');
	return new URL(origin).origin;
}

/** The absolute URL a fixture's label encodes: `<origin>/f/<code>`. */
export function labelUrl(code: string, origin: string): string {
	if (!isValidFixtureCode(code)) throw new RangeError(`"${code}" is not a valid fixture code`);
	return `${new URL(origin).origin}/f/${code}`;
}

/** The modules of a label's QR symbol (without quiet zone); `dark(x, y)` with 0 ≤ x, y < size. */
export interface QrMatrix {
	url: string;
	version: number;
	size: number;
	dark: (x: number, y: number) => boolean;
}

/** Encodes the label URL of `code` as a QR symbol at the label's error correction level. */
export function labelQrMatrix(code: string, origin: string): QrMatrix {
	const url = labelUrl(code, origin);
	const qr = QRCode.create(url, { errorCorrectionLevel: QR_ERROR_CORRECTION });
	const { size, data } = qr.modules;
	return { url, version: qr.version, size, dark: (x, y) => data[y * size + x] === 1 };
}

/**
 * Dark modules merged into horizontal runs, row by row: what a vector renderer fills as
 * rectangles (fewer, larger shapes than one per module, and no hairline seams between them).
 */
export function darkRuns(
	m: Pick<QrMatrix, 'size' | 'dark'>
): { x: number; y: number; length: number }[] {
	const runs: { x: number; y: number; length: number }[] = [];
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

/** The label's QR symbol as standalone SVG (quiet zone included), for screens and downloads. */
export async function labelQrSvg(code: string, origin: string): Promise<string> {
	return QRCode.toString(labelUrl(code, origin), {
		type: 'svg',
		errorCorrectionLevel: QR_ERROR_CORRECTION,
		margin: QR_QUIET_ZONE
	});
}

/** The label's QR symbol as a PNG, `scale` pixels per module, quiet zone included. */
export async function labelQrPng(code: string, origin: string, scale = 8): Promise<Buffer> {
	return QRCode.toBuffer(labelUrl(code, origin), {
		type: 'png',
		errorCorrectionLevel: QR_ERROR_CORRECTION,
		margin: QR_QUIET_ZONE,
		scale
	});
}
