import { asc, eq } from 'drizzle-orm';
import { z } from 'zod';
import { db, type Db } from './db';
import { areas, locations, sites } from './db/schema';
import { assertCan, type Actor } from './guard';
import type { LocationPath, SiteNode } from '../schemas/places-views';

export type { LocationPath, SiteNode };

/*
 * Sites, areas and locations: where fixtures live. Names are unique within their parent
 * (sites globally), so a place can be named by its path, as the CSV import does.
 */

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

const placeNameSchema = z
	.string({ error: 'Enter a name.' })
	.trim()
	.min(1, 'Enter a name.')
	.max(120, 'Keep the name under 120 characters.');

/** Every location with its path, ordered site → area → location. */
export async function allLocationPaths(q: Db | Tx = db): Promise<LocationPath[]> {
	return q
		.select({
			siteId: sites.id,
			site: sites.name,
			areaId: areas.id,
			area: areas.name,
			locationId: locations.id,
			location: locations.name
		})
		.from(locations)
		.innerJoin(areas, eq(areas.id, locations.areaId))
		.innerJoin(sites, eq(sites.id, areas.siteId))
		.orderBy(asc(sites.name), asc(areas.name), asc(locations.name));
}

/** The place tree (sites without areas and areas without locations included). */
export async function tree(): Promise<SiteNode[]> {
	const [siteRows, areaRows, locationRows] = await Promise.all([
		db.select({ id: sites.id, name: sites.name }).from(sites).orderBy(asc(sites.name)),
		db
			.select({ id: areas.id, siteId: areas.siteId, name: areas.name })
			.from(areas)
			.orderBy(asc(areas.name)),
		db
			.select({ id: locations.id, areaId: locations.areaId, name: locations.name })
			.from(locations)
			.orderBy(asc(locations.name))
	]);
	return siteRows.map((s) => ({
		...s,
		areas: areaRows
			.filter((a) => a.siteId === s.id)
			.map((a) => ({
				id: a.id,
				name: a.name,
				locations: locationRows
					.filter((l) => l.areaId === a.id)
					.map((l) => ({ id: l.id, name: l.name }))
			}))
	}));
}

/** The path of one location, or null when it does not exist. */
export async function locationPath(
	locationId: number,
	q: Db | Tx = db
): Promise<LocationPath | null> {
	const [row] = await q
		.select({
			siteId: sites.id,
			site: sites.name,
			areaId: areas.id,
			area: areas.name,
			locationId: locations.id,
			location: locations.name
		})
		.from(locations)
		.innerJoin(areas, eq(areas.id, locations.areaId))
		.innerJoin(sites, eq(sites.id, areas.siteId))
		.where(eq(locations.id, locationId))
		.limit(1);
	return row ?? null;
}

/** How names are compared when a person types them: case, outer and repeated spaces ignored. */
export function nameKey(name: string): string {
	return name.trim().replace(/\s+/g, ' ').toLocaleLowerCase('en');
}

/**
 * Resolves places by name for the CSV import. Each lookup says which level is unknown, so the
 * import can name the cell to fix. Nothing is created.
 */
export async function placeResolver(q: Db | Tx = db) {
	const paths = await allLocationPaths(q);
	const siteNames = new Map<string, string>();
	const areaNames = new Map<string, string>();
	const byPath = new Map<string, LocationPath>();
	for (const p of paths) {
		siteNames.set(nameKey(p.site), p.site);
		areaNames.set(`${nameKey(p.site)}\u0000${nameKey(p.area)}`, p.area);
		byPath.set([p.site, p.area, p.location].map(nameKey).join('\u0000'), p);
	}
	// Sites and areas that have no locations yet still count as known names.
	for (const s of await q.select({ name: sites.name }).from(sites)) {
		siteNames.set(nameKey(s.name), s.name);
	}
	const areaRows = await q
		.select({ site: sites.name, area: areas.name })
		.from(areas)
		.innerJoin(sites, eq(sites.id, areas.siteId));
	for (const a of areaRows) areaNames.set(`${nameKey(a.site)}\u0000${nameKey(a.area)}`, a.area);

	return (
		site: string,
		area: string,
		location: string
	):
		| { ok: true; path: LocationPath }
		| { ok: false; column: 'site' | 'area' | 'location'; message: string } => {
		const found = byPath.get([site, area, location].map(nameKey).join('\u0000'));
		if (found) return { ok: true, path: found };
		const siteName = siteNames.get(nameKey(site));
		if (!siteName) {
			return { ok: false, column: 'site', message: `There is no site named "${site}".` };
		}
		const areaName = areaNames.get(`${nameKey(site)}\u0000${nameKey(area)}`);
		if (!areaName) {
			return { ok: false, column: 'area', message: `${siteName} has no area named "${area}".` };
		}
		return {
			ok: false,
			column: 'location',
			message: `${siteName} / ${areaName} has no location named "${location}".`
		};
	};
}

/** The site named `name`, created if missing (admin). */
export async function ensureSite(actor: Actor, name: string, timezone = 'UTC'): Promise<number> {
	assertCan(actor, 'place.edit');
	const clean = placeNameSchema.parse(name);
	const [found] = await db.select({ id: sites.id }).from(sites).where(eq(sites.name, clean));
	if (found) return found.id;
	const [res] = await db.insert(sites).values({ name: clean, timezone }).$returningId();
	return res.id;
}

/** The area named `name` in a site, created if missing (admin). */
export async function ensureArea(actor: Actor, siteId: number, name: string): Promise<number> {
	assertCan(actor, 'place.edit');
	const clean = placeNameSchema.parse(name);
	const existing = await db
		.select({ id: areas.id, name: areas.name })
		.from(areas)
		.where(eq(areas.siteId, siteId));
	const same = existing.find((a) => nameKey(a.name) === nameKey(clean));
	if (same) return same.id;
	const [res] = await db.insert(areas).values({ siteId, name: clean }).$returningId();
	return res.id;
}

/** The location named `name` in an area, created if missing (admin). */
export async function ensureLocation(actor: Actor, areaId: number, name: string): Promise<number> {
	assertCan(actor, 'place.edit');
	const clean = placeNameSchema.parse(name);
	const existing = await db
		.select({ id: locations.id, name: locations.name })
		.from(locations)
		.where(eq(locations.areaId, areaId));
	const same = existing.find((l) => nameKey(l.name) === nameKey(clean));
	if (same) return same.id;
	const [res] = await db.insert(locations).values({ areaId, name: clean }).$returningId();
	return res.id;
}
