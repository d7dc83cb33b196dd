/**
 * Reads the QR code in a photo or image file. Both decoders are loaded only when a photo is
 * chosen, so the scan page opens without them.
 *
 * html5-qrcode (ZXing) reads real phone photos well but, as seen in testing here, misses crisp,
 * perfectly square images such as a screenshot of a label or an image exported from the label
 * PDF; jsQR reads those, so it is the second try.
 */

/** Longest side handed to jsQR: enough for a label filling a tenth of a 12-megapixel photo. */
const MAX_SIDE = 1600;

async function withJsQr(file: File): Promise<string | undefined> {
	const [{ default: jsQR }, bitmap] = await Promise.all([import('jsqr'), createImageBitmap(file)]);
	const scale = Math.min(1, MAX_SIDE / Math.max(bitmap.width, bitmap.height));
	const width = Math.max(1, Math.round(bitmap.width * scale));
	const height = Math.max(1, Math.round(bitmap.height * scale));
	const canvas = document.createElement('canvas');
	canvas.width = width;
	canvas.height = height;
	const ctx = canvas.getContext('2d', { willReadFrequently: true });
	if (!ctx) return undefined;
	ctx.drawImage(bitmap, 0, 0, width, height);
	bitmap.close();
	const { data } = ctx.getImageData(0, 0, width, height);
	return jsQR(data, width, height, { inversionAttempts: 'attemptBoth' })?.data;
}

/**
 * The text of the first QR code in `file`, or undefined when neither decoder finds one.
 * `elementId` names an element html5-qrcode may use as scratch space (it can stay hidden).
 */
export async function decodeQrPhoto(file: File, elementId: string): Promise<string | undefined> {
	const { Html5Qrcode, Html5QrcodeSupportedFormats } = await import('html5-qrcode');
	const reader = new Html5Qrcode(elementId, {
		verbose: false,
		formatsToSupport: [Html5QrcodeSupportedFormats.QR_CODE]
	});
	try {
		return await reader.scanFile(file, false);
	} catch {
		// Not found by ZXing: try the second decoder before giving up.
	} finally {
		reader.clear();
	}
	return withJsQr(file);
}
