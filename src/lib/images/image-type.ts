/**
 * What kind of image a file is, read from its first bytes rather than its name or the type the
 * browser claimed, and its pixel size from the header. Only the three formats phones and browsers
 * produce are known: JPEG, PNG and WebP. Pure: bytes in, facts out.
 */

/** Media types Nestmark accepts for photos. */
export const IMAGE_TYPES = ['image/jpeg', 'image/png', 'image/webp'] as const;
export type ImageType = (typeof IMAGE_TYPES)[number];

/** A recognised image: its type and, when the header gives it, its size in pixels. */
export interface ImageInfo {
	type: ImageType;
	width: number | null;
	height: number | null;
}

const PNG_SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];

const ascii = (b: Uint8Array, at: number, s: string) =>
	b.length >= at + s.length && [...s].every((c, i) => b[at + i] === c.charCodeAt(0));
const u16be = (b: Uint8Array, at: number) => (b[at] << 8) | b[at + 1];
const u16le = (b: Uint8Array, at: number) => b[at] | (b[at + 1] << 8);
const u24le = (b: Uint8Array, at: number) => b[at] | (b[at + 1] << 8) | (b[at + 2] << 16);
const u32be = (b: Uint8Array, at: number) =>
	((b[at] << 24) >>> 0) + ((b[at + 1] << 16) | (b[at + 2] << 8) | b[at + 3]);

/** The image type and size of `bytes`, or null when it is not a JPEG, PNG or WebP. */
export function sniffImage(bytes: Uint8Array): ImageInfo | null {
	if (bytes.length >= 8 && PNG_SIGNATURE.every((v, i) => bytes[i] === v)) return png(bytes);
	if (bytes.length >= 3 && bytes[0] === 0xff && bytes[1] === 0xd8 && bytes[2] === 0xff) {
		return jpeg(bytes);
	}
	if (ascii(bytes, 0, 'RIFF') && ascii(bytes, 8, 'WEBP')) return webp(bytes);
	return null;
}

// PNG: the IHDR chunk comes first, with width and height as big-endian 32-bit (PNG spec §11.2.2).
function png(b: Uint8Array): ImageInfo {
	const ok = b.length >= 24 && ascii(b, 12, 'IHDR');
	return { type: 'image/png', width: ok ? u32be(b, 16) : null, height: ok ? u32be(b, 20) : null };
}

// JPEG: walk the marker segments to the first start-of-frame (SOF0–SOF15 but DHT, JPG and DAC),
// which holds height then width (ITU-T T.81 §B.2.2).
function jpeg(b: Uint8Array): ImageInfo {
	let at = 2;
	while (at + 9 < b.length) {
		if (b[at] !== 0xff) break;
		const marker = b[at + 1];
		if (marker === 0xff) {
			at += 1; // fill byte
			continue;
		}
		if (marker === 0xd8 || marker === 0x01 || (marker >= 0xd0 && marker <= 0xd7)) {
			at += 2; // markers without a length
			continue;
		}
		const length = u16be(b, at + 2);
		const sof = marker >= 0xc0 && marker <= 0xcf && ![0xc4, 0xc8, 0xcc].includes(marker);
		if (sof) {
			return { type: 'image/jpeg', height: u16be(b, at + 5), width: u16be(b, at + 7) };
		}
		if (marker === 0xda || length < 2) break; // image data starts; no frame header found
		at += 2 + length;
	}
	return { type: 'image/jpeg', width: null, height: null };
}

// WebP: the first chunk says lossy (VP8), lossless (VP8L) or extended (VP8X); each keeps the size
// in its own way (WebP container specification, "Simple file format" and "Extended file format").
function webp(b: Uint8Array): ImageInfo {
	const none: ImageInfo = { type: 'image/webp', width: null, height: null };
	if (ascii(b, 12, 'VP8X') && b.length >= 30) {
		return { type: 'image/webp', width: u24le(b, 24) + 1, height: u24le(b, 27) + 1 };
	}
	if (ascii(b, 12, 'VP8L') && b.length >= 25 && b[20] === 0x2f) {
		const bits = b[21] | (b[22] << 8) | (b[23] << 16) | (b[24] << 24);
		return { type: 'image/webp', width: (bits & 0x3fff) + 1, height: ((bits >>> 14) & 0x3fff) + 1 };
	}
	if (
		ascii(b, 12, 'VP8 ') &&
		b.length >= 30 &&
		b[23] === 0x9d &&
		b[24] === 0x01 &&
		b[25] === 0x2a
	) {
		return { type: 'image/webp', width: u16le(b, 26) & 0x3fff, height: u16le(b, 28) & 0x3fff };
	}
	return none;
}

/**
 * Largest width or height accepted, px. JPEG's frame header cannot say more (16-bit fields,
 * ITU-T T.81 §B.2.2); a phone photo is far below it (common practice: 4000–8000 px). PNG allows
 * up to 2^31 − 1 (PNG spec §11.2.2), so a PNG header can claim sizes no photo has.
 */
export const MAX_IMAGE_SIDE_PX = 65_535;

/** Why the size the header claims cannot be a photo, or null when it can (or is not given). */
export function imageSizeProblem(info: ImageInfo): string | null {
	for (const [side, px] of [
		['width', info.width],
		['height', info.height]
	] as const) {
		if (px === null) continue;
		// PNG forbids zero (PNG spec §11.2.2); JPEG may leave the height to a later marker (0).
		if (px === 0 && !(info.type === 'image/jpeg' && side === 'height')) {
			return `The image header gives a ${side} of 0 pixels; the file is damaged.`;
		}
		if (px > MAX_IMAGE_SIDE_PX) {
			return `The image header claims a ${side} of ${px} pixels; at most ${MAX_IMAGE_SIDE_PX} is accepted.`;
		}
	}
	return null;
}
