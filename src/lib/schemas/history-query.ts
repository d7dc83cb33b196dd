import { z } from 'zod';
import { EVENT_KINDS } from './events';

const blank = (v: unknown) =>
	v === null || (typeof v === 'string' && v.trim() === '') ? undefined : v;

/**
 * Where a page of a fixture's history starts: just older than the event with this time and id
 * ("2026-03-04T05:06:07.000Z~<event id>"), the last one of the page before.
 */
export const HISTORY_CURSOR = /^(\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z)~([0-9a-f-]{36})$/i;

/** Query of a fixture's history: an optional event kind and the cursor of the older page. */
export const historyQuerySchema = z.object({
	kind: z.preprocess(
		blank,
		z.enum(EVENT_KINDS, { error: `Kind must be one of: ${EVENT_KINDS.join(', ')}.` }).optional()
	),
	before: z.preprocess(
		blank,
		z
			.string()
			.regex(HISTORY_CURSOR, 'The page link is not valid; start again from the newest entries.')
			.optional()
	)
});
export type HistoryQuery = z.infer<typeof historyQuerySchema>;

/** The cursor of an event, for the link to the entries older than it. */
export function historyCursor(e: { occurredAt: string; id: string }): string {
	return `${e.occurredAt}~${e.id}`;
}
