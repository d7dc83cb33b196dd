import { z } from 'zod';
import { normaliseFixtureCode } from '$lib/domain/fixture-code';
import {
	FIXTURE_STATUSES,
	FIXTURE_STATUS_LABELS,
	FIXTURE_TYPES,
	FIXTURE_TYPE_LABELS,
	FLAG_KINDS
} from './fixture';
import { unicodeString } from './text';

/*
 * Schemas for creating, editing and listing fixtures, shared by the form pages, the JSON API and
 * the CSV import, so a value is judged the same way wherever it comes from. Optional fields are
 * `null` when left blank, which is also how an edit clears them.
 */

/** Blank strings (form fields left empty, empty CSV cells) count as "not given". */
function blankToNull(v: unknown): unknown {
	if (v === undefined || v === null) return null;
	if (typeof v === 'string') {
		const t = v.trim();
		return t === '' ? null : t;
	}
	return v;
}

const PLAIN_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** Why a number cell could not be read, in words that say how to fix it. */
function numberMessage(input: unknown, unit: string | null): string {
	if (typeof input === 'string') {
		if (/^[+-]?\d+,\d+$/.test(input)) {
			return `Use a decimal point, not a comma: ${input.replace(',', '.')}.`;
		}
		if (/^[+-]?[\d.,]+\s*\S/.test(input)) {
			return unit
				? `Enter the number only: the unit is already ${unit} (got "${input}").`
				: `Enter a whole number without units (got "${input}").`;
		}
		return `"${input}" is not a number.`;
	}
	return 'Enter a number.';
}

interface NumberOpts {
	unit: string | null;
	int?: boolean;
	/** Exclusive lower bound (default 0: positive numbers only). */
	above?: number;
	max: number;
	label: string;
}

/** An optional positive number field that reads strings from forms and CSV cells. */
function numberField({ unit, int = false, above = 0, max, label }: NumberOpts) {
	const unitText = unit ? ` ${unit}` : '';
	let n = z.number({ error: (iss) => numberMessage(iss.input, unit) });
	if (int) n = n.int(`${label} must be a whole number.`);
	n = n
		.gt(above, `${label} must be more than ${above}${unitText}.`)
		.max(max, `${label} must be at most ${max}${unitText}.`);
	return z.preprocess((v) => {
		const b = blankToNull(v);
		if (typeof b === 'string' && PLAIN_NUMBER.test(b)) return Number(b);
		return b;
	}, n.nullable());
}

function textField(max: number, label: string) {
	return z.preprocess(
		blankToNull,
		unicodeString(label).max(max, `${label} can be at most ${max} characters.`).nullable()
	);
}

/**
 * The latest calendar date that is "not in the future" anywhere: the server runs in UTC while a
 * shop may be up to 14 hours ahead, so today's local date there is allowed.
 */
export function latestAllowedDate(now = new Date()): string {
	return new Date(now.getTime() + 14 * 3600_000).toISOString().slice(0, 10);
}

const dateField = z.preprocess(
	blankToNull,
	z
		.string()
		.regex(/^\d{4}-\d{2}-\d{2}$/, 'Enter the date as YYYY-MM-DD, e.g. 2024-03-18.')
		.refine((s) => {
			const d = new Date(`${s}T00:00:00Z`);
			return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
		}, 'That date does not exist.')
		.refine((s) => s >= '1950-01-01', 'Enter a date after 1950.')
		.refine((s) => s <= latestAllowedDate(), 'The commissioning date cannot be in the future.')
		.nullable()
);

/** Keyword or its label ("Three-vee kinematic coupling" or "three-vee"), any case. */
function enumField<const T extends readonly [string, ...string[]]>(
	values: T,
	labels: Record<T[number], string>,
	what: string
) {
	return z.preprocess(
		(v) => {
			if (typeof v !== 'string') return v;
			const t = v.trim().toLowerCase();
			const byLabel = values.find((k) => labels[k as T[number]].toLowerCase() === t);
			return byLabel ?? t.replace(/\s+/g, '-');
		},
		z.enum(values, {
			error: (iss) =>
				iss.input === undefined || iss.input === ''
					? `Choose a ${what}.`
					: `"${String(iss.input)}" is not a ${what}; use one of: ${values.join(', ')}.`
		})
	);
}

/** The fields every fixture has, except where it is (forms pick a location, CSV names one). */
export const fixtureFieldsSchema = z.object({
	name: z.preprocess(
		(v) => (typeof v === 'string' ? v.trim() : v),
		unicodeString('The name', 'Give the fixture a name.')
			.min(1, 'Give the fixture a name.')
			.max(160, 'A name can be at most 160 characters.')
	),
	type: enumField(FIXTURE_TYPES, FIXTURE_TYPE_LABELS, 'fixture type'),
	status: z.preprocess(
		(v) => blankToNull(v) ?? 'in-service',
		enumField(FIXTURE_STATUSES, FIXTURE_STATUS_LABELS, 'status')
	),
	repeatabilitySpec_um: numberField({ unit: 'µm', max: 1000, label: 'The repeatability spec' }),
	ratedLifeCycles: numberField({
		unit: null,
		int: true,
		max: 100_000_000,
		label: 'The rated life'
	}),
	ballMaterial: textField(80, 'Ball material'),
	seatMaterial: textField(80, 'Seat material'),
	ballDiameter_mm: numberField({ unit: 'mm', max: 500, label: 'The ball diameter' }),
	preload_N: numberField({ unit: 'N', max: 1_000_000, label: 'The preload' }),
	mass_kg: numberField({ unit: 'kg', max: 10_000, label: 'The mass' }),
	commissionedOn: dateField,
	notes: textField(5000, 'Notes')
});

const locationIdField = z.preprocess(
	(v) => {
		const b = blankToNull(v);
		return typeof b === 'string' && /^\d+$/.test(b) ? Number(b) : b;
	},
	z.number({ error: 'Choose a location.' }).int('Choose a location.').positive('Choose a location.')
);

/** Create form / POST /api/fixtures. */
export const fixtureCreateSchema = fixtureFieldsSchema.extend({ locationId: locationIdField });
export type FixtureCreateInput = z.output<typeof fixtureCreateSchema>;

/** Edit form: the full set of fields again (blank clears an optional one). */
export const fixtureEditSchema = fixtureCreateSchema;

/** PATCH /api/fixtures/[code]: any subset; `null` clears an optional field. */
export const fixturePatchSchema = fixtureCreateSchema
	.partial()
	.refine((o) => Object.keys(o).length > 0, 'Send at least one field to change.');
export type FixturePatch = z.output<typeof fixturePatchSchema>;

/** A fixture code field: accepts anything people type and yields the canonical form. */
export const fixtureCodeSchema = z.string().transform((s, ctx) => {
	const r = normaliseFixtureCode(s);
	if (!r.ok) {
		ctx.addIssue({ code: 'custom', message: r.error });
		return z.NEVER;
	}
	return r.code;
});

/* ---------------------------------------------------------------------------------------- */

export const REGISTER_SORTS = ['code', 'name', 'type', 'status', 'location', 'updated'] as const;
export type RegisterSort = (typeof REGISTER_SORTS)[number];
export const REGISTER_SORT_LABELS: Record<RegisterSort, string> = {
	code: 'Code',
	name: 'Name',
	type: 'Type',
	status: 'Status',
	location: 'Location',
	updated: 'Last changed'
};
/** `any` = has at least one open flag; `none` = has none. */
export const FLAG_FILTERS = ['any', 'none', ...FLAG_KINDS] as const;
export const MAX_PAGE_SIZE = 100;
export const DEFAULT_PAGE_SIZE = 25;

const optionalId = z.preprocess(
	(v) => {
		const b = blankToNull(v);
		return b === null ? undefined : typeof b === 'string' && /^\d+$/.test(b) ? Number(b) : b;
	},
	z.number({ error: 'Must be a numeric id.' }).int().positive().optional()
);
const optionalEnum = <const T extends readonly [string, ...string[]]>(values: T) =>
	z.preprocess(
		(v) => blankToNull(v) ?? undefined,
		z.enum(values, { error: `Use one of: ${values.join(', ')}.` }).optional()
	);
const pageNumber = (dflt: number, max: number, what: string) =>
	z.preprocess(
		(v) => {
			const b = blankToNull(v);
			return b === null ? undefined : typeof b === 'string' && /^\d+$/.test(b) ? Number(b) : b;
		},
		z
			.number({ error: `${what} must be a whole number.` })
			.int(`${what} must be a whole number.`)
			.min(1, `${what} must be at least 1.`)
			.max(max, `${what} can be at most ${max}.`)
			.default(dflt)
	);

/** Register search, filters, sort and paging: the list page's URL and GET /api/fixtures. */
export const registerQuerySchema = z.object({
	q: z.preprocess(
		(v) => blankToNull(v) ?? undefined,
		z.string().max(100, 'Search at most 100 characters.').optional()
	),
	site: optionalId,
	area: optionalId,
	location: optionalId,
	type: optionalEnum(FIXTURE_TYPES),
	status: optionalEnum(FIXTURE_STATUSES),
	flag: optionalEnum(FLAG_FILTERS),
	sort: z.preprocess((v) => blankToNull(v) ?? undefined, z.enum(REGISTER_SORTS).default('code')),
	dir: z.preprocess((v) => blankToNull(v) ?? undefined, z.enum(['asc', 'desc']).default('asc')),
	page: pageNumber(1, 100_000, 'Page'),
	pageSize: pageNumber(DEFAULT_PAGE_SIZE, MAX_PAGE_SIZE, 'Page size')
});
export type RegisterQuery = z.output<typeof registerQuerySchema>;

/** Field messages from a failed parse, keyed by field: `{ name: ['Give the fixture a name.'] }`. */
export function fieldErrors(error: z.ZodError): Record<string, string[]> {
	const out: Record<string, string[]> = {};
	for (const issue of error.issues) {
		const key = issue.path.length ? String(issue.path[0]) : '_form';
		(out[key] ??= []).push(issue.message);
	}
	return out;
}

/**
 * Reads the register query from URL search parameters. Strict callers (the API) answer 400 on
 * `errors`; the list page drops the bad parameters and says so.
 */
export function parseRegisterQuery(params: URLSearchParams): {
	query: RegisterQuery;
	errors: Record<string, string[]> | null;
} {
	const raw = Object.fromEntries(
		Object.keys(registerQuerySchema.shape).map((k) => [k, params.get(k) ?? undefined])
	);
	const parsed = registerQuerySchema.safeParse(raw);
	if (parsed.success) return { query: parsed.data, errors: null };
	const errors = fieldErrors(parsed.error);
	for (const k of Object.keys(errors)) delete raw[k];
	return { query: registerQuerySchema.parse(raw), errors };
}

/** The URL search string for a query, leaving out defaults so shared links stay short. */
export function registerQueryString(query: Partial<RegisterQuery>): string {
	const p = new URLSearchParams();
	const defaults: Partial<Record<keyof RegisterQuery, unknown>> = {
		sort: 'code',
		dir: 'asc',
		page: 1,
		pageSize: DEFAULT_PAGE_SIZE
	};
	for (const key of Object.keys(registerQuerySchema.shape) as (keyof RegisterQuery)[]) {
		const v = query[key];
		if (v === undefined || v === null || v === '' || v === defaults[key]) continue;
		p.set(key, String(v));
	}
	const s = p.toString();
	return s ? `?${s}` : '';
}
