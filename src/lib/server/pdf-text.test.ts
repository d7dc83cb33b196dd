import { PDFDocument, StandardFonts } from 'pdf-lib';
import { describe, expect, it } from 'vitest';
import { encodable } from './pdf-text';

// WinAnsiEncoding (PDF 32000-1:2008, Annex D.2) has µ, Ø, ×, the en and em dash and the middle
// dot, but no σ, minus sign, arrows or CJK; the standard fonts can draw only what it has.

describe('encodable', () => {
	it('keeps what WinAnsi has, line breaks too, and swaps or marks the rest', async () => {
		const doc = await PDFDocument.create();
		const font = await doc.embedFont(StandardFonts.Helvetica);
		expect(encodable(font, 'Plain ASCII, 1.5 um\nsecond line')).toBe(
			'Plain ASCII, 1.5 um\nsecond line'
		);
		expect(encodable(font, '0.5 µm · Ø12.7 — Theil–Sen\n×2')).toBe(
			'0.5 µm · Ø12.7 — Theil–Sen\n×2'
		);
		expect(encodable(font, 'beyond the 3σ limits, −0.1 µm, ⌀6 → ok')).toBe(
			'beyond the 3s limits, -0.1 µm, Ø6 -> ok'
		);
		expect(encodable(font, '治具')).toBe('??');
		// Every character left can be drawn.
		expect(() => font.encodeText(encodable(font, 'σ ⌀ → ≤ ≥ 治'))).not.toThrow();
	});
});
