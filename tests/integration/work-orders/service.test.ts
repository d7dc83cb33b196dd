import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FLAG_KINDS, type FlagKind } from '$lib/domain/flag-kinds';
import { workOrderPatchSchema } from '$lib/schemas/work-orders';
import type { Actor } from '$lib/server/guard';
import {
	bulkAssign,
	bulkReschedule,
	createFromFlag,
	createWorkOrder,
	draftFromFlag,
	getWorkOrder,
	listWorkOrders,
	openFlagsWithoutOrder,
	openOrdersByFixture,
	openOrdersByFlag,
	updateWorkOrder,
	WorkOrderError
} from '$lib/server/work-orders';
import { closeDb, db, makeFixture, makeFlag, makeUser, resetDb, schema } from '../helpers/db';

// The work-order services on the real test database: what a flag turns into, the moves between
// statuses, the history each change leaves, and the bulk changes.

beforeAll(resetDb);
afterAll(closeDb);

const TODAY = '2026-06-10';
let planner: Actor;
let tech: Actor;
let tech2: Actor;
let operator: Actor;

/** The error a promise is refused with. */
async function refusal(p: Promise<unknown>): Promise<WorkOrderError> {
	const err = await p.then(
		() => null,
		(e: unknown) => e
	);
	expect(err).toBeInstanceOf(WorkOrderError);
	return err as WorkOrderError;
}

const patch = (v: unknown) => workOrderPatchSchema.parse(v);

beforeAll(async () => {
	planner = await makeUser({ roles: ['planner'] });
	tech = await makeUser({ roles: ['technician'], name: 'Tess Tech' });
	tech2 = await makeUser({ roles: ['technician'] });
	operator = await makeUser({ roles: ['operator'] });
});

describe('an order made from a flag', () => {
	// Actions: issue 12 §1; due dates: today for "replace now", else the planning horizon
	// (DEFAULT_POLICY.planningHorizonDays = 14, or the policy row's own figure).
	const EXPECTED: Record<FlagKind, { action: string; dueOn: string }> = {
		'replace-now': { action: 'replace-balls', dueOn: TODAY },
		'replace-soon': { action: 'replace-balls', dueOn: '2026-06-24' },
		'break-in-due': { action: 're-break-in', dueOn: '2026-06-24' },
		'inspection-due': { action: 'inspect', dueOn: '2026-06-24' },
		'cleaning-due': { action: 'clean', dueOn: '2026-06-24' },
		drift: { action: 'inspect', dueOn: '2026-06-24' },
		'out-of-spec': { action: 'inspect', dueOn: '2026-06-24' }
	};

	for (const kind of FLAG_KINDS) {
		it(`${kind} → ${EXPECTED[kind].action}, due ${EXPECTED[kind].dueOn}`, async () => {
			const f = await makeFixture({ ballMaterial: 'Silicon nitride', ballDiameter_mm: 12 });
			const flag = await makeFlag({ fixtureId: f.id, kind, reason: `Reason for ${kind}` });
			const order = await createFromFlag(planner, flag.id, { assigneeEmail: tech.email }, TODAY);
			expect(order).toMatchObject({
				fixtureCode: f.code,
				action: EXPECTED[kind].action,
				dueOn: EXPECTED[kind].dueOn,
				status: 'scheduled',
				assigneeEmail: tech.email,
				assigneeName: 'Tess Tech',
				flags: [{ id: flag.id, kind, open: true }]
			});
			expect(order.notes).toContain(`Reason for ${kind}`);
			if (kind === 'replace-now' || kind === 'replace-soon') {
				expect(order.notes).toMatch(/balls and the seats together/);
				expect(order.parts).toEqual([
					{
						description: 'Balls, one set',
						quantity: 1,
						size: 'Ø 12 mm',
						material: 'Silicon nitride'
					},
					{ description: 'Seats or vee inserts, one set', quantity: 1 }
				]);
			} else expect(order.parts).toEqual([]);
		});
	}

	it('takes the due date from the fixture policy’s planning horizon', async () => {
		const [p] = await db
			.insert(schema.policies)
			.values({
				name: 'Short horizon',
				repeatabilitySpec_um: 1,
				repeatabilityWindow: 10,
				breakInMinCycles: 30,
				settleWindow: 10,
				settleTolerance_um: 0.2,
				wearLimitGrade: 3,
				forecastHorizonCycles: 2000,
				planningHorizonDays: 3
			})
			.$returningId();
		const f = await makeFixture({ policyId: p.id });
		const flag = await makeFlag({ fixtureId: f.id, kind: 'inspection-due' });
		expect((await draftFromFlag(flag.id, TODAY)).dueOn).toBe('2026-06-13');
	});

	it('is refused for a closed flag, a flag with an open order, an unknown flag', async () => {
		const f = await makeFixture();
		const closed = await makeFlag({ fixtureId: f.id, clearedAt: new Date() });
		expect((await refusal(createFromFlag(planner, closed.id, {}, TODAY))).status).toBe(409);
		const open = await makeFlag({ fixtureId: f.id });
		const first = await createFromFlag(planner, open.id, {}, TODAY);
		const again = await refusal(createFromFlag(planner, open.id, {}, TODAY));
		expect(again.status).toBe(409);
		expect(again.message).toContain(`#${first.id}`);
		expect((await refusal(createFromFlag(planner, 999_999, {}, TODAY))).status).toBe(404);
	});

	it('is made once when two planners make it at the same time', async () => {
		const f = await makeFixture();
		const flag = await makeFlag({ fixtureId: f.id });
		const results = await Promise.allSettled([
			createFromFlag(planner, flag.id, {}, TODAY),
			createFromFlag(planner, flag.id, {}, TODAY)
		]);
		expect(results.filter((r) => r.status === 'fulfilled')).toHaveLength(1);
		expect((await openOrdersByFlag([flag.id])).get(flag.id)).toBeDefined();
	});
});

describe('an order made by hand', () => {
	it('is planned without a date or an assignee, scheduled with both', async () => {
		const f = await makeFixture();
		const a = await createWorkOrder(planner, { fixtureCode: f.code, action: 'inspect' });
		expect(a.status).toBe('planned');
		const b = await createWorkOrder(planner, {
			fixtureCode: f.code,
			action: 'other',
			actionText: 'Re-torque the clamp bolts',
			dueOn: TODAY,
			assigneeEmail: tech.email,
			parts: [{ description: 'Clamp bolt M8', quantity: 4 }]
		});
		expect(b).toMatchObject({ status: 'scheduled', actionText: 'Re-torque the clamp bolts' });
		const h = (await getWorkOrder(b.id))!.history;
		expect(h).toHaveLength(1);
		expect(h[0]).toMatchObject({
			what: 'created',
			byEmail: planner.email,
			changes: {
				status: [null, 'scheduled'],
				dueOn: [null, TODAY],
				assigneeEmail: [null, tech.email]
			}
		});
	});

	it('refuses an unknown fixture, a non-technician, a flag of another fixture, an operator', async () => {
		const f = await makeFixture();
		const other = await makeFixture();
		expect(
			(await refusal(createWorkOrder(planner, { fixtureCode: 'ZZZZZZ', action: 'inspect' }))).status
		).toBe(404);
		const notTech = await refusal(
			createWorkOrder(planner, {
				fixtureCode: f.code,
				action: 'inspect',
				assigneeEmail: operator.email
			})
		);
		expect(notTech.status).toBe(400);
		expect(notTech.fields?.assigneeEmail?.[0]).toMatch(/not a technician/);
		const gone = await makeUser({ roles: ['technician'], active: false });
		const inactive = await refusal(
			createWorkOrder(planner, {
				fixtureCode: f.code,
				action: 'inspect',
				assigneeEmail: gone.email
			})
		);
		expect(inactive.fields?.assigneeEmail?.[0]).toMatch(/deactivated/);
		const flag = await makeFlag({ fixtureId: other.id });
		const wrongFlag = await refusal(
			createWorkOrder(planner, { fixtureCode: f.code, action: 'inspect', flagId: flag.id })
		);
		expect(wrongFlag.fields?.flagId?.[0]).toMatch(/not a flag of/);
		await expect(
			createWorkOrder(operator, { fixtureCode: f.code, action: 'inspect' })
		).rejects.toMatchObject({ status: 403 });
		await expect(
			createWorkOrder(tech, { fixtureCode: f.code, action: 'inspect' })
		).rejects.toMatchObject({
			status: 403
		});
	});
});

describe('changing an order', () => {
	it('moves through the statuses, keeping who and what in the history', async () => {
		const f = await makeFixture();
		const o = await createWorkOrder(planner, { fixtureCode: f.code, action: 'clean' });
		const dated = await updateWorkOrder(planner, o.id, patch({ dueOn: TODAY }));
		expect(dated.status).toBe('planned');
		const assigned = await updateWorkOrder(planner, o.id, patch({ assigneeEmail: tech.email }));
		expect(assigned.status).toBe('scheduled');
		const started = await updateWorkOrder(planner, o.id, patch({ status: 'underway' }));
		expect(started.status).toBe('underway');
		expect(started.startedAt).not.toBeNull();
		const done = await updateWorkOrder(planner, o.id, patch({ status: 'done' }));
		expect(done).toMatchObject({ status: 'done', completedByEmail: planner.email });
		expect(done.completedAt).not.toBeNull();

		const h = (await getWorkOrder(o.id))!.history;
		expect(h.map((r) => r.what)).toEqual(['created', 'changed', 'changed', 'started', 'done']);
		expect(h[1].changes).toEqual({ dueOn: [null, TODAY] });
		expect(h[2].changes).toEqual({
			assigneeEmail: [null, tech.email],
			status: ['planned', 'scheduled']
		});
		expect(h[4]).toMatchObject({
			byEmail: planner.email,
			changes: { status: ['underway', 'done'] }
		});
	});

	it('refuses done → planned with a message, and any change to a final order', async () => {
		const f = await makeFixture();
		const o = await createWorkOrder(planner, { fixtureCode: f.code, action: 'inspect' });
		await updateWorkOrder(planner, o.id, patch({ status: 'done' }));
		const back = await refusal(updateWorkOrder(planner, o.id, patch({ status: 'planned' })));
		expect(back.status).toBe(409);
		expect(back.message).toMatch(/done: it cannot be changed/);
		const notes = await refusal(updateWorkOrder(planner, o.id, patch({ notes: 'later' })));
		expect(notes.status).toBe(409);
		expect((await getWorkOrder(o.id))!.history).toHaveLength(2);
	});

	it('refuses underway → scheduled, and asking for "scheduled" without an assignee', async () => {
		const f = await makeFixture();
		const o = await createWorkOrder(planner, { fixtureCode: f.code, action: 'inspect' });
		const early = await refusal(updateWorkOrder(planner, o.id, patch({ status: 'scheduled' })));
		expect(early.status).toBe(409);
		expect(early.message).toMatch(/both a due date and an assignee/);
		await updateWorkOrder(planner, o.id, patch({ status: 'underway' }));
		const back = await refusal(updateWorkOrder(planner, o.id, patch({ status: 'scheduled' })));
		expect(back.message).toBe('A work order that is under way cannot go back to scheduled.');
	});

	it('cancels with a reason; a patch that changes nothing writes nothing', async () => {
		const f = await makeFixture();
		const o = await createWorkOrder(planner, {
			fixtureCode: f.code,
			action: 'inspect',
			notes: 'Look at the vee'
		});
		const same = await updateWorkOrder(planner, o.id, patch({ notes: 'Look at the vee' }));
		expect(same.updatedAt).toBe(o.updatedAt);
		expect((await getWorkOrder(o.id))!.history).toHaveLength(1);
		const c = await updateWorkOrder(
			planner,
			o.id,
			patch({ status: 'cancelled', cancelReason: 'Fixture retired' })
		);
		expect(c).toMatchObject({ status: 'cancelled', cancelReason: 'Fixture retired' });
		expect(c.doneAfterCancel).toBe(false);
		const h = (await getWorkOrder(o.id))!.history;
		expect(h.at(-1)).toMatchObject({
			what: 'cancelled',
			changes: { status: ['planned', 'cancelled'], cancelReason: [null, 'Fixture retired'] }
		});
		expect((await refusal(updateWorkOrder(planner, 999_999, patch({ notes: 'x' })))).status).toBe(
			404
		);
	});
});

describe('bulk changes', () => {
	it('assign and reschedule several orders, one history row each', async () => {
		const f = await makeFixture();
		const ids = [];
		for (let i = 0; i < 3; i++)
			ids.push((await createWorkOrder(planner, { fixtureCode: f.code, action: 'clean' })).id);
		const assigned = await bulkAssign(planner, ids, tech2.email);
		expect(assigned.map((o) => o.status)).toEqual(['planned', 'planned', 'planned']);
		const dated = await bulkReschedule(planner, ids, '2026-07-01');
		expect(dated.map((o) => [o.status, o.dueOn])).toEqual(
			ids.map(() => ['scheduled', '2026-07-01'])
		);
		for (const id of ids) {
			const h = (await getWorkOrder(id))!.history;
			expect(h.map((r) => r.what)).toEqual(['created', 'changed', 'changed']);
			expect(h[2].changes).toEqual({
				status: ['planned', 'scheduled'],
				dueOn: [null, '2026-07-01']
			});
		}
	});

	it('refuse all when one is done or cancelled, naming it', async () => {
		const f = await makeFixture();
		const a = await createWorkOrder(planner, { fixtureCode: f.code, action: 'clean' });
		const b = await createWorkOrder(planner, { fixtureCode: f.code, action: 'clean' });
		await updateWorkOrder(planner, b.id, patch({ status: 'done' }));
		const err = await refusal(bulkReschedule(planner, [a.id, b.id], '2026-07-01'));
		expect(err.status).toBe(400);
		expect(err.message).toContain(`#${b.id} (done)`);
		expect((await getWorkOrder(a.id))!.dueOn).toBeNull();
	});
});

describe('reading orders', () => {
	it('lists overdue first, then by due date, undated last; filters by assignee', async () => {
		await resetDb();
		planner = await makeUser({ roles: ['planner'] });
		tech = await makeUser({ roles: ['technician'] });
		const f = await makeFixture();
		const mk = (dueOn?: string) =>
			createWorkOrder(planner, {
				fixtureCode: f.code,
				action: 'clean',
				dueOn,
				assigneeEmail: tech.email
			});
		const later = await mk('2026-06-20');
		const none = await mk();
		const overdue = await mk('2026-06-01');
		const soon = await mk('2026-06-12');
		const doneOld = await mk('2026-05-01');
		await updateWorkOrder(planner, doneOld.id, patch({ status: 'done' }));
		const all = await listWorkOrders({}, TODAY);
		expect(all.total).toBe(5);
		expect(all.items.map((o) => o.id)).toEqual([
			overdue.id,
			doneOld.id,
			soon.id,
			later.id,
			none.id
		]);
		const open = await listWorkOrders({ statuses: ['scheduled'], to: '2026-06-15' }, TODAY);
		expect(open.items.map((o) => o.id)).toEqual([overdue.id, soon.id]);
		expect((await listWorkOrders({ assigneeEmail: planner.email }, TODAY)).total).toBe(0);
		const page = await listWorkOrders({ page: 2, pageSize: 2 }, TODAY);
		expect(page).toMatchObject({ total: 5 });
		expect(page.items.map((o) => o.id)).toEqual([soon.id, later.id]);
	});

	it('finds open flags without an open order, and the labels for flags and fixtures', async () => {
		const f = await makeFixture();
		const now = await makeFlag({ fixtureId: f.id, kind: 'replace-now' });
		const clean = await makeFlag({ fixtureId: f.id, kind: 'cleaning-due' });
		const drift = await makeFlag({ fixtureId: f.id, kind: 'drift' });
		const order = await createFromFlag(
			planner,
			clean.id,
			{ assigneeEmail: tech.email, dueOn: '2026-06-11' },
			TODAY
		);
		const unplanned = await openFlagsWithoutOrder();
		expect(unplanned.filter((u) => u.fixtureId === f.id).map((u) => u.flagId)).toEqual([
			now.id,
			drift.id
		]);
		const byFlag = await openOrdersByFlag([now.id, clean.id]);
		expect([...byFlag.keys()]).toEqual([clean.id]);
		expect(byFlag.get(clean.id)).toEqual({
			id: order.id,
			status: 'scheduled',
			dueOn: '2026-06-11',
			assigneeName: tech.name
		});
		expect((await openOrdersByFixture([f.id])).get(f.id)).toHaveLength(1);
		// Once cancelled, the flag needs planning again.
		await updateWorkOrder(planner, order.id, patch({ status: 'cancelled', cancelReason: 'No' }));
		expect((await openFlagsWithoutOrder({ kind: 'cleaning-due' })).map((u) => u.flagId)).toContain(
			clean.id
		);
	});
});
