/** Times in the register: ISO 8601 strings, normalised by the schemas to UTC with milliseconds. */

const digit = (s: string, i: number) => s.charCodeAt(i) - 48;
const two = (s: string, i: number) => digit(s, i) * 10 + digit(s, i + 1);
// 'd' marks a digit.
const SHAPE = 'dddd-dd-ddTdd:dd:dd.ddd';

/**
 * Milliseconds since the epoch of an ISO time. The normalised form "YYYY-MM-DDTHH:MM:SS.sssZ" is
 * read digit by digit (Date.parse costs several times more, and flags and sorting call this for
 * every fixture and event); any other form goes to Date.parse. NaN for text that is not a time.
 */
export function isoMs(s: string): number {
	if (s.length === 24 && s.charCodeAt(23) === 90) {
		for (let i = 0; i < 23; i++) {
			const c = s.charCodeAt(i);
			const want = SHAPE.charCodeAt(i);
			if (want === 100 ? c < 48 || c > 57 : c !== want) return Date.parse(s);
		}
		const month = two(s, 5);
		const day = two(s, 8);
		const hour = two(s, 11);
		const minute = two(s, 14);
		const second = two(s, 17);
		// Days past the 28th need the calendar: leave them, and any odd value, to Date.parse.
		if (
			month >= 1 &&
			month <= 12 &&
			day >= 1 &&
			day <= 28 &&
			hour < 24 &&
			minute < 60 &&
			second < 60
		) {
			const year = digit(s, 0) * 1000 + digit(s, 1) * 100 + two(s, 2);
			const ms = digit(s, 20) * 100 + two(s, 21);
			return Date.UTC(year, month - 1, day, hour, minute, second, ms);
		}
	}
	return Date.parse(s);
}
