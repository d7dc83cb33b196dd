import type { RowDataPacket } from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getPool } from '$lib/server/db';
import type { Actor } from '$lib/server/guard';
import { GET as getList } from '../../../src/routes/api/work-orders/+server';
import { closeDb, db, makeFixture, makeFlag, makeUser, resetDb, schema } from '../helpers/db';
import { countStatements } from '../helpers/statements';

// The planner's list must cost the same number of SQL statements for 50 orders as for 5, counted
// at the app's pool and by the server (helpers/statements.ts).

beforeAll(resetDb);
afterAll(closeDb);

let planner: Actor;
let tech: Actor;
let fixtureIds: number[] = [];

/** Adds orders (each with a flag, an assignee, a part line) until there are `total`. */
async function growTo(total: number) {
	const [[{ n }]] = await getPool().query<RowDataPacket[]>('SELECT COUNT(*) AS n FROM work_orders');
	for (let i = Number(n); i < total; i++) {
		const fixtureId = fixtureIds[i % fixtureIds.length];
		const flag = await makeFlag({ fixtureId, kind: 'inspection-due' });
		const [{ id }] = await db
			.insert(schema.workOrders)
			.values({
				fixtureId,
				action: 'inspect',
				status: i % 4 ? 'scheduled' : 'planned',
				dueOn: i % 4 ? `2026-06-${String((i % 28) + 1).padStart(2, '0')}` : null,
				assigneeId: i % 4 ? tech.id : null,
				parts: [{ description: 'Seat insert', quantity: 1 }],
				createdBy: planner.id
			})
			.$returningId();
		await db.insert(schema.workOrderFlags).values({ workOrderId: id, flagId: flag.id });
	}
}

/** Statements one list request sends, and the number of orders it lists. */
async function countList() {
	const { pool, server, result } = await countStatements(async () => {
		const url = new URL('http://127.0.0.1/api/work-orders');
		const res = await getList({
			locals: { user: planner },
			url,
			request: new Request(url)
		} as never);
		expect(res.status).toBe(200);
		return (await res.json()) as { items: { flags: unknown[] }[] };
	});
	return { pool, server, items: result.items.length, body: result };
}

describe('statements per list request', () => {
	beforeAll(async () => {
		planner = await makeUser({ roles: ['planner'] });
		tech = await makeUser({ roles: ['technician'] });
		fixtureIds = [];
		for (let i = 0; i < 5; i++) fixtureIds.push((await makeFixture()).id);
	});

	it('are as many for 50 orders as for 5', async () => {
		await growTo(5);
		const small = await countList();
		await growTo(50);
		const large = await countList();
		expect(small.items).toBe(5);
		expect(large.items).toBe(50);
		expect(large.body.items.every((o) => o.flags.length === 1)).toBe(true);
		expect(small.pool).toBeGreaterThan(0);
		expect(large.pool).toBe(small.pool);
		expect(large.server).toBe(small.server);
		expect(small.server).toBe(small.pool);
	});
});
