import { randomUUID } from 'node:crypto';
import mysql from 'mysql2/promise';
import { generateFixtureCode } from '../../../src/lib/domain/fixture-code';
import type { FixtureStatus } from '../../../src/lib/schemas/fixture';

/** A fixture a test made for itself. */
export interface TestFixture {
	code: string;
	name: string;
	status: FixtureStatus;
}

/**
 * Writes a site, one area with one location, and `fixtures` into the test database (names made
 * unique per call), so a spec does not depend on the demo data. Returns the area id and codes.
 */
export async function insertArea(
	label: string,
	fixtures: { name: string; status?: FixtureStatus }[]
): Promise<{ areaId: number; areaName: string; fixtures: TestFixture[] }> {
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		const tag = randomUUID().slice(0, 8);
		const areaName = `${label} ${tag}`;
		const [site] = await conn.query<mysql.ResultSetHeader>(
			'INSERT INTO sites (name, created_at) VALUES (?, NOW(3))',
			[`${label} site ${tag}`]
		);
		const [area] = await conn.query<mysql.ResultSetHeader>(
			'INSERT INTO areas (site_id, name, created_at) VALUES (?, ?, NOW(3))',
			[site.insertId, areaName]
		);
		const [location] = await conn.query<mysql.ResultSetHeader>(
			'INSERT INTO locations (area_id, name, created_at) VALUES (?, ?, NOW(3))',
			[area.insertId, 'Bench 1']
		);
		const made: TestFixture[] = [];
		for (const f of fixtures) {
			const code = await unusedCode(conn);
			const status = f.status ?? 'in-service';
			await conn.query(
				`INSERT INTO fixtures (code, name, type, status, location_id, created_at, updated_at)
				 VALUES (?, ?, 'three-vee', ?, ?, NOW(3), NOW(3))`,
				[code, f.name, status, location.insertId]
			);
			made.push({ code, name: f.name, status });
		}
		return { areaId: area.insertId, areaName, fixtures: made };
	} finally {
		await conn.end();
	}
}

/** A valid fixture code that no fixture in the test database has. */
export async function unusedCode(conn?: mysql.Connection): Promise<string> {
	const c = conn ?? (await mysql.createConnection({ uri: process.env.DATABASE_URL! }));
	try {
		for (;;) {
			const code = generateFixtureCode();
			const [taken] = await c.query<mysql.RowDataPacket[]>(
				'SELECT 1 FROM fixtures WHERE code = ?',
				[code]
			);
			if (!taken.length) return code;
		}
	} finally {
		if (!conn) await c.end();
	}
}
