/** Number formats for flag reasons, kept short and the same on every flag. */

/** Three significant figures: 1.8, 0.0123, 1230. */
export function num(x: number): string {
	if (x === 0) return '0';
	return String(Number(x.toPrecision(3)));
}

/** Whole number with thousands separators: 12,345 (toLocaleString is slow on a hot path). */
export function count(x: number): string {
	const n = Math.round(x);
	const digits = String(Math.abs(n));
	let out = '';
	for (let i = 0; i < digits.length; i++) {
		if (i > 0 && (digits.length - i) % 3 === 0) out += ',';
		out += digits[i];
	}
	return n < 0 ? `-${out}` : out;
}

/** The calendar day (UTC) of an ISO time: 2025-03-04. */
export function day(iso: string): string {
	return iso.slice(0, 10);
}
