import { and, asc, count, eq, inArray, ne, type SQL } from 'drizzle-orm';
import { db } from '../db';
import { withPlace } from '../db/place-join';
import { areas, fixtures, locations, sites } from '../db/schema';
import { normaliseFixtureCode } from '$lib/domain/fixture-code';
import { splitCodes } from '$lib/schemas/labels';
import type { LabelContent } from './pdf';

/*
 * Which fixtures a label job prints. Whole areas and the whole register leave retired fixtures
 * out (nobody labels a fixture that left service); codes named one by one are printed whatever
 * their status, because someone asked for exactly those.
 */

/** What to print: named codes, a whole area, or the whole register. */
export type LabelSelection = { codes: string[] } | { areaId: number } | { all: true };

/** An area with how many fixtures in it would get a label. */
export interface LabelArea {
	id: number;
	name: string;
	site: string;
	count: number;
}

const inService = ne(fixtures.status, 'retired');

function base(where: SQL | undefined) {
	return withPlace(
		db.select({ code: fixtures.code, name: fixtures.name }).from(fixtures).$dynamic()
	).where(where);
}

/** Labels for `codes` in the order given (repeats kept, for one label per coupling half). */
export async function labelsForCodes(
	codes: string[]
): Promise<{ labels: LabelContent[]; missing: string[] }> {
	const unique = [...new Set(codes)];
	const rows = unique.length ? await base(inArray(fixtures.code, unique)) : [];
	const byCode = new Map(rows.map((r) => [r.code, r]));
	return {
		labels: codes.flatMap((c) => (byCode.has(c) ? [byCode.get(c)!] : [])),
		missing: unique.filter((c) => !byCode.has(c))
	};
}

/** Labels for a whole area or the register, in walking order (site, area, location, code). */
export async function labelsFor(
	selection: { areaId: number } | { all: true },
	limit?: number
): Promise<LabelContent[]> {
	const where = 'areaId' in selection ? and(eq(areas.id, selection.areaId), inService) : inService;
	const q = base(where).orderBy(
		asc(sites.name),
		asc(areas.name),
		asc(locations.name),
		asc(fixtures.code)
	);
	return limit === undefined ? q : q.limit(limit);
}

/** How many labels a whole area or the register would print. */
export async function countLabels(selection: { areaId: number } | { all: true }): Promise<number> {
	const where = 'areaId' in selection ? and(eq(areas.id, selection.areaId), inService) : inService;
	const [row] = await db
		.select({ n: count() })
		.from(fixtures)
		.innerJoin(locations, eq(locations.id, fixtures.locationId))
		.innerJoin(areas, eq(areas.id, locations.areaId))
		.where(where);
	return Number(row.n);
}

/** Every area with the number of fixtures in service there, for the area picker. */
export async function labelAreas(): Promise<LabelArea[]> {
	const [areaRows, counts] = await Promise.all([
		db
			.select({ id: areas.id, name: areas.name, site: sites.name })
			.from(areas)
			.innerJoin(sites, eq(sites.id, areas.siteId))
			.orderBy(asc(sites.name), asc(areas.name)),
		db
			.select({ areaId: locations.areaId, n: count() })
			.from(fixtures)
			.innerJoin(locations, eq(locations.id, fixtures.locationId))
			.where(inService)
			.groupBy(locations.areaId)
	]);
	const byArea = new Map(counts.map((c) => [c.areaId, Number(c.n)]));
	return areaRows.map((a) => ({ ...a, count: byArea.get(a.id) ?? 0 }));
}

/** The fixtures a label request prints, or why it prints nothing (status, message, fields). */
export type LabelJob =
	| { ok: true; labels: LabelContent[]; what: string }
	| { ok: false; status: 400 | 404; error: string; fields?: Record<string, string[]> };

/**
 * Picks the labels of a request: named codes must all be in the register; an area or the whole
 * register must hold at least one fixture in service and at most `max`. `what` names the job for
 * the file name: the code, "<n>-fixtures", the area's name or "register".
 */
export async function labelJob(selection: LabelSelection, max: number): Promise<LabelJob> {
	if ('codes' in selection) {
		const found = await labelsForCodes(selection.codes);
		if (found.missing.length) {
			return {
				ok: false,
				status: 404,
				error: `No fixture with code ${found.missing.join(', ')} in the register.`,
				fields: { codes: found.missing.map((c) => `${c} is not in the register.`) }
			};
		}
		const { labels } = found;
		return {
			ok: true,
			labels,
			what: labels.length === 1 ? labels[0].code : `${labels.length}-fixtures`
		};
	}
	let what = 'register';
	if ('areaId' in selection) {
		const area = (await labelAreas()).find((a) => a.id === selection.areaId);
		if (!area) return { ok: false, status: 404, error: `No area with id ${selection.areaId}.` };
		what = area.name;
	}
	// One more than allowed is enough to know the job is too big.
	const labels = await labelsFor(selection, max + 1);
	if (labels.length > max) {
		const field = 'areaId' in selection ? 'area' : 'all';
		return {
			ok: false,
			status: 400,
			error: 'Check the label settings.',
			fields: { [field]: [`That is more than ${max} labels; print one area at a time.`] }
		};
	}
	if (labels.length === 0) {
		return { ok: false, status: 404, error: `There are no fixtures in service in ${what}.` };
	}
	return { ok: true, labels, what };
}

/** A file name that says what is inside: what, size and paper. */
export function labelFileName(what: string, layout: string, paper: string): string {
	const safe = what.replace(/[^A-Za-z0-9-]+/g, '-').replace(/^-+|-+$/g, '') || 'labels';
	return `nestmark-labels-${safe}-${layout}-${paper}.pdf`;
}

/** What the Labels page is printing, from its query (?codes=… | ?area=<id> | ?all=1). */
export type LabelPageSelection =
	| { kind: 'none' }
	| { kind: 'codes'; codes: string[]; invalid: string[]; missing: string[] }
	| { kind: 'area'; areaId: number }
	| { kind: 'all' };

/** The Labels page's picture of a query: the areas, the selection, how many and the first few. */
export interface LabelPreview {
	areas: LabelArea[];
	total: number;
	selection: LabelPageSelection;
	count: number;
	preview: LabelContent[];
}

/**
 * Reads the Labels page's query and finds what it would print: codes that cannot be codes and
 * codes not in the register are listed (the page leaves them out and says so), an unknown area
 * selects nothing. At most `previewMax` labels come back.
 */
export async function labelPreview(q: URLSearchParams, previewMax: number): Promise<LabelPreview> {
	const areas = await labelAreas();
	const total = areas.reduce((sum, a) => sum + a.count, 0);

	let selection: LabelPageSelection = { kind: 'none' };
	let labels: LabelContent[] = [];
	let count = 0;
	const codesText = q.get('codes');
	const areaId = Number(q.get('area'));
	if (codesText !== null) {
		const codes: string[] = [];
		const invalid: string[] = [];
		for (const raw of splitCodes(codesText)) {
			const r = normaliseFixtureCode(raw);
			if (r.ok) codes.push(r.code);
			else invalid.push(`${raw}: ${r.error}`);
		}
		const found = await labelsForCodes(codes);
		selection = { kind: 'codes', codes, invalid, missing: found.missing };
		labels = found.labels;
		count = labels.length;
	} else if (Number.isInteger(areaId) && areas.some((a) => a.id === areaId)) {
		selection = { kind: 'area', areaId };
		[labels, count] = await Promise.all([
			labelsFor({ areaId }, previewMax),
			countLabels({ areaId })
		]);
	} else if (q.get('all') === '1') {
		selection = { kind: 'all' };
		labels = await labelsFor({ all: true }, previewMax);
		count = total;
	}
	return { areas, total, selection, count, preview: labels.slice(0, previewMax) };
}
