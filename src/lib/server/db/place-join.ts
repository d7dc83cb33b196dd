import { eq } from 'drizzle-orm';
import type { MySqlSelect } from 'drizzle-orm/mysql-core';
import { areas, fixtures, locations, sites } from './schema';

/**
 * Joins a select from fixtures to their location, area and site (inner joins: every fixture has
 * a location, every location an area, every area a site):
 * `withPlace(db.select(cols).from(fixtures).$dynamic())`. The one place the server spells
 * this chain. Drizzle's relational queries (`db.query…findMany({ with })`) cannot, on MariaDB
 * 10.11: in the default mode they use LEFT JOIN LATERAL (a syntax error there, 1064), in
 * 'planetscale' mode correlated subqueries inside derived tables ("Unknown column
 * 'fixtures.location_id' in 'WHERE'", 1054).
 */
export function withPlace<T extends MySqlSelect>(qb: T): T {
	return qb
		.innerJoin(locations, eq(locations.id, fixtures.locationId))
		.innerJoin(areas, eq(areas.id, locations.areaId))
		.innerJoin(sites, eq(sites.id, areas.siteId)) as unknown as T;
}
