/**
 * Generated photos for the demo's inspections: a lit steel ball or a vee-groove flank, seen close
 * up, with a contact band whose marks grow with the wear grade (a dull band, fretting specks,
 * pits). Invented pictures for demo data only — deterministic per seed, PNG, no packages beyond
 * node:zlib.
 */
import { crc32, deflateSync } from 'node:zlib';
import { seededRandom } from '../src/lib/domain/fixture-code';

/** What a demo photo shows. */
export interface DemoPhoto {
	subject: 'ball' | 'groove';
	/** Nestmark wear grade 0–4: how marked the contact band is. */
	grade: number;
	seed: number;
}

function chunk(type: string, data: Buffer): Buffer {
	const head = Buffer.alloc(8);
	head.writeUInt32BE(data.length, 0);
	head.write(type, 4, 'ascii');
	const crc = Buffer.alloc(4);
	crc.writeUInt32BE(crc32(Buffer.concat([head.subarray(4), data])) >>> 0, 0);
	return Buffer.concat([head, data, crc]);
}

/**
 * Encodes 8-bit RGB pixels (row-major, 3 bytes per pixel) as a PNG (PNG specification: signature,
 * IHDR, IDAT, IEND, each chunk with its CRC). Also the test photos' encoder.
 */
export function encodePng(width: number, height: number, rgb: Uint8Array): Buffer {
	const ihdr = Buffer.alloc(13);
	ihdr.writeUInt32BE(width, 0);
	ihdr.writeUInt32BE(height, 4);
	ihdr[8] = 8; // bit depth
	ihdr[9] = 2; // colour type: RGB
	const raw = Buffer.alloc((width * 3 + 1) * height);
	for (let y = 0; y < height; y++) {
		raw[y * (width * 3 + 1)] = 0; // filter: none
		raw.set(rgb.subarray(y * width * 3, (y + 1) * width * 3), y * (width * 3 + 1) + 1);
	}
	return Buffer.concat([
		Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
		chunk('IHDR', ihdr),
		chunk('IDAT', deflateSync(raw, { level: 9 })),
		chunk('IEND', Buffer.alloc(0))
	]);
}

const clamp = (v: number) => (v < 0 ? 0 : v > 255 ? 255 : Math.round(v));

/** Renders a demo photo at `width` × 3/4 width; returns the PNG. */
export function renderDemoPhoto(photo: DemoPhoto, width = 640): Buffer {
	const w = width;
	const h = Math.round((width * 3) / 4);
	const rgb = new Uint8Array(w * h * 3);
	const rnd = seededRandom(photo.seed);
	const grade = Math.max(0, Math.min(4, photo.grade));
	// Marks of the contact band: more and larger with the grade.
	const specks = Array.from({ length: grade * grade * 14 }, () => ({
		u: rnd() * 2 - 1,
		v: (rnd() * 2 - 1) * 0.12,
		r: (0.003 + rnd() * 0.003 * grade) * w
	}));
	const cx = w / 2;
	const cy = h / 2;
	const R = h * 0.42;
	for (let y = 0; y < h; y++) {
		for (let x = 0; x < w; x++) {
			let r = 46;
			let g = 50;
			let b = 56;
			let band = -1;
			if (photo.subject === 'ball') {
				const dx = (x - cx) / R;
				const dy = (y - cy) / R;
				const d2 = dx * dx + dy * dy;
				if (d2 <= 1) {
					// Lambert shading plus a highlight, light from the upper left.
					const nz = Math.sqrt(1 - d2);
					const lit = Math.max(0, -0.45 * dx - 0.55 * dy + 0.7 * nz);
					const spec = Math.pow(Math.max(0, lit), 40) * 200;
					r = 70 + 150 * lit + spec;
					g = 74 + 150 * lit + spec;
					b = 80 + 152 * lit + spec;
					// The contact band: a latitude ring where the ball meets the groove flank.
					band = Math.abs(dy - 0.35) < 0.09 ? (dx + 1) / 2 : -1;
				}
			} else {
				// A vee-groove flank: a ground face with lay lines, the contact band along it.
				const lay = Math.sin(y * 0.9 + Math.sin(x * 0.05) * 2) * 6;
				const shade = 120 + 60 * (x / w) + lay;
				r = shade;
				g = shade + 3;
				b = shade + 8;
				const v = (y - cy) / h;
				band = Math.abs(v) < 0.08 ? x / w : -1;
			}
			if (band >= 0 && grade > 0) {
				const dull = 0.12 * grade;
				r = r * (1 - dull) + 150 * dull;
				g = g * (1 - dull) + 135 * dull;
				b = b * (1 - dull) + 110 * dull;
			}
			const i = (y * w + x) * 3;
			rgb[i] = clamp(r);
			rgb[i + 1] = clamp(g);
			rgb[i + 2] = clamp(b);
		}
	}
	// Fretting and pits: darker, slightly reddish-brown specks in the band.
	const bandY = photo.subject === 'ball' ? cy + 0.35 * R : cy;
	// On the ball the band is the chord at that latitude, shortened to stay on the lit face.
	const bandHalf = photo.subject === 'ball' ? R * Math.sqrt(1 - 0.35 * 0.35) * 0.9 : w / 2;
	for (const s of specks) {
		const sx = cx + s.u * bandHalf * 0.85;
		const sy = bandY + s.v * (photo.subject === 'ball' ? R * 0.7 : h * 0.5);
		for (let y = Math.floor(sy - s.r); y <= sy + s.r; y++) {
			for (let x = Math.floor(sx - s.r); x <= sx + s.r; x++) {
				if (x < 0 || y < 0 || x >= w || y >= h) continue;
				if ((x - sx) ** 2 + (y - sy) ** 2 > s.r * s.r) continue;
				const i = (y * w + x) * 3;
				rgb[i] = clamp(rgb[i] * 0.55 + 40);
				rgb[i + 1] = clamp(rgb[i + 1] * 0.5 + 22);
				rgb[i + 2] = clamp(rgb[i + 2] * 0.45 + 12);
			}
		}
	}
	return encodePng(w, h, rgb);
}
