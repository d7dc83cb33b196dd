import { describe, expect, it } from 'vitest';
import { MAX_IMAGE_SIDE_PX, imageSizeProblem, sniffImage } from './image-type';

const b64 = (s: string) => new Uint8Array(Buffer.from(s, 'base64'));
const bytes = (...parts: (number[] | string)[]) =>
	new Uint8Array(
		parts.flatMap((p) => (typeof p === 'string' ? [...p].map((c) => c.charCodeAt(0)) : p))
	);

describe('sniffImage', () => {
	it('reads a PNG’s size from IHDR (PNG specification §11.2.2)', () => {
		// The smallest valid PNG: 1 × 1, RGBA, one IDAT.
		const png = b64(
			'iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNkYPhfDwAChwGA60e6kgAAAABJRU5ErkJggg=='
		);
		expect(sniffImage(png)).toEqual({ type: 'image/png', width: 1, height: 1 });
		// Width 640 (0x280), height 480 (0x1E0) written big-endian.
		const header = bytes(
			[0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13],
			'IHDR',
			[0, 0, 2, 0x80, 0, 0, 1, 0xe0]
		);
		expect(sniffImage(header)).toEqual({ type: 'image/png', width: 640, height: 480 });
	});

	it('finds a JPEG’s frame header past APP segments (ITU-T T.81 §B.2.2)', () => {
		const jpeg = bytes(
			[0xff, 0xd8],
			[0xff, 0xe0, 0x00, 0x10],
			'JFIF',
			[0, 1, 1, 0, 0, 1, 0, 1, 0, 0],
			// DHT before the frame must be skipped, not read as a frame (0xC4).
			[0xff, 0xc4, 0x00, 0x04, 0, 0],
			// SOF2 (progressive): precision 8, height 0x0BB8 = 3000, width 0x0FA0 = 4000.
			[0xff, 0xc2, 0x00, 0x11, 8, 0x0b, 0xb8, 0x0f, 0xa0, 3, 1, 0x22, 0, 2, 0x11, 1, 3, 0x11, 1]
		);
		expect(sniffImage(jpeg)).toEqual({ type: 'image/jpeg', width: 4000, height: 3000 });
	});

	it('knows a JPEG whose header is cut short, without a size', () => {
		expect(sniffImage(bytes([0xff, 0xd8, 0xff, 0xe1]))).toEqual({
			type: 'image/jpeg',
			width: null,
			height: null
		});
	});

	it('reads lossless and extended WebP sizes (WebP container specification)', () => {
		// A 1 × 1 lossless WebP.
		const vp8l = b64('UklGRhoAAABXRUJQVlA4TA0AAAAvAAAAEAcQERGIiP4HAA==');
		expect(sniffImage(vp8l)).toEqual({ type: 'image/webp', width: 1, height: 1 });
		// VP8X: canvas width − 1 and height − 1 as 24-bit little-endian: 1919 → 1920, 1079 → 1080.
		const vp8x = bytes(
			'RIFF',
			[0, 0, 0, 0],
			'WEBP',
			'VP8X',
			[10, 0, 0, 0, 0, 0, 0, 0],
			[0x7f, 0x07, 0x00, 0x37, 0x04, 0x00]
		);
		expect(sniffImage(vp8x)).toEqual({ type: 'image/webp', width: 1920, height: 1080 });
	});

	it('refuses text, even when it starts like an image name', () => {
		expect(sniffImage(new TextEncoder().encode('photo.png: ball 2 looked fine'))).toBeNull();
		expect(sniffImage(bytes('GIF89a', [1, 0, 1, 0]))).toBeNull();
		expect(sniffImage(new Uint8Array())).toBeNull();
	});
});

describe('imageSizeProblem', () => {
	const png = (width: number, height: number) => ({ type: 'image/png' as const, width, height });

	it('accepts phone-sized photos, the largest JPEG side, and sizes the header does not give', () => {
		expect(imageSizeProblem(png(4032, 3024))).toBeNull();
		// 65535 is the largest value of JPEG's 16-bit frame fields (ITU-T T.81 §B.2.2).
		expect(MAX_IMAGE_SIDE_PX).toBe(65_535);
		expect(imageSizeProblem(png(65_535, 1))).toBeNull();
		expect(imageSizeProblem({ type: 'image/jpeg', width: null, height: null })).toBeNull();
		// A JPEG may give its height later, in a DNL marker (ITU-T T.81 §B.2.5): 0 here is allowed.
		expect(imageSizeProblem({ type: 'image/jpeg', width: 640, height: 0 })).toBeNull();
	});

	it('refuses a PNG header claiming 2^31 px or more, or zero (PNG specification §11.2.2)', () => {
		const huge = bytes(
			[0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13],
			'IHDR',
			[0x80, 0, 0, 0, 0xff, 0xff, 0xff, 0xff]
		);
		const info = sniffImage(huge)!;
		expect(info).toEqual({ type: 'image/png', width: 2 ** 31, height: 2 ** 32 - 1 });
		expect(imageSizeProblem(info)).toBe(
			'The image header claims a width of 2147483648 pixels; at most 65535 is accepted.'
		);
		expect(imageSizeProblem(png(640, 65_536))).toMatch(/height of 65536 pixels/);
		expect(imageSizeProblem(png(0, 480))).toBe(
			'The image header gives a width of 0 pixels; the file is damaged.'
		);
	});
});
