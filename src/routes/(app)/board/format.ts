/** Wording of the board's numbers: ages and the figures behind a flag. Pure, shared with /work. */
import { num } from '$lib/domain/flag-words';

/** How long ago, short: "just now", "25 min", "5 h", "3 d", "11 wk". */
export function age(fromIso: string, now: number): string {
	const s = Math.max(0, (now - Date.parse(fromIso)) / 1000);
	if (s < 60) return 'just now';
	if (s < 3600) return `${Math.floor(s / 60)} min`;
	if (s < 86_400) return `${Math.floor(s / 3600)} h`;
	if (s < 84 * 86_400) return `${Math.floor(s / 86_400)} d`;
	return `${Math.floor(s / (7 * 86_400))} wk`;
}

const UNITS: [RegExp, string][] = [
	[/_um$/, ' µm'],
	[/_mm$/, ' mm'],
	[/_N$/, ' N'],
	[/_days$/, ' d']
];

/** A figure's key in words: "cyclesSince" → "cycles since", "R_um" → "R" with unit "µm". */
function keyWords(key: string): { words: string; unit: string } {
	let unit = '';
	let k = key;
	for (const [re, u] of UNITS) {
		if (re.test(k)) {
			unit = u;
			k = k.replace(re, '');
			break;
		}
	}
	const words = k.length <= 2 ? k : k.replace(/([a-z])([A-Z])/g, '$1 $2').toLowerCase();
	return { words, unit };
}

/** The figures behind a flag as short "name value" pairs; empty values are left out. */
export function figureList(figures: Record<string, number | string | null> | null): string[] {
	if (!figures) return [];
	const out: string[] = [];
	for (const [key, value] of Object.entries(figures)) {
		if (value === null || value === '') continue;
		const { words, unit } = keyWords(key);
		const shown =
			typeof value === 'number'
				? `${num(value)}${unit}`
				: /^\d{4}-\d\d-\d\dT/.test(value)
					? value.slice(0, 10)
					: value;
		out.push(`${words} ${shown}`);
	}
	return out;
}
