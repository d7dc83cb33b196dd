/**
 * One cycle's indicator readings as typed: each axis is empty (not measured) or a number of
 * micrometres, checked with the shared reading schema so the phone refuses what the server would.
 */
import type { Reading } from '$lib/domain/repeatability';
import { readingSchema } from '$lib/schemas/events';

export const AXES = ['dx', 'dy', 'dz'] as const;
export type Axis = (typeof AXES)[number];

/** The text of each field; null where the browser could not read the entry as a number. */
export type ReadingTexts = Record<Axis, string | null>;

export type ParsedReading =
	{ ok: true; reading: Reading | null } | { ok: false; errors: Partial<Record<Axis, string>> };

/** The cycle's reading from its fields: null when all are empty, else a checked reading or messages. */
export function parseReading(texts: ReadingTexts): ParsedReading {
	const errors: Partial<Record<Axis, string>> = {};
	const raw: Partial<Record<Axis, number>> = {};
	for (const axis of AXES) {
		const text = texts[axis];
		if (text === null) {
			errors[axis] = `${axis} must be a number of micrometres`;
			continue;
		}
		const t = text.trim().replace(',', '.');
		if (t === '') continue;
		const v = Number(t);
		if (!Number.isFinite(v)) errors[axis] = `${axis} must be a number of micrometres`;
		else raw[axis] = v;
	}
	if (Object.keys(errors).length) return { ok: false, errors };
	if (Object.keys(raw).length === 0) return { ok: true, reading: null };
	const parsed = readingSchema.safeParse(raw);
	if (parsed.success) return { ok: true, reading: parsed.data };
	for (const issue of parsed.error.issues) {
		const axis = issue.path[0] as Axis;
		errors[axis] ??= issue.message;
	}
	return { ok: false, errors };
}
