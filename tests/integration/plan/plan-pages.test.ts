import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { activeTechnicians, plannedByFixture, plannedByFlag } from '$lib/server/plan-pages';
import { createWorkOrder, updateWorkOrder } from '$lib/server/work-orders';
import type { Actor } from '$lib/server/guard';
import { closeDb, makeFixture, makeFlag, makeUser, resetDb } from '../helpers/db';

// The reads behind the planner's pages: whom the assignee select offers, and the open orders the
// board, the register and the fixture page show beside flags.

beforeAll(resetDb);
afterAll(closeDb);

let planner: Actor;
const techEmail = 'zoe.tech@test.example';

beforeAll(async () => {
	planner = await makeUser({ roles: ['planner'] });
	await makeUser({ roles: ['technician'], name: 'Zoe Tech', email: techEmail });
	await makeUser({ roles: ['technician'], name: 'Adam Gone', active: false });
	await makeUser({ roles: ['operator'], name: 'Olga Operator' });
});

describe('activeTechnicians', () => {
	it('offers active technicians only, by name', async () => {
		const people = await activeTechnicians();
		expect(people.map((p) => p.name)).toContain('Zoe Tech');
		expect(people.map((p) => p.name)).not.toContain('Adam Gone');
		expect(people.map((p) => p.name)).not.toContain('Olga Operator');
		const names = people.map((p) => p.name);
		expect(names).toEqual([...names].sort((a, b) => a.localeCompare(b)));
	});
});

describe('planned orders beside flags', () => {
	it('labels a flag with its open order, and drops it once the order is cancelled', async () => {
		const fixture = await makeFixture();
		const flag = await makeFlag({ fixtureId: fixture.id, kind: 'replace-now' });
		const other = await makeFlag({ fixtureId: fixture.id, kind: 'cleaning-due' });
		expect(await plannedByFlag([])).toEqual({});
		expect(await plannedByFlag([flag.id])).toEqual({});

		const order = await createWorkOrder(planner, {
			fixtureCode: fixture.code,
			action: 'replace-balls',
			flagId: flag.id,
			dueOn: '2026-07-01',
			assigneeEmail: techEmail,
			parts: []
		});
		const byFlag = await plannedByFlag([flag.id, other.id]);
		expect(byFlag).toEqual({
			[flag.id]: {
				id: order.id,
				status: 'scheduled',
				dueOn: '2026-07-01',
				assigneeName: 'Zoe Tech'
			}
		});
		// The register shows one per fixture: the order due first.
		const later = await createWorkOrder(planner, {
			fixtureCode: fixture.code,
			action: 'clean',
			flagId: other.id,
			dueOn: '2026-08-01',
			parts: []
		});
		const byFixture = await plannedByFixture([fixture.id]);
		expect(byFixture[fixture.id]).toMatchObject({ id: order.id, dueOn: '2026-07-01' });

		await updateWorkOrder(planner, order.id, { status: 'cancelled', cancelReason: 'Not needed.' });
		expect(await plannedByFlag([flag.id])).toEqual({});
		expect((await plannedByFixture([fixture.id]))[fixture.id]).toMatchObject({
			id: later.id,
			status: 'planned',
			assigneeName: null
		});
	});
});
