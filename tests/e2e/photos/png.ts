import { crc32, deflateSync } from 'node:zlib';

/** A real w × h RGB PNG (PNG specification: signature, IHDR, IDAT, IEND, each chunk with its CRC). */
export function png(w: number, h: number): Buffer {
	const chunk = (type: string, data: Buffer) => {
		const len = Buffer.alloc(4);
		len.writeUInt32BE(data.length);
		const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
		const crc = Buffer.alloc(4);
		crc.writeUInt32BE(crc32(body));
		return Buffer.concat([len, body, crc]);
	};
	const ihdr = Buffer.alloc(13);
	ihdr.writeUInt32BE(w, 0);
	ihdr.writeUInt32BE(h, 4);
	ihdr.set([8, 2, 0, 0, 0], 8);
	const rows = Buffer.alloc((3 * w + 1) * h);
	for (let y = 0; y < h; y++) {
		for (let x = 0; x < w; x++) rows.set([x % 256, y % 256, 160], y * (3 * w + 1) + 1 + 3 * x);
	}
	return Buffer.concat([
		Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
		chunk('IHDR', ihdr),
		chunk('IDAT', deflateSync(rows)),
		chunk('IEND', Buffer.alloc(0))
	]);
}
