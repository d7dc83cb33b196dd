import { z } from 'zod';

/** The longest range the fleet charts answer, in days (three years, with a leap day). */
export const FLEET_TRENDS_MAX_DAYS = 3 * 365 + 1;

const DAY_MS = 86_400_000;

const blank = (v: unknown) =>
	v === null || (typeof v === 'string' && v.trim() === '') ? undefined : v;

/** Midnight UTC of a calendar date YYYY-MM-DD, or NaN when it is no such date. */
export function dateMs(day: string): number {
	if (!/^\d{4}-\d{2}-\d{2}$/.test(day)) return Number.NaN;
	const ms = Date.parse(`${day}T00:00:00Z`);
	// Date.parse rolls 2026-02-30 over to March: a date that does not round-trip does not exist.
	return Number.isNaN(ms) || new Date(ms).toISOString().slice(0, 10) !== day ? Number.NaN : ms;
}

const isoDay = (ms: number) => new Date(ms).toISOString().slice(0, 10);

/** The same calendar date `years` earlier (29 February falls back to the 28th). */
function yearsBefore(day: string, years: number): string {
	const [y, m, d] = day.split('-').map(Number);
	const back = new Date(Date.UTC(y - years, m - 1, d));
	return back.getUTCMonth() === m - 1 ? isoDay(back.getTime()) : isoDay(Date.UTC(y - years, m, 0));
}

const day = (name: string) =>
	z.preprocess(
		blank,
		z
			.string({ error: `${name} must be a date as YYYY-MM-DD.` })
			.refine((s) => !Number.isNaN(dateMs(s)), {
				error: `${name} must be a date as YYYY-MM-DD (for example 2026-01-31).`
			})
			.optional()
	);

/**
 * Query of GET /api/fleet/trends and of the board's charts: `from` and `to` are calendar dates
 * (UTC), both included, by default the last 12 months to `today`; at most three years apart;
 * `area` an optional area id.
 */
export function fleetTrendsQuerySchema(now: Date = new Date()) {
	return z
		.object({
			from: day('from'),
			to: day('to'),
			area: z.preprocess(
				(v) => {
					const b = blank(v);
					return typeof b === 'string' && /^\d+$/.test(b) ? Number(b) : b;
				},
				z
					.number({ error: 'area must be a numeric area id.' })
					.int({ error: 'area must be a numeric area id.' })
					.positive({ error: 'area must be a numeric area id.' })
					.optional()
			)
		})
		.transform((q) => {
			const to = q.to ?? isoDay(now.getTime());
			return { from: q.from ?? yearsBefore(to, 1), to, area: q.area };
		})
		.superRefine((q, ctx) => {
			const span = (dateMs(q.to) - dateMs(q.from)) / DAY_MS;
			if (span < 0)
				ctx.addIssue({ code: 'custom', path: ['from'], message: 'from must not be after to.' });
			else if (span + 1 > FLEET_TRENDS_MAX_DAYS) {
				ctx.addIssue({
					code: 'custom',
					path: ['from'],
					message: 'The range may span at most three years: move from or to closer together.'
				});
			}
		});
}

/** A parsed fleet-trends query: dates as YYYY-MM-DD (both included), area id or undefined. */
export type FleetTrendsQuery = z.output<ReturnType<typeof fleetTrendsQuerySchema>>;

/** Reads the query from URL search parameters. */
export function readFleetTrendsQuery(params: URLSearchParams, now: Date = new Date()) {
	return fleetTrendsQuerySchema(now).safeParse({
		from: params.get('from'),
		to: params.get('to'),
		area: params.get('area')
	});
}
