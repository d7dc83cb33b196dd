import Papa, { type ParseError } from 'papaparse';
import { z } from 'zod';
import { normaliseFixtureCode } from '$lib/domain/fixture-code';
import { fixtureFieldsSchema } from './fixture-form';

/*
 * The register's CSV format, one fixture per row. Export and import use the same columns, so an
 * exported file imports again (into a register that does not already hold those codes).
 * Parsing here is pure: the server resolves places by name and checks codes against the database.
 */

/** Columns in the order the export writes them. */
export const CSV_COLUMNS = [
	'code',
	'name',
	'type',
	'site',
	'area',
	'location',
	'status',
	'repeatability_spec_um',
	'rated_life_cycles',
	'ball_material',
	'seat_material',
	'ball_diameter_mm',
	'preload_n',
	'mass_kg',
	'commissioned_on',
	'notes'
] as const;
export type CsvColumn = (typeof CSV_COLUMNS)[number];

/** Columns an import file must have (the others may be left out, or left blank per row). */
export const REQUIRED_CSV_COLUMNS: readonly CsvColumn[] = [
	'name',
	'type',
	'site',
	'area',
	'location'
];

/**
 * Limits that keep one import a reviewable batch, not a database load. The byte limit stays under
 * adapter-node's default request body limit (512 KB), since the file is posted twice (check, import).
 */
export const MAX_IMPORT_ROWS = 2000;
export const MAX_IMPORT_BYTES = 400_000;

const FIELD_OF: Record<CsvColumn, string> = {
	code: 'code',
	name: 'name',
	type: 'type',
	site: 'site',
	area: 'area',
	location: 'location',
	status: 'status',
	repeatability_spec_um: 'repeatabilitySpec_um',
	rated_life_cycles: 'ratedLifeCycles',
	ball_material: 'ballMaterial',
	seat_material: 'seatMaterial',
	ball_diameter_mm: 'ballDiameter_mm',
	preload_n: 'preload_N',
	mass_kg: 'mass_kg',
	commissioned_on: 'commissionedOn',
	notes: 'notes'
};
const COLUMN_OF = Object.fromEntries(
	Object.entries(FIELD_OF).map(([col, field]) => [field, col])
) as Record<string, CsvColumn>;

const placeName = (what: string) =>
	z
		.string()
		.trim()
		.min(1, `Name the ${what}.`)
		.max(120, `A ${what} name can be at most 120 characters.`);

/** One CSV row after validation: the fixture's fields plus where it is, by name. */
export const csvRowSchema = fixtureFieldsSchema.extend({
	code: z.preprocess(
		(v) => (typeof v === 'string' && v.trim() === '' ? null : v),
		z
			.string()
			.transform((s, ctx) => {
				const r = normaliseFixtureCode(s);
				if (!r.ok) {
					ctx.addIssue({ code: 'custom', message: r.error });
					return z.NEVER;
				}
				return r.code;
			})
			.nullable()
	),
	site: placeName('site'),
	area: placeName('area'),
	location: placeName('location')
});
export type CsvRowValue = z.output<typeof csvRowSchema>;

export interface CsvRowError {
	/** The CSV column the message is about, or null for the row as a whole. */
	column: CsvColumn | null;
	message: string;
}

export interface ParsedCsvRow {
	/** Row number as a spreadsheet shows it (the header is row 1). */
	row: number;
	cells: Record<CsvColumn, string>;
	value: CsvRowValue | null;
	errors: CsvRowError[];
}

export interface ParsedCsv {
	/** Problems with the file as a whole; when present, no row is imported. */
	fileErrors: string[];
	rows: ParsedCsvRow[];
}

function normaliseHeader(h: string): string {
	return h
		.replace(/^\uFEFF/, '')
		.trim()
		.toLowerCase()
		.replace(/[\s-]+/g, '_');
}

/** Undoes the apostrophe the export puts before a cell that a spreadsheet would run as a formula. */
function unescapeFormula(cell: string): string {
	return /^'[=+\-@\t\r]/.test(cell) ? cell.slice(1) : cell;
}

/** The whole file refused with one message. */
const refused = (message: string): ParsedCsv => ({ fileErrors: [message], rows: [] });

/**
 * Problems with the header line. It is checked on its own, before the rows: Papa would quietly
 * rename a repeated column.
 */
function headerErrors(body: string): string[] {
	const errors: string[] = [];
	const headers = (Papa.parse<string[]>(body, { preview: 1 }).data[0] ?? []).map(normaliseHeader);
	const unknown = headers.filter(
		(h) => h !== '' && !(CSV_COLUMNS as readonly string[]).includes(h)
	);
	if (unknown.length) {
		errors.push(
			`Unknown column${unknown.length > 1 ? 's' : ''}: ${unknown.join(', ')}. The columns are: ${CSV_COLUMNS.join(', ')}.`
		);
	}
	const repeated = headers.filter((h, i) => h !== '' && headers.indexOf(h) !== i);
	if (repeated.length) errors.push(`Column given twice: ${[...new Set(repeated)].join(', ')}.`);
	const missing = REQUIRED_CSV_COLUMNS.filter((c) => !headers.includes(c));
	if (missing.length) {
		errors.push(
			`Missing column${missing.length > 1 ? 's' : ''}: ${missing.join(', ')}. The first line must name the columns.`
		);
	}
	return errors;
}

/** Problems with the number of rows: none, or more than one import may hold. */
function rowCountErrors(rows: number): string[] {
	if (rows === 0) return ['The file has a header line but no fixtures.'];
	if (rows > MAX_IMPORT_ROWS) {
		return [`The file has ${rows} rows; import at most ${MAX_IMPORT_ROWS} at a time.`];
	}
	return [];
}

/** Papa's complaints about a row's cells or quoting, in words, by 0-based data row. */
function shapeErrorsByRow(errors: ParseError[]): Map<number, string[]> {
	const byRow = new Map<number, string[]>();
	for (const e of errors) {
		if (e.code === 'UndetectableDelimiter' || e.row === undefined) continue;
		const msg =
			e.code === 'TooFewFields' || e.code === 'TooManyFields'
				? `This row has a different number of cells from the header (${e.message.replace(/^Too (few|many) fields: /, '')}).`
				: `The row's quoting is broken: ${e.message}.`;
		byRow.set(e.row, [...(byRow.get(e.row) ?? []), msg]);
	}
	return byRow;
}

/** One data row (0-based `i`) validated against the row schema, with its shape errors first. */
function parseRow(record: Record<string, string>, i: number, shapeErrors: string[]): ParsedCsvRow {
	const cells = Object.fromEntries(
		CSV_COLUMNS.map((c) => [c, unescapeFormula(String(record[c] ?? '').trim())])
	) as Record<CsvColumn, string>;
	const errors: CsvRowError[] = shapeErrors.map((message) => ({ column: null, message }));
	const input = Object.fromEntries(CSV_COLUMNS.map((c) => [FIELD_OF[c], cells[c]]));
	const result = csvRowSchema.safeParse(input);
	if (!result.success) {
		for (const issue of result.error.issues) {
			const field = issue.path.length ? String(issue.path[0]) : '';
			errors.push({ column: COLUMN_OF[field] ?? null, message: issue.message });
		}
	}
	return { row: i + 2, cells, value: result.success ? result.data : null, errors };
}

/** The same code twice in one file: every occurrence after the first is an error. */
function markRepeatedCodes(rows: ParsedCsvRow[]): void {
	const firstRowOfCode = new Map<string, number>();
	for (const r of rows) {
		const code = r.value?.code;
		if (!code) continue;
		const first = firstRowOfCode.get(code);
		if (first === undefined) firstRowOfCode.set(code, r.row);
		else
			r.errors.push({ column: 'code', message: `Code ${code} is already used in row ${first}.` });
	}
}

/** Parses and validates an import file; every row gets its own list of errors. */
export function parseFixtureCsv(text: string): ParsedCsv {
	if (new TextEncoder().encode(text).length > MAX_IMPORT_BYTES) {
		return refused(
			`The file is larger than ${MAX_IMPORT_BYTES / 1000} KB; split it into smaller files.`
		);
	}
	const body = text.replace(/^\uFEFF/, '');
	if (body.trim() === '') return refused('The file is empty.');
	const headerProblems = headerErrors(body);
	if (headerProblems.length) return { fileErrors: headerProblems, rows: [] };

	const parsed = Papa.parse<Record<string, string>>(body, {
		header: true,
		skipEmptyLines: 'greedy',
		transformHeader: normaliseHeader
	});
	const countProblems = rowCountErrors(parsed.data.length);
	if (countProblems.length) return { fileErrors: countProblems, rows: [] };

	const shapeErrors = shapeErrorsByRow(parsed.errors);
	const rows = parsed.data.map((record, i) => parseRow(record, i, shapeErrors.get(i) ?? []));
	markRepeatedCodes(rows);
	return { fileErrors: [], rows };
}

/** One fixture as the export writes it. */
export type CsvRecord = Record<CsvColumn, string | number | null>;

/** Writes the register as CSV, with a header line, CRLF line ends and formula-safe cells. */
export function toFixtureCsv(records: CsvRecord[]): string {
	const text = Papa.unparse(
		{
			fields: [...CSV_COLUMNS],
			data: records.map((r) => CSV_COLUMNS.map((c) => r[c] ?? ''))
		},
		{ newline: '\r\n', escapeFormulae: true }
	);
	// Papa ends the file with a line break only when it has no rows; always end with one.
	return text.endsWith('\r\n') ? text : `${text}\r\n`;
}
