import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { calendarOrders, moveOnCalendar, openLoadRows } from '$lib/server/calendar';
import type { Actor } from '$lib/server/guard';
import { ForbiddenError } from '$lib/server/guard';
import {
	createWorkOrder,
	getWorkOrder,
	updateWorkOrder,
	WorkOrderError
} from '$lib/server/work-orders';
import { closeDb, makeFixture, makeUser, resetDb } from '../helpers/db';

// The calendar's move on the real test database: it goes through updateWorkOrder (history row,
// status), a stale page and a finished order are refused with a sentence, and the reads give
// the days' orders, the undated ones and the loads.

beforeAll(resetDb);
afterAll(closeDb);

let planner: Actor;
let tech: Actor;
let operator: Actor;

beforeAll(async () => {
	planner = await makeUser({ roles: ['planner'] });
	tech = await makeUser({ roles: ['technician'], name: 'Tilde Tech' });
	operator = await makeUser({ roles: ['operator'] });
});

async function order(dueOn?: string) {
	const f = await makeFixture();
	return createWorkOrder(planner, {
		fixtureCode: f.code,
		action: 'clean',
		dueOn,
		assigneeEmail: tech.email,
		parts: []
	});
}

async function refusal(p: Promise<unknown>): Promise<WorkOrderError> {
	const err = await p.then(
		() => null,
		(e: unknown) => e
	);
	expect(err).toBeInstanceOf(WorkOrderError);
	return err as WorkOrderError;
}

describe('moving an order on the calendar', () => {
	it('changes the due date through the work-order service, with one history row', async () => {
		const o = await order('2026-12-07');
		const moved = await moveOnCalendar(planner, {
			id: o.id,
			dueOn: '2026-12-15',
			from: '2026-12-07'
		});
		expect(moved.dueOn).toBe('2026-12-15');
		const full = await getWorkOrder(o.id);
		expect(full?.history.map((h) => h.what)).toEqual(['created', 'changed']);
		expect(full?.history[1].changes).toEqual({ dueOn: ['2026-12-07', '2026-12-15'] });
		expect(full?.history[1].byEmail).toBe(planner.email);
	});

	it('gives an undated order its first date, and it becomes scheduled', async () => {
		const o = await order();
		expect(o.status).toBe('planned');
		const moved = await moveOnCalendar(planner, { id: o.id, dueOn: '2026-12-09', from: '' });
		expect(moved).toMatchObject({ dueOn: '2026-12-09', status: 'scheduled' });
	});

	it('refuses a move from a stale page and leaves the order as it is', async () => {
		const o = await order('2026-12-07');
		// Someone else moved it meanwhile.
		await updateWorkOrder(planner, o.id, { dueOn: '2026-12-08', cancelReason: undefined });
		const e = await refusal(
			moveOnCalendar(planner, { id: o.id, dueOn: '2026-12-20', from: '2026-12-07' })
		);
		expect(e.status).toBe(409);
		expect(e.message).toContain('now due on 2026-12-08');
		expect((await getWorkOrder(o.id))?.dueOn).toBe('2026-12-08');
	});

	it('refuses done and cancelled orders with the reason, and unknown ones with 404', async () => {
		const o = await order('2026-12-07');
		await updateWorkOrder(planner, o.id, { status: 'cancelled', cancelReason: 'Not needed.' });
		const e = await refusal(moveOnCalendar(planner, { id: o.id, dueOn: '2026-12-10' }));
		expect(e.status).toBe(409);
		expect(e.message).toContain('Cancelled: a cancelled work order keeps its date.');
		expect(
			(await refusal(moveOnCalendar(planner, { id: 999_999, dueOn: '2026-12-10' }))).status
		).toBe(404);
	});

	it('is for planners only', async () => {
		const o = await order('2026-12-07');
		for (const who of [tech, operator])
			await expect(moveOnCalendar(who, { id: o.id, dueOn: '2026-12-10' })).rejects.toBeInstanceOf(
				ForbiddenError
			);
	});
});

describe('the calendar’s reads', () => {
	it('lists the days’ orders of every status, the undated open ones, and open loads', async () => {
		await resetDb();
		planner = await makeUser({ roles: ['planner'] });
		tech = await makeUser({ roles: ['technician'] });
		const a = await order('2027-03-01');
		const b = await order('2027-03-01');
		const c = await order('2027-03-02');
		const undated = await order();
		await order('2027-04-20');
		await updateWorkOrder(planner, c.id, { status: 'done', cancelReason: undefined });
		const range = { from: '2027-03-01', to: '2027-03-07' };
		const r = await calendarOrders({}, range, '2027-03-02');
		expect(r.dated.map((o) => o.id).sort()).toEqual([a.id, b.id, c.id].sort());
		expect(r.dated.find((o) => o.id === a.id)?.overdue).toBe(true);
		expect(r.dated.find((o) => o.id === c.id)?.overdue).toBe(false);
		expect(r.undated.map((o) => o.id)).toEqual([undated.id]);
		const loads = await openLoadRows(range);
		// The done order is not a load.
		expect(loads).toHaveLength(2);
		expect(loads.every((l) => l.assignee === tech.email && l.dueOn === '2027-03-01')).toBe(true);
	});
});
