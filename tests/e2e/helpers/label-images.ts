import QRCode from 'qrcode';

/*
 * Pictures of a printed label for the scanner tests, made from the URL the label carries.
 * A phone photo is never a perfect square grid, so the "camera" picture is rotated a little and
 * its edges are softened by supersampling, as a lens and sensor would.
 */

/** A label's QR symbol as a crisp PNG (what an export or a screenshot of the label gives). */
export async function labelPng(url: string, scale = 8): Promise<Buffer> {
	return QRCode.toBuffer(url, { errorCorrectionLevel: 'Q', margin: 4, scale });
}

/** Luma of a camera frame: a white label on a grey bench, QR rotated by `degrees`, soft edges. */
function frameLuma(url: string, width: number, height: number, degrees: number): Uint8Array {
	const qr = QRCode.create(url, { errorCorrectionLevel: 'Q' }).modules;
	const n = qr.size;
	const modulePx = Math.floor((Math.min(width, height) * 0.6) / (n + 8));
	const half = ((n + 8) * modulePx) / 2; // label edge: the quiet zone and a little more
	const cos = Math.cos((degrees * Math.PI) / 180);
	const sin = Math.sin((degrees * Math.PI) / 180);
	const luma = new Uint8Array(width * height);
	const S = 4; // samples per pixel edge
	for (let y = 0; y < height; y++) {
		for (let x = 0; x < width; x++) {
			let sum = 0;
			for (let sy = 0; sy < S; sy++) {
				for (let sx = 0; sx < S; sx++) {
					// Into the label's frame: centre, then rotate back.
					const px = x + (sx + 0.5) / S - width / 2;
					const py = y + (sy + 0.5) / S - height / 2;
					const u = cos * px + sin * py;
					const v = -sin * px + cos * py;
					if (Math.abs(u) > half || Math.abs(v) > half) {
						sum += 110; // bench
						continue;
					}
					const mx = Math.floor((u + half) / modulePx) - 4;
					const my = Math.floor((v + half) / modulePx) - 4;
					const dark = mx >= 0 && my >= 0 && mx < n && my < n && qr.data[my * n + mx] === 1;
					sum += dark ? 30 : 225;
				}
			}
			luma[y * width + x] = Math.round(sum / (S * S));
		}
	}
	return luma;
}

/**
 * A short Y4M video (the format Chromium's fake camera plays, looped) showing the label.
 * Grey picture: chroma planes are neutral (128).
 */
export function labelY4m(url: string, width = 640, height = 480): Buffer {
	const luma = frameLuma(url, width, height, 4);
	const chroma = Buffer.alloc((width / 2) * (height / 2) * 2, 128);
	const frame = Buffer.concat([Buffer.from('FRAME\n'), Buffer.from(luma), chroma]);
	const header = Buffer.from(`YUV4MPEG2 W${width} H${height} F10:1 Ip A1:1 C420jpeg\n`);
	return Buffer.concat([header, frame, frame]);
}
