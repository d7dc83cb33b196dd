import { and, asc, count, eq, inArray, ne, type SQL } from 'drizzle-orm';
import { db } from '../db';
import { areas, fixtures, locations, sites } from '../db/schema';
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
	return db
		.select({ code: fixtures.code, name: fixtures.name })
		.from(fixtures)
		.innerJoin(locations, eq(locations.id, fixtures.locationId))
		.innerJoin(areas, eq(areas.id, locations.areaId))
		.innerJoin(sites, eq(sites.id, areas.siteId))
		.where(where)
		.$dynamic();
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
