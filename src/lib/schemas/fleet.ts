/**
 * The fleet board's query: the filters of /board and GET /api/fleet/summary, all in the URL so a
 * view can be bookmarked and shared.
 */
import { z } from 'zod';
import { FIXTURE_STATUSES, FIXTURE_TYPES, FLAG_KINDS } from './fixture';
import { fieldErrors } from './fixture-form';

const blank = (v: unknown) =>
	v === undefined || v === null || (typeof v === 'string' && v.trim() === '')
		? undefined
		: typeof v === 'string'
			? v.trim()
			: v;

const optionalEnum = <const T extends readonly [string, ...string[]]>(name: string, values: T) =>
	z.preprocess(
		blank,
		z.enum(values, { error: `${name} must be one of: ${values.join(', ')}.` }).optional()
	);

/** Area (id), flag kind, fixture type, fixture status and a search of code or name. */
export const fleetQuerySchema = z.object({
	area: z.preprocess(
		(v) => {
			const b = blank(v);
			return typeof b === 'string' && /^\d+$/.test(b) ? Number(b) : b;
		},
		z
			.number({ error: 'area must be a numeric area id.' })
			.int('area must be a numeric area id.')
			.positive('area must be a numeric area id.')
			.max(2_147_483_647, 'area must be a numeric area id.')
			.optional()
	),
	kind: optionalEnum('kind', FLAG_KINDS),
	type: optionalEnum('type', FIXTURE_TYPES),
	status: optionalEnum('status', FIXTURE_STATUSES),
	q: z.preprocess(blank, z.string().max(100, 'Search at most 100 characters.').optional()),
	/** The page of "Needs attention" (ATTENTION_PAGE_SIZE rows each). */
	page: z.preprocess(
		(v) => {
			const b = blank(v);
			return typeof b === 'string' && /^\d+$/.test(b) ? Number(b) : b;
		},
		z
			.number({ error: 'page must be a whole number from 1.' })
			.int('page must be a whole number from 1.')
			.min(1, 'page must be a whole number from 1.')
			.max(100_000, 'page can be at most 100000.')
			.default(1)
	)
});
export type FleetQuery = z.output<typeof fleetQuerySchema>;

/** The query's keys, in the order the URL spells them. */
export const FLEET_QUERY_KEYS = ['area', 'kind', 'type', 'status', 'q', 'page'] as const;

const rawParams = (params: URLSearchParams) =>
	Object.fromEntries(FLEET_QUERY_KEYS.map((k) => [k, params.get(k) ?? undefined]));

/** Strict reading (the API answers 400 on errors). */
export function safeParseFleetQuery(
	params: URLSearchParams
): { ok: true; query: FleetQuery } | { ok: false; errors: Record<string, string[]> } {
	const parsed = fleetQuerySchema.safeParse(rawParams(params));
	return parsed.success
		? { ok: true, query: parsed.data }
		: { ok: false, errors: fieldErrors(parsed.error) };
}

/** Lenient reading (the page): a bad filter is dropped and named, the rest still applies. */
export function parseFleetQuery(params: URLSearchParams): {
	query: FleetQuery;
	errors: Record<string, string[]> | null;
} {
	const raw = rawParams(params);
	const parsed = fleetQuerySchema.safeParse(raw);
	if (parsed.success) return { query: parsed.data, errors: null };
	const errors = fieldErrors(parsed.error);
	for (const k of Object.keys(errors)) delete raw[k];
	return { query: fleetQuerySchema.parse(raw), errors };
}

/** The query as plain strings, the given filters only (for links and the charts' query). */
export function fleetQueryRecord(query: Partial<FleetQuery>): Record<string, string> {
	const out: Record<string, string> = {};
	for (const k of FLEET_QUERY_KEYS) {
		const v = query[k];
		// The first page is the default: links to it stay short.
		if (v !== undefined && v !== null && v !== '' && !(k === 'page' && v === 1)) out[k] = String(v);
	}
	return out;
}

/** "?area=3&kind=drift", or "" when no filter is set. */
export function fleetQueryString(query: Partial<FleetQuery>): string {
	const s = new URLSearchParams(fleetQueryRecord(query)).toString();
	return s ? `?${s}` : '';
}
