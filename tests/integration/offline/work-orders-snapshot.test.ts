import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { registerSnapshotSchema } from '$lib/schemas/register-snapshot';
import type { Actor } from '$lib/server/guard';
import { GET } from '../../../src/routes/api/register-snapshot/+server';
import { closeDb, db, makeFixture, makeFlag, makeUser, resetDb, schema } from '../helpers/db';

// The register copy carries the person's own open work orders (for /work offline) and, per
// flag, the open order that answers it (the card's "planned for DATE · ASSIGNEE").

beforeAll(resetDb);
afterAll(closeDb);

function get(user: Actor, query = '', headers: Record<string, string> = {}) {
	const request = new Request(`http://127.0.0.1/api/register-snapshot${query}`, { headers });
	const event = { locals: { user }, request, params: {}, url: new URL(request.url) };
	return GET(event as never);
}

describe('work orders in the register copy', () => {
	let tech: Actor;
	let other: Actor;
	let fixture: Awaited<ReturnType<typeof makeFixture>>;
	let mine: number;
	let flagId: number;

	beforeAll(async () => {
		tech = await makeUser({ roles: ['technician'], name: 'Ada Tech' });
		other = await makeUser({ roles: ['technician'] });
		fixture = await makeFixture({ name: 'Vee block 4' });
		flagId = (await makeFlag({ fixtureId: fixture.id, kind: 'replace-now', reason: 'Worn seats' }))
			.id;
		const order = (values: Partial<typeof schema.workOrders.$inferInsert>) =>
			db
				.insert(schema.workOrders)
				.values({ fixtureId: fixture.id, action: 'replace-balls', parts: [], ...values })
				.$returningId()
				.then(([r]) => r.id);
		mine = await order({
			status: 'scheduled',
			dueOn: '2026-03-02',
			assigneeId: tech.id,
			parts: [{ description: 'Ball, 12 mm', quantity: 3, material: 'Si3N4' }],
			notes: 'Bring the torque wrench'
		});
		await order({ status: 'underway', dueOn: '2026-03-01', assigneeId: other.id });
		await order({ status: 'done', dueOn: '2026-02-01', assigneeId: tech.id });
		await order({ status: 'planned', assigneeId: tech.id, action: 'other', actionText: 'Label' });
		await db.insert(schema.workOrderFlags).values({ workOrderId: mine, flagId });
	});

	it("lists the person's own open orders by due date, with parts, notes and flag reasons", async () => {
		const res = await get(tech);
		expect(res.status).toBe(200);
		const body = registerSnapshotSchema.parse(await res.json());
		expect(body.workOrdersFor).toBe(tech.id);
		expect(body.workOrders!.map((o) => [o.status, o.dueOn, o.action])).toEqual([
			['scheduled', '2026-03-02', 'replace-balls'],
			['planned', null, 'other']
		]);
		expect(body.workOrders![0]).toMatchObject({
			id: mine,
			fixtureCode: fixture.code,
			fixtureName: 'Vee block 4',
			parts: [{ description: 'Ball, 12 mm', quantity: 3, material: 'Si3N4' }],
			notes: 'Bring the torque wrench',
			flagReasons: ['Worn seats']
		});
		expect(body.workOrders![1].actionText).toBe('Label');
	});

	it('names the planned work next to the flag it answers', async () => {
		const body = registerSnapshotSchema.parse(await (await get(other)).json());
		const f = body.fixtures.find((x) => x.code === fixture.code)!;
		expect(f.flags[0].plannedWork).toEqual({
			workOrderId: mine,
			dueOn: '2026-03-02',
			assignee: 'Ada Tech'
		});
		// Someone else's copy carries only their own orders.
		expect(body.workOrders!.map((o) => o.status)).toEqual(['underway']);
	});

	it('changes its ETag when an order changes, and leaves orders out of a one-fixture answer', async () => {
		const first = await get(tech);
		const etag = first.headers.get('ETag')!;
		expect((await get(tech, '', { 'If-None-Match': etag })).status).toBe(304);
		await db
			.update(schema.workOrders)
			.set({ notes: 'Bring two wrenches' })
			.where(eq(schema.workOrders.id, mine));
		expect((await get(tech, '', { 'If-None-Match': etag })).status).toBe(200);
		const one = await (await get(tech, `?code=${fixture.code}`)).json();
		expect(one.workOrders).toBeUndefined();
	});

	it('still reads a copy from before work orders', () => {
		const old = { version: 'x', generatedAt: new Date().toISOString(), fixtures: [] };
		expect(registerSnapshotSchema.parse(old).workOrders).toBeUndefined();
	});
});
