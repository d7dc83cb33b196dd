import { encodePng } from '../../../scripts/demo-photos';

/** A real w × h RGB PNG with a gradient, so no two rows compress alike. */
export function png(w: number, h: number): Buffer {
	const rgb = new Uint8Array(w * h * 3);
	for (let y = 0; y < h; y++) {
		for (let x = 0; x < w; x++) rgb.set([x % 256, y % 256, 160], 3 * (y * w + x));
	}
	return encodePng(w, h, rgb);
}
