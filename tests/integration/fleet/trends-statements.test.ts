import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fleetTrendsQuerySchema } from '$lib/schemas/fleet-trends';
import { getPool } from '$lib/server/db';
import { fleetTrends } from '$lib/server/fleet-trends';
import type { Actor } from '$lib/server/guard';
import { ingestBatch } from '$lib/server/ingest';
import {
	closeDb,
	db,
	freshFixtureCodes,
	makeArea,
	makeLocation,
	makeUser,
	resetDb,
	schema
} from '../helpers/db';

// The fleet charts read with a fixed number of statements, however many fixtures there are:
// every statement the pool runs during one request is counted, for 50 fixtures and for 500.

beforeAll(resetDb);
afterAll(closeDb);

let tech: Actor;
let supervisor: Actor;
const locations: number[] = [];

/** Adds `n` fixtures over the locations, each with one logged reseat (state row and flag). */
async function addFixtures(n: number) {
	const codes = await freshFixtureCodes(n);
	const rows = Array.from({ length: n }, (_, i) => ({
		code: codes[i],
		name: `Fleet fixture ${randomUUID().slice(0, 8)}`,
		type: 'three-vee' as const,
		locationId: locations[i % locations.length]
	}));
	await db.insert(schema.fixtures).values(rows);
	for (let i = 0; i < rows.length; i += 250) {
		const events = rows.slice(i, i + 250).map((f, j) => ({
			id: randomUUID(),
			fixtureCode: f.code,
			kind: 'reseat',
			occurredAt: new Date(Date.now() - (j + 1) * 60_000).toISOString(),
			payload: { cycles: 3, readings: { dx: 0.1 * (j % 5), dy: 0.05 } }
		}));
		const results = await ingestBatch(tech, 'phone-count', events);
		expect(results.every((r) => r.status === 'accepted')).toBe(true);
	}
}

/** Runs one fleetTrends request and returns how many statements the pool ran for it. */
async function statementsOf(query: Record<string, string> = {}): Promise<number> {
	const pool = getPool() as unknown as Record<'query' | 'execute', (...a: unknown[]) => unknown>;
	const original = { query: pool.query, execute: pool.execute };
	let count = 0;
	for (const name of ['query', 'execute'] as const) {
		pool[name] = (...args: unknown[]) => {
			count++;
			return original[name].apply(pool, args);
		};
	}
	try {
		const t = await fleetTrends(supervisor, fleetTrendsQuerySchema().parse(query));
		expect(t).not.toBeNull();
	} finally {
		pool.query = original.query;
		pool.execute = original.execute;
	}
	return count;
}

describe('statements per fleet-charts request', () => {
	beforeAll(async () => {
		tech = await makeUser({ roles: ['technician'] });
		supervisor = await makeUser({ roles: ['supervisor'] });
		for (let a = 0; a < 5; a++) {
			const area = await makeArea();
			locations.push((await makeLocation({ areaId: area.id })).id);
		}
	});

	it('is the same for 50 fixtures as for 500, with or without an area', async () => {
		await addFixtures(50);
		const [fifty, fiftyInArea] = [await statementsOf(), await statementsOf({ area: '1' })];
		await addFixtures(450);
		const [fiveHundred, inArea] = [await statementsOf(), await statementsOf({ area: '1' })];
		// Fleet, policies, areas, open flags, flag weeks, entries (see fleet-trends.ts).
		expect(fifty).toBe(6);
		expect(fiveHundred).toBe(fifty);
		expect(fiftyInArea).toBe(6);
		expect(inArea).toBe(fiftyInArea);
		const [[{ n }]] = (await getPool().query('SELECT COUNT(*) AS n FROM fixture_state')) as [
			{ n: number }[],
			unknown
		];
		expect(Number(n)).toBe(500);
	}, 120_000);
});
