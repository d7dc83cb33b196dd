import QRCode from 'qrcode';
import { config } from '../config';
import {
	QR_ERROR_CORRECTION,
	QR_QUIET_ZONE,
	labelUrl,
	type ModuleGrid
} from '$lib/labels/qr-modules';

export { QR_ERROR_CORRECTION, QR_QUIET_ZONE, darkRuns, labelUrl } from '$lib/labels/qr-modules';

/**
 * The app's public origin for printed labels: ORIGIN from the environment, else `fallback`
 * (the request's origin under `vite dev`). A label outlives any request, so it must never carry
 * whatever host a request claimed.
 */
export function labelOrigin(fallback?: string): string {
	const origin = config().origin || fallback;
	if (!origin) throw new Error('ORIGIN is not set, so labels cannot carry an absolute URL');
	return new URL(origin).origin;
}

/** The modules of a label's QR symbol (without quiet zone); `dark(x, y)` with 0 ≤ x, y < size. */
export interface QrMatrix extends ModuleGrid {
	url: string;
	version: number;
}

/** Encodes the label URL of `code` as a QR symbol at the label's error correction level. */
export function labelQrMatrix(code: string, origin: string): QrMatrix {
	const url = labelUrl(code, origin);
	const qr = QRCode.create(url, { errorCorrectionLevel: QR_ERROR_CORRECTION });
	const { size, data } = qr.modules;
	return { url, version: qr.version, size, dark: (x, y) => data[y * size + x] === 1 };
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
