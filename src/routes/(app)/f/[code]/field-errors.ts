import type { FieldErrors } from '$lib/schemas/events';

/** The first message for a payload field (`'cycles'`, `'readings.dx'`…), from a sync-schema error map. */
export function payloadError(errors: FieldErrors | null, field: string): string | undefined {
	return errors?.[`payload.${field}`]?.[0];
}

/** Messages that belong to no single field shown on the form. */
export function otherErrors(errors: FieldErrors | null, shown: readonly string[]): string[] {
	if (!errors) return [];
	const known = new Set(shown.map((f) => `payload.${f}`));
	return Object.entries(errors)
		.filter(([k]) => !known.has(k))
		.flatMap(([, m]) => m);
}

/** The look of the card's inputs (the same as the shared Field component). */
export const INPUT_CLASS =
	'min-h-touch rounded-md border border-paper-line bg-paper-panel px-3 text-base font-normal';
