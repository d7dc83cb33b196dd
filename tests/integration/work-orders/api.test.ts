import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ROLES, type Role } from '$lib/schemas/roles';
import type { Actor } from '$lib/server/guard';
import * as list from '../../../src/routes/api/work-orders/+server';
import * as one from '../../../src/routes/api/work-orders/[id]/+server';
import { closeDb, makeFixture, makeFlag, makeUser, resetDb } from '../helpers/db';

// The work-order API as other tools call it (issue 12 §3): the handlers with a signed-in person
// (or nobody) in locals, bodies as JSON, answers as JSON.

beforeAll(resetDb);
afterAll(closeDb);

type Handler = (event: never) => Promise<Response> | Response;

async function call(
	handler: Handler,
	user: Actor | null,
	path: string,
	opts: { method?: string; body?: unknown; params?: Record<string, string> } = {}
) {
	const url = new URL(`http://127.0.0.1${path}`);
	const request = new Request(url, {
		method: opts.method ?? 'GET',
		...(opts.body !== undefined
			? { body: JSON.stringify(opts.body), headers: { 'content-type': 'application/json' } }
			: {})
	});
	const res = await handler({ locals: { user }, params: opts.params ?? {}, url, request } as never);
	return { status: res.status, body: await res.json() };
}

const people = {} as Record<Role, Actor>;
let otherTech: Actor;
let code: string;
let fixtureId: number;

beforeAll(async () => {
	for (const role of ROLES) people[role] = await makeUser({ roles: [role] });
	otherTech = await makeUser({ roles: ['technician'] });
	const f = await makeFixture();
	code = f.code;
	fixtureId = f.id;
});

const post = (user: Actor | null, body: unknown) =>
	call(list.POST, user, '/api/work-orders', { method: 'POST', body });
const patch = (user: Actor | null, id: number | string, body: unknown) =>
	call(one.PATCH, user, `/api/work-orders/${id}`, {
		method: 'PATCH',
		body,
		params: { id: String(id) }
	});
const getOne = (user: Actor | null, id: number | string) =>
	call(one.GET, user, `/api/work-orders/${id}`, { params: { id: String(id) } });

describe('POST /api/work-orders', () => {
	it('answers 201 with the order: scheduled with a date and an assignee, else planned', async () => {
		const flag = await makeFlag({ fixtureId, kind: 'replace-now' });
		const res = await post(people.planner, {
			fixtureCode: code.toLowerCase(),
			action: 'replace-balls',
			dueOn: '2026-06-10',
			assigneeEmail: people.technician.email.toUpperCase(),
			flagId: flag.id,
			parts: [{ description: 'Ball Ø 12 mm', quantity: 3, material: 'Silicon nitride' }],
			notes: 'Worn contacts'
		});
		expect(res.status).toBe(201);
		expect(res.body).toMatchObject({
			id: expect.any(Number),
			status: 'scheduled',
			fixtureCode: code,
			action: 'replace-balls',
			dueOn: '2026-06-10',
			assigneeEmail: people.technician.email,
			flags: [{ id: flag.id, kind: 'replace-now', open: true }],
			parts: [{ description: 'Ball Ø 12 mm', quantity: 3, material: 'Silicon nitride' }],
			notes: 'Worn contacts'
		});
		const planned = await post(people.supervisor, { fixtureCode: code, action: 'clean' });
		expect(planned).toMatchObject({ status: 201, body: { status: 'planned' } });
	});

	it('answers 400 with field messages', async () => {
		const res = await post(people.planner, {
			fixtureCode: code,
			action: 'polish',
			dueOn: '2026-02-30',
			parts: [{ description: '', quantity: 0 }]
		});
		expect(res.status).toBe(400);
		expect(Object.keys(res.body.fields).sort()).toEqual([
			'action',
			'dueOn',
			'parts.0.description',
			'parts.0.quantity'
		]);
		const unknown = await post(people.planner, { fixtureCode: code, action: 'clean', due: 'x' });
		expect(unknown).toMatchObject({ status: 400, body: { fields: { due: [expect.any(String)] } } });
		const notTech = await post(people.planner, {
			fixtureCode: code,
			action: 'clean',
			assigneeEmail: people.operator.email
		});
		expect(notTech).toMatchObject({
			status: 400,
			body: { fields: { assigneeEmail: [expect.stringMatching(/not a technician/)] } }
		});
		const noFixture = await post(people.planner, { fixtureCode: 'ZZZZZZ', action: 'clean' });
		expect(noFixture.status).toBe(404);
	});
});

describe('PATCH /api/work-orders/[id]', () => {
	it('changes an order and answers 409 for a move that is not allowed', async () => {
		const made = await post(people.planner, { fixtureCode: code, action: 'inspect' });
		const id = made.body.id;
		const done = await patch(people.admin, id, { status: 'done' });
		expect(done).toMatchObject({ status: 200, body: { status: 'done' } });
		const back = await patch(people.planner, id, { status: 'planned' });
		expect(back.status).toBe(409);
		expect(back.body.error).toMatch(/is done: it cannot be changed/);
		expect((await patch(people.planner, 999_999, { notes: 'x' })).status).toBe(404);
		expect((await patch(people.planner, 'abc', { notes: 'x' })).status).toBe(404);
		const noReason = await patch(people.planner, id, { status: 'cancelled' });
		expect(noReason).toMatchObject({
			status: 400,
			body: { fields: { cancelReason: expect.any(Array) } }
		});
	});
});

describe('GET /api/work-orders and /api/work-orders/[id]', () => {
	it('lists with filters; a technician sees only their own', async () => {
		// A technician of their own: earlier tests gave work to me.
		const me = await makeUser({ roles: ['technician'] });
		const mine = await post(people.planner, {
			fixtureCode: code,
			action: 'clean',
			dueOn: '2026-06-01',
			assigneeEmail: me.email
		});
		const theirs = await post(people.planner, {
			fixtureCode: code,
			action: 'clean',
			dueOn: '2026-06-01',
			assigneeEmail: otherTech.email
		});
		const all = await call(list.GET, people.planner, `/api/work-orders?fixture=${code}`);
		expect(all.status).toBe(200);
		expect(all.body.items.map((o: { id: number }) => o.id)).toEqual(
			expect.arrayContaining([mine.body.id, theirs.body.id])
		);
		const byEmail = await call(
			list.GET,
			people.planner,
			`/api/work-orders?assignee=${encodeURIComponent(otherTech.email)}&status=scheduled`
		);
		expect(byEmail.body.items.map((o: { id: number }) => o.id)).toEqual([theirs.body.id]);

		const own = await call(list.GET, me, '/api/work-orders?assignee=me');
		expect(own.body.items.map((o: { id: number }) => o.id)).toEqual([mine.body.id]);
		// Without assignee=me too: a technician's list is their own.
		const forced = await call(list.GET, me, '/api/work-orders');
		expect(forced.body.items.map((o: { id: number }) => o.id)).toEqual([mine.body.id]);
		const nosy = await call(
			list.GET,
			me,
			`/api/work-orders?assignee=${encodeURIComponent(otherTech.email)}`
		);
		expect(nosy.status).toBe(403);
		const bad = await call(list.GET, people.planner, '/api/work-orders?from=soon&status=x');
		expect(bad).toMatchObject({ status: 400, body: { fields: { from: expect.any(Array) } } });

		const read = await getOne(me, mine.body.id);
		expect(read).toMatchObject({ status: 200, body: { id: mine.body.id } });
		expect(read.body.history).toEqual([
			expect.objectContaining({ what: 'created', byEmail: people.planner.email })
		]);
		expect((await getOne(me, theirs.body.id)).status).toBe(403);
		expect((await getOne(people.planner, 999_999)).status).toBe(404);
	});
});

describe('who may call each route', () => {
	// Expected status per role: issue 12 §3 (403 for operators and technicians on POST/PATCH;
	// operators may not read work orders; technicians read their own).
	const who: (Role | 'nobody')[] = ['nobody', ...ROLES];
	let id: number;
	beforeAll(async () => {
		const made = await post(people.planner, {
			fixtureCode: code,
			action: 'clean',
			assigneeEmail: people.technician.email
		});
		id = made.body.id;
	});
	const cases: {
		route: string;
		run: (u: Actor | null) => Promise<{ status: number; body: { error?: string } }>;
		expected: Record<Role | 'nobody', number>;
	}[] = [
		{
			route: 'GET /api/work-orders',
			run: (u) => call(list.GET, u, '/api/work-orders'),
			expected: {
				nobody: 401,
				operator: 403,
				technician: 200,
				supervisor: 200,
				planner: 200,
				admin: 200
			}
		},
		{
			route: 'POST /api/work-orders',
			run: (u) => post(u, { fixtureCode: code, action: 'inspect' }),
			expected: {
				nobody: 401,
				operator: 403,
				technician: 403,
				supervisor: 201,
				planner: 201,
				admin: 201
			}
		},
		{
			route: 'GET /api/work-orders/[id]',
			run: (u) => getOne(u, id),
			expected: {
				nobody: 401,
				operator: 403,
				technician: 200,
				supervisor: 200,
				planner: 200,
				admin: 200
			}
		},
		{
			route: 'PATCH /api/work-orders/[id]',
			run: (u) => patch(u, id, { notes: `Changed by ${u?.email ?? 'nobody'}` }),
			expected: {
				nobody: 401,
				operator: 403,
				technician: 403,
				supervisor: 200,
				planner: 200,
				admin: 200
			}
		}
	];
	for (const c of cases) {
		it(c.route, async () => {
			const got: Record<string, number> = {};
			for (const w of who) {
				const res = await c.run(w === 'nobody' ? null : people[w]);
				got[w] = res.status;
				if (res.status >= 400)
					expect(res.body.error, `${c.route} as ${w}`).toEqual(expect.any(String));
			}
			expect(got).toEqual(c.expected);
		});
	}
});
