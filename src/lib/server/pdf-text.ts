/**
 * Text for PDFs drawn with pdf-lib's standard fonts (Helvetica, Courier: no font files to ship,
 * WinAnsi encoding). Shared by the label sheets and the audit report.
 */
import type { PDFFont } from 'pdf-lib';

// Look-alikes the standard fonts' WinAnsi encoding does have, for signs common in fixture names
// and flag reasons.
const SUBSTITUTES: Record<string, string> = {
	'⌀': 'Ø',
	'−': '-',
	'≤': '<=',
	'≥': '>=',
	'′': "'",
	σ: 's',
	'→': '->',
	'⧖': '',
	'◷': ''
};

const PLAIN = /^[\x20-\x7e\n]*$/;
const charSets = new WeakMap<PDFFont, Set<number>>();

/**
 * Characters the font cannot encode (WinAnsi) become "?" rather than failing the whole document;
 * line breaks are kept for the caller to split on.
 */
export function encodable(font: PDFFont, text: string): string {
	// Plain ASCII needs no look-ups (every standard font has it); most text is.
	if (PLAIN.test(text)) return text;
	let set = charSets.get(font);
	if (!set) charSets.set(font, (set = new Set(font.getCharacterSet())));
	return [...text.normalize('NFC')]
		.map((ch) => SUBSTITUTES[ch] ?? ch)
		.map((ch) =>
			ch === '' || ch === '\n' || [...ch].every((c) => set.has(c.codePointAt(0)!)) ? ch : '?'
		)
		.join('');
}
