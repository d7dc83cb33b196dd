/**
 * What a logged event recorded, in plain words for the fixture page's timeline: a summary line,
 * detail lines (each graded contact of an inspection, the readings of a seating, notes) and the
 * inspection's photo ids. Payloads are read defensively: unknown fields are ignored and a missing
 * field leaves its line out, so an event stored under an older payload shape still reads well.
 */
import { WEAR_GRADES } from './wear';
import { describeReading } from './event-history';

/** An event's payload in words. */
export interface EventDetails {
	summary: string;
	lines: string[];
	photoIds: string[];
}

/** Cleaning methods in words. */
export const CLEANING_METHOD_WORDS: Record<string, string> = {
	'dry-wipe': 'Dry wipe',
	'solvent-wipe': 'Solvent wipe',
	'ultrasonic-bath': 'Ultrasonic bath',
	'air-blow': 'Compressed air',
	other: 'Other method'
};

const PART_WORDS: Record<string, string> = {
	balls: 'balls',
	seats: 'seats',
	preload: 'preload parts',
	'whole-fixture': 'the whole fixture',
	other: 'another part'
};

const VERDICT_WORDS: Record<string, string> = {
	serviceable: 'serviceable',
	watch: 'watch',
	replace: 'replace'
};

const num = (v: unknown): number | undefined =>
	typeof v === 'number' && Number.isFinite(v) ? v : undefined;
const str = (v: unknown): string | undefined => (typeof v === 'string' && v ? v : undefined);
const plural = (n: number, one: string, many = `${one}s`) =>
	`${n.toLocaleString('en-GB')} ${n === 1 ? one : many}`;
const list = (words: string[]) =>
	words.length <= 1 ? words.join('') : `${words.slice(0, -1).join(', ')} and ${words.at(-1)}`;

/** "grade 2 (Dulled)" for a grade on Nestmark's wear scale. */
export function gradeWords(grade: number): string {
	const g = WEAR_GRADES.find((x) => x.grade === grade);
	return g ? `grade ${grade} (${g.name})` : `grade ${grade}`;
}

/**
 * An event's payload in words. `placeOf` names a location id (moves carry ids); it is given the
 * id as text and should fall back to something readable for an unknown one.
 */
export function eventDetails(
	kind: string,
	payload: Record<string, unknown>,
	placeOf: (locationId: string) => string
): EventDetails {
	const p = payload ?? {};
	const lines: string[] = [];
	let summary: string;
	let photoIds: string[] = [];
	switch (kind) {
		case 'reseat': {
			summary = plural(num(p.cycles) ?? 1, 'cycle');
			const r = describeReading(p.readings);
			summary += r ? `, last seating read ${r}` : ', no readings';
			break;
		}
		case 'cleaning': {
			const method = str(p.method);
			summary = method ? (CLEANING_METHOD_WORDS[method] ?? method) : 'Cleaned';
			summary +=
				p.relubricated === true
					? `; relubricated${str(p.lubricant) ? ` with ${p.lubricant}` : ''}`
					: '; not relubricated';
			break;
		}
		case 'inspection': {
			const contacts = Array.isArray(p.contacts) ? (p.contacts as Record<string, unknown>[]) : [];
			const grades = contacts.map((c) => num(c?.grade)).filter((g) => g !== undefined);
			const verdict = str(p.verdict);
			summary = [
				verdict ? `Verdict: ${VERDICT_WORDS[verdict] ?? verdict}` : undefined,
				grades.length ? `worst ${gradeWords(Math.max(...grades))}` : undefined
			]
				.filter(Boolean)
				.join(' — ');
			for (const c of contacts) {
				const grade = num(c?.grade);
				const marks = Array.isArray(c?.marks) ? (c.marks as unknown[]).filter(str) : [];
				lines.push(
					`${str(c?.contact) ?? 'Contact'}: ${grade === undefined ? 'not graded' : gradeWords(grade)}` +
						(marks.length ? `, ${list(marks as string[])}` : '')
				);
			}
			photoIds = Array.isArray(p.photoIds)
				? ((p.photoIds as unknown[]).filter(str) as string[])
				: [];
			break;
		}
		case 'break-in': {
			const readings = Array.isArray(p.readings) ? p.readings.length : 0;
			summary = `${plural(num(p.cycles) ?? 0, 'cycle')} run, ${readings ? plural(readings, 'reading') : 'no readings'}`;
			break;
		}
		case 'part-swap': {
			const parts = Array.isArray(p.replaced) ? (p.replaced as unknown[]).filter(str) : [];
			summary = parts.length
				? `Replaced ${list((parts as string[]).map((x) => PART_WORDS[x] ?? x))}`
				: 'Parts replaced';
			if (str(p.description)) lines.push(String(p.description));
			break;
		}
		case 'move': {
			// A register edit records both ends (older ones as from/to ids, newer ones in the phone's
			// shape plus fromLocationId); a move logged on the phone only where it went.
			summary =
				p.fromLocationId !== undefined
					? `From ${placeOf(String(p.fromLocationId))} to ${placeOf(String(p.toLocationId ?? p.locationId))}`
					: p.locationId !== undefined
						? `To ${placeOf(String(p.locationId))}`
						: 'Moved';
			break;
		}
		case 'hold':
			summary = str(p.reason) ? `Reason: ${p.reason}` : 'Taken out of service';
			break;
		case 'release':
			summary = 'Back in service';
			break;
		case 'note':
			summary = str(p.text) ?? '';
			break;
		default:
			summary = '';
	}
	if (kind !== 'note' && str(p.note)) lines.push(`Note: ${p.note}`);
	return { summary, lines, photoIds };
}
