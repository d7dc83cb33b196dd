import { randomUUID } from 'node:crypto';
import { and, asc, eq, isNull } from 'drizzle-orm';
import mysql, { type RowDataPacket } from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { WorkOrderAction, WorkOrderStatus } from '$lib/domain/work-orders';
import type { Actor } from '$lib/server/guard';
import { evaluateDueFlags } from '$lib/server/health';
import { ingestBatch } from '$lib/server/ingest';
import { closeDb, db, makeFixture, makeUser, resetDb, schema } from '../helpers/db';

beforeAll(resetDb);
afterAll(closeDb);

const { workOrders, workOrderHistory, workOrderFlags, events, flags } = schema;
const HOUR = 3_600_000;
const ago = (h: number) => new Date(Date.now() - h * HOUR).toISOString();

let tech: Actor;
let operator: Actor;
beforeAll(async () => {
	tech = await makeUser({ roles: ['technician'] });
	operator = await makeUser({ roles: ['operator'] });
});

/** A work order inserted as the planner's side would leave it. */
async function makeOrder(
	fixtureId: number,
	action: WorkOrderAction,
	status: WorkOrderStatus = 'scheduled'
) {
	const [r] = await db
		.insert(workOrders)
		.values({
			fixtureId,
			action,
			status,
			dueOn: '2030-01-01',
			assigneeId: tech.id,
			parts: [],
			cancelReason: status === 'cancelled' ? 'Not needed after all' : null
		})
		.$returningId();
	return r.id;
}

const orderOf = async (id: number) =>
	(await db.select().from(workOrders).where(eq(workOrders.id, id)))[0];
const historyOf = (id: number) =>
	db
		.select()
		.from(workOrderHistory)
		.where(eq(workOrderHistory.workOrderId, id))
		.orderBy(asc(workOrderHistory.id));

function ev(code: string, kind: string, payload: Record<string, unknown>, occurredAt = ago(1)) {
	return { id: randomUUID(), fixtureCode: code, kind, occurredAt, payload };
}
const swap = (code: string, workOrderId?: number, occurredAt?: string) =>
	ev(code, 'part-swap', { replaced: ['balls', 'seats'], workOrderId }, occurredAt);

describe('ingest carries out work orders', () => {
	it('completes an order in the same transaction as the event', async () => {
		const f = await makeFixture();
		const id = await makeOrder(f.id, 'replace-balls');
		const e = swap(f.code, id, ago(2));
		const [r] = await ingestBatch(tech, 'phone-1', [e]);
		expect(r).toEqual({ id: e.id, status: 'accepted' });
		const o = await orderOf(id);
		expect(o.status).toBe('done');
		expect(o.completedAt?.toISOString()).toBe(e.occurredAt);
		expect(o.completedBy).toBe(tech.id);
		expect(o.completedByEventId).toBe(e.id);
		const stored = await db.select().from(events).where(eq(events.id, e.id));
		expect(stored[0].payload).toMatchObject({ workOrderId: id });
		const h = await historyOf(id);
		expect(h.map((x) => [x.what, x.eventId, x.userId])).toEqual([['done', e.id, tech.id]]);
		expect(h[0].changes.status).toEqual(['scheduled', 'done']);
	});

	it('leaves the order untouched when the event fails validation', async () => {
		const f = await makeFixture();
		const id = await makeOrder(f.id, 'replace-balls');
		const bad = ev(f.code, 'part-swap', { replaced: [], workOrderId: id });
		const [r] = await ingestBatch(tech, 'phone-1', [bad]);
		expect(r.status).toBe('rejected');
		expect((await orderOf(id)).status).toBe('scheduled');
		expect(await historyOf(id)).toEqual([]);
	});

	it('starts an order with a note, then completes it', async () => {
		const f = await makeFixture();
		const id = await makeOrder(f.id, 'inspect');
		const note = ev(f.code, 'note', { text: `Started work order #${id}`, workOrderId: id }, ago(3));
		const insp = ev(
			f.code,
			'inspection',
			{ contacts: [{ contact: 'ball 1', grade: 1 }], verdict: 'serviceable', workOrderId: id },
			ago(2)
		);
		// Sent in one batch, the later event first: the order follows the events' own order.
		const results = await ingestBatch(tech, 'phone-1', [insp, note]);
		expect(results.map((x) => x.status)).toEqual(['accepted', 'accepted']);
		const o = await orderOf(id);
		expect(o.status).toBe('done');
		expect(o.startedAt?.toISOString()).toBe(note.occurredAt);
		expect((await historyOf(id)).map((x) => [x.what, x.eventId])).toEqual([
			['started', note.id],
			['done', insp.id]
		]);
	});

	it('keeps a cancelled order cancelled and records the work as done after cancel', async () => {
		const f = await makeFixture();
		const id = await makeOrder(f.id, 'replace-balls', 'cancelled');
		const e = swap(f.code, id);
		const [r] = await ingestBatch(tech, 'phone-1', [e]);
		expect(r.status).toBe('accepted');
		const o = await orderOf(id);
		expect(o.status).toBe('cancelled');
		expect(o.completedAt?.toISOString()).toBe(e.occurredAt);
		expect(o.completedBy).toBe(tech.id);
		expect(o.completedByEventId).toBe(e.id);
		expect((await historyOf(id)).map((x) => [x.what, x.eventId])).toEqual([
			['done-after-cancel', e.id]
		]);
	});

	it('rejects an unknown order id with a reason and takes the rest of the batch', async () => {
		const f = await makeFixture();
		const bad = swap(f.code, 999_999);
		const good = ev(f.code, 'reseat', {});
		const [rb, rg] = await ingestBatch(tech, 'phone-1', [bad, good]);
		expect(rb).toEqual({
			id: bad.id,
			status: 'rejected',
			error: 'Work order #999999 does not exist.'
		});
		expect(rg.status).toBe('accepted');
		expect(await db.select().from(events).where(eq(events.id, bad.id))).toEqual([]);
	});

	it('rejects an order of another fixture, naming it', async () => {
		const f = await makeFixture();
		const other = await makeFixture();
		const id = await makeOrder(other.id, 'replace-balls');
		const e = swap(f.code, id);
		const [r] = await ingestBatch(tech, 'phone-1', [e]);
		expect(r.status).toBe('rejected');
		expect(r.error).toBe(`Work order #${id} is for fixture ${other.code}, not ${f.code}.`);
		expect((await orderOf(id)).status).toBe('scheduled');
	});

	it('refuses an order id from someone who does not carry out work orders', async () => {
		const f = await makeFixture();
		const id = await makeOrder(f.id, 'other');
		const e = ev(f.code, 'reseat', { workOrderId: id });
		const [r] = await ingestBatch(operator, 'phone-2', [e]);
		expect(r.status).toBe('rejected');
		expect(r.error).toMatch(/may not carry out work orders/);
		expect((await orderOf(id)).status).toBe('scheduled');
	});

	it('applies a resent event once', async () => {
		const f = await makeFixture();
		const id = await makeOrder(f.id, 'replace-seats');
		const note = ev(f.code, 'note', { text: 'Started', workOrderId: id }, ago(3));
		const e = swap(f.code, id, ago(2));
		await ingestBatch(tech, 'phone-1', [note, e]);
		const again = await ingestBatch(tech, 'phone-1', [note, e, e]);
		expect(again.map((x) => x.status)).toEqual(['duplicate', 'duplicate', 'duplicate']);
		expect((await historyOf(id)).map((x) => x.what)).toEqual(['started', 'done']);
	});
});

describe('flags raised while an order is open', () => {
	it('link to the open order that answers them, not to one just completed', async () => {
		const f = await makeFixture();
		const breakIn = await makeOrder(f.id, 're-break-in');
		const replace = await makeOrder(f.id, 'replace-balls');
		// A part swap starts a new break-in: its flag goes to the break-in order.
		const e = swap(f.code, replace);
		await ingestBatch(tech, 'phone-1', [e]);
		const [flag] = await db
			.select()
			.from(flags)
			.where(
				and(eq(flags.fixtureId, f.id), eq(flags.kind, 'break-in-due'), isNull(flags.clearedAt))
			);
		expect(flag).toBeDefined();
		const links = await db.select().from(workOrderFlags).where(eq(workOrderFlags.flagId, flag.id));
		expect(links).toEqual([{ workOrderId: breakIn, flagId: flag.id }]);
		const h = await historyOf(breakIn);
		expect(h.map((x) => [x.what, x.userId])).toEqual([['flag-linked', tech.id]]);
		expect(h[0].changes).toEqual({ flagId: [null, flag.id], flagKind: [null, 'break-in-due'] });
		expect((await historyOf(replace)).map((x) => x.what)).toEqual(['done']);
	});

	it('link when the calendar scan raises them', async () => {
		const f = await makeFixture();
		const clean = await makeOrder(f.id, 'clean');
		await ingestBatch(tech, 'phone-1', [ev(f.code, 'reseat', {})]);
		// Default policy: cleaning every 30 days (policy.ts); 40 days on, the scan raises it.
		const changes = await evaluateDueFlags(new Date(Date.now() + 40 * 24 * HOUR), [f.id]);
		expect(changes[0].raised).toContain('cleaning-due');
		const [flag] = await db
			.select()
			.from(flags)
			.where(and(eq(flags.fixtureId, f.id), eq(flags.kind, 'cleaning-due')));
		expect(
			await db.select().from(workOrderFlags).where(eq(workOrderFlags.workOrderId, clean))
		).toEqual([{ workOrderId: clean, flagId: flag.id }]);
		const h = await historyOf(clean);
		expect(h.map((x) => [x.what, x.userId])).toEqual([['flag-linked', null]]);
	});
});

describe('statements per batch', () => {
	/** Statements the server received for one batch (Questions, on this quiet test database). */
	async function statementsFor(n: number): Promise<number> {
		const batch = [];
		for (let i = 0; i < n; i++) {
			const f = await makeFixture();
			await makeOrder(f.id, 'replace-balls');
			const id = await makeOrder(f.id, 're-break-in');
			const other = await makeOrder(f.id, 'replace-balls');
			batch.push(ev(f.code, 'note', { text: 'Starting', workOrderId: id }, ago(3)));
			batch.push(swap(f.code, other, ago(2)));
		}
		const watcher = await mysql.createConnection({ uri: process.env.DATABASE_URL });
		const questions = async () => {
			const [rows] = await watcher.query<RowDataPacket[]>("SHOW GLOBAL STATUS LIKE 'Questions'");
			return Number(rows[0].Value);
		};
		try {
			const before = await questions();
			const results = await ingestBatch(tech, 'phone-3', batch);
			const after = await questions();
			expect(results.every((r) => r.status === 'accepted')).toBe(true);
			return after - before - 1;
		} finally {
			await watcher.end();
		}
	}

	it('are the same for 2 fixtures as for 40, with orders started, completed and flags linked', async () => {
		const small = await statementsFor(2);
		const large = await statementsFor(40);
		expect(small).toBeGreaterThan(5);
		expect(large).toBe(small);
	});
});
