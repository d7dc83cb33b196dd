import { z } from 'zod';
import { normaliseFixtureCode } from '$lib/domain/fixture-code';
import {
	LIMITS,
	PAPER_IDS,
	STOCK_IDS,
	type PaperId,
	type StockId
} from '$lib/labels/sheet-layouts';

/** Most labels one request renders (about 45 A4 sheets of the smallest size). */
export const MAX_LABELS = 3000;

/** What to print: named codes, a whole area, or the whole register. */
export type LabelSource = { codes: string[] } | { areaId: number } | { all: true };

/** A label job as `GET /api/labels.pdf` takes it. */
export interface LabelRequest {
	source: LabelSource;
	layout: StockId;
	paper: PaperId;
	margin?: number;
	gap?: number;
	startAt: number;
}

export type LabelRequestReading =
	{ ok: true; request: LabelRequest } | { ok: false; fields: Record<string, string[]> };

const mm = (what: string, max: number) =>
	z.coerce
		.number({ error: `Enter the ${what} in millimetres.` })
		.min(0, `The ${what} cannot be negative.`)
		.max(max, `The ${what} can be at most ${max} mm.`)
		.optional();

const settingsSchema = z.object({
	layout: z.enum(STOCK_IDS, { error: 'Choose Pin, Shim or Block.' }).default('shim'),
	paper: z.enum(PAPER_IDS, { error: 'Choose a4, letter or label.' }).default('a4'),
	margin: mm('margin', LIMITS.marginMax_mm),
	gap: mm('gap', LIMITS.gapMax_mm),
	startAt: z.coerce
		.number({ error: 'Enter the position of the first free label.' })
		.int('Enter a whole number for the first free position.')
		.min(1, 'Positions start at 1.')
		.default(1)
});

/** Splits a code list on commas or white space. */
export function splitCodes(text: string): string[] {
	return text
		.split(/[,\s]+/)
		.map((c) => c.trim())
		.filter(Boolean);
}

/** Reads and checks the query of a label request; messages are per parameter name. */
export function parseLabelParams(params: URLSearchParams): LabelRequestReading {
	const fields: Record<string, string[]> = {};
	const add = (k: string, m: string) => (fields[k] ??= []).push(m);
	// Blank form fields mean "not given", so the defaults apply.
	const get = (k: string) => params.get(k)?.trim() || undefined;

	const codesText = get('codes');
	const areaText = get('area');
	const all = get('all');
	const given = [codesText, areaText, all].filter((v) => v !== undefined).length;
	let source: LabelSource | undefined;
	if (given !== 1) {
		add(
			'codes',
			given === 0
				? 'Say what to print: codes=…, area=<id> or all=1.'
				: 'Give only one of codes, area or all.'
		);
	} else if (codesText !== undefined) {
		const codes: string[] = [];
		for (const raw of splitCodes(codesText)) {
			const r = normaliseFixtureCode(raw);
			if (r.ok) codes.push(r.code);
			else add('codes', `${raw}: ${r.error}`);
		}
		if (codes.length > MAX_LABELS) add('codes', `Print at most ${MAX_LABELS} labels at once.`);
		source = { codes };
	} else if (areaText !== undefined) {
		const id = Number(areaText);
		if (!Number.isInteger(id) || id < 1) add('area', 'The area must be an area id, like 3.');
		else source = { areaId: id };
	} else if (all !== '1') {
		add('all', 'Use all=1 to print the whole register.');
	} else {
		source = { all: true };
	}

	const settings = settingsSchema.safeParse({
		layout: get('layout'),
		paper: get('paper'),
		margin: get('margin'),
		gap: get('gap'),
		startAt: get('startAt')
	});
	if (!settings.success) {
		for (const [k, msgs] of Object.entries(z.flattenError(settings.error).fieldErrors)) {
			for (const m of msgs ?? []) add(k, m);
		}
	}
	if (Object.keys(fields).length || !source || !settings.success) return { ok: false, fields };
	return { ok: true, request: { source, ...settings.data } };
}

/** The query string of a label request (the inverse of parseLabelParams). */
export function labelParams(request: LabelRequest): URLSearchParams {
	const p = new URLSearchParams();
	const s = request.source;
	if ('codes' in s) p.set('codes', s.codes.join(','));
	else if ('areaId' in s) p.set('area', String(s.areaId));
	else p.set('all', '1');
	p.set('layout', request.layout);
	p.set('paper', request.paper);
	if (request.margin !== undefined) p.set('margin', String(request.margin));
	if (request.gap !== undefined) p.set('gap', String(request.gap));
	if (request.startAt !== 1) p.set('startAt', String(request.startAt));
	return p;
}
