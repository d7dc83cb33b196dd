import { randomUUID } from 'node:crypto';
import type { RowDataPacket } from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getPool } from '$lib/server/db';
import type { Actor } from '$lib/server/guard';
import { ingestBatch } from '$lib/server/ingest';
import { GET as getSummary } from '../../../src/routes/api/fleet/summary/+server';
import {
	closeDb,
	db,
	freshFixtureCodes,
	makeLocation,
	makeUser,
	resetDb,
	schema
} from '../helpers/db';
import { countStatements } from '../helpers/statements';

// The board must cost the same number of SQL statements for 50 fixtures as for 500. Counted two
// ways (helpers/statements.ts): every statement the app's pool sends, and the server's own count
// of statements received (Questions, on this quiet test database).

beforeAll(resetDb);
afterAll(closeDb);

let tech: Actor;
let boss: Actor;
let locationId: number;

/** Adds fixtures until there are `total`: each gets a first reseat (break-in due), some geometry. */
async function growTo(total: number) {
	const [[{ n }]] = await getPool().query<RowDataPacket[]>('SELECT COUNT(*) AS n FROM fixtures');
	const add = total - Number(n);
	const codes = await freshFixtureCodes(add);
	const rows = Array.from({ length: add }, (_, i) => ({
		code: codes[i],
		name: `Counted fixture ${Number(n) + i + 1}`,
		type: (i % 3 ? 'three-vee' : 'pallet') as 'three-vee' | 'pallet',
		locationId
	}));
	await db.insert(schema.fixtures).values(rows);
	for (let i = 0; i < rows.length; i += 100) {
		const events = rows.slice(i, i + 100).map((r, j) => ({
			id: randomUUID(),
			fixtureCode: r.code,
			kind: 'reseat',
			occurredAt: new Date(Date.now() - (i + j + 1) * 60_000).toISOString(),
			payload: {}
		}));
		const results = await ingestBatch(tech, 'phone-1', events);
		expect(results.every((r) => r.status === 'accepted')).toBe(true);
	}
	// Every fifth fixture has a saved geometry, some of it not exactly constrained.
	const [ids] = await getPool().query<RowDataPacket[]>(
		'SELECT id FROM fixtures WHERE id > ? AND MOD(id, 5) = 0',
		[Number(n)]
	);
	if (ids.length) {
		await db.insert(schema.couplingGeometries).values(
			ids.map((r, i) => ({
				fixtureId: Number(r.id),
				version: 1,
				kind: 'table',
				contacts: [],
				constraintStatus: i % 2 ? 'exact' : 'under'
			}))
		);
	}
}

/** Statements one board request sends: counted at the pool and at the server. */
async function countBoard() {
	const { pool, server, result } = await countStatements(async () => {
		const url = new URL('http://127.0.0.1/api/fleet/summary');
		const res = await getSummary({
			locals: { user: boss },
			url,
			request: new Request(url)
		} as never);
		expect(res.status).toBe(200);
		return (await res.json()) as { attention: { rows: unknown[]; total: number } };
	});
	return { pool, server, rows: result.attention.rows.length, total: result.attention.total };
}

describe('statements per board request', () => {
	beforeAll(async () => {
		tech = await makeUser({ roles: ['technician'] });
		boss = await makeUser({ roles: ['supervisor'] });
		locationId = (await makeLocation()).id;
	});

	it('are as many for 500 fixtures as for 50', async () => {
		await growTo(50);
		const small = await countBoard();
		await growTo(500);
		const large = await countBoard();
		expect(small).toMatchObject({ rows: 50, total: 50 });
		// A page of 100 rows, of all 500.
		expect(large).toMatchObject({ rows: 100, total: 500 });
		expect(small.pool).toBeGreaterThan(0);
		expect(large.pool).toBe(small.pool);
		expect(large.server).toBe(small.server);
		// Nothing slipped past the wrapped pool (a connection of its own, say).
		expect(small.server).toBe(small.pool);
	});

	it('pages through every fixture with an open flag, each once', async () => {
		const { fleetSummary } = await import('$lib/server/fleet');
		const seen: string[] = [];
		for (let page = 1; page <= 5; page++) {
			const s = await fleetSummary(boss, { page });
			expect(s.attention).toMatchObject({ total: 500, page, pageSize: 100 });
			seen.push(...s.attention.rows.map((r) => r.code));
		}
		expect(new Set(seen).size).toBe(500);
		const past = await fleetSummary(boss, { page: 6 });
		expect(past.attention).toMatchObject({ total: 500, rows: [] });
	});
});
