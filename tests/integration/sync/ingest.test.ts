import { randomUUID } from 'node:crypto';
import { asc, count, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { compareEvents, recompute, type FixtureState } from '$lib/domain/health';
import { DEFAULT_POLICY } from '$lib/domain/policy';
import type { FixtureEvent } from '$lib/schemas/events';
import type { Actor } from '$lib/server/guard';
import { ingestBatch, type SyncResult } from '$lib/server/ingest';
import { initialStateOptions } from '$lib/server/state-store';
import { generateFixtureCode } from '$lib/domain/fixture-code';
import { getPool } from '$lib/server/db';
import { closeDb, db, makeFixture, makeUser, resetDb, schema } from '../helpers/db';

beforeAll(resetDb);
afterAll(closeDb);

const HOUR = 3_600_000;
/** A time `hoursAgo` before now, as the phone would send it. */
const ago = (hoursAgo: number) => new Date(Date.now() - hoursAgo * HOUR).toISOString();

function reseat(fixtureCode: string, occurredAt: string, payload: Record<string, unknown> = {}) {
	return { id: randomUUID(), fixtureCode, kind: 'reseat', occurredAt, payload };
}
function cleaning(fixtureCode: string, occurredAt: string) {
	return {
		id: randomUUID(),
		fixtureCode,
		kind: 'cleaning',
		occurredAt,
		payload: { method: 'dry-wipe', relubricated: false }
	};
}
function inspection(fixtureCode: string, occurredAt: string) {
	return {
		id: randomUUID(),
		fixtureCode,
		kind: 'inspection',
		occurredAt,
		payload: { contacts: [{ contact: 'ball 1', grade: 1 }], verdict: 'serviceable' }
	};
}

async function eventCount(fixtureId: number): Promise<number> {
	const [r] = await db
		.select({ n: count() })
		.from(schema.events)
		.where(eq(schema.events.fixtureId, fixtureId));
	return r.n;
}

async function stateOf(fixtureId: number) {
	const [row] = await db
		.select()
		.from(schema.fixtureState)
		.where(eq(schema.fixtureState.fixtureId, fixtureId));
	return row;
}

/** The fixture's state folded from its whole stored history, as a rebuild would. */
async function rebuilt(fixture: { id: number; commissionedOn?: string | null }) {
	const rows = await db.select().from(schema.events).where(eq(schema.events.fixtureId, fixture.id));
	const history = rows
		.map(
			(r) =>
				({
					id: r.id,
					kind: r.kind,
					occurredAt: r.occurredAt.toISOString(),
					payload: r.payload
				}) as FixtureEvent
		)
		.sort(compareEvents);
	const state = recompute(
		history,
		DEFAULT_POLICY,
		initialStateOptions({ commissionedOn: fixture.commissionedOn ?? null })
	);
	return JSON.parse(JSON.stringify(state)) as FixtureState;
}

const statuses = (results: SyncResult[]) => results.map((r) => r.status);

describe('ingestBatch', () => {
	let tech: Actor;
	let operator: Actor;

	beforeAll(async () => {
		tech = await makeUser({ roles: ['technician'], name: 'Tamsin Vale' });
		operator = await makeUser({ roles: ['operator'], name: 'Oskar Brandt' });
	});

	it('stores new events with the receive time, user and device, answering in request order', async () => {
		const f = await makeFixture();
		const batch = [reseat(f.code, ago(3)), reseat(f.code, ago(2)), cleaning(f.code, ago(1))];
		const now = new Date();
		const results = await ingestBatch(tech, 'phone-17', batch, { now });
		expect(results).toEqual(batch.map((e) => ({ id: e.id, status: 'accepted' })));

		const rows = await db
			.select()
			.from(schema.events)
			.where(eq(schema.events.fixtureId, f.id))
			.orderBy(asc(schema.events.occurredAt));
		expect(rows.map((r) => r.id)).toEqual(batch.map((e) => e.id));
		for (const [i, row] of rows.entries()) {
			expect(row).toMatchObject({
				kind: batch[i].kind,
				userId: tech.id,
				deviceId: 'phone-17',
				occurredAt: new Date(batch[i].occurredAt)
			});
			expect(row.receivedAt.getTime()).toBe(now.getTime());
			expect(row.contentHash).toMatch(/^[0-9a-f]{64}$/);
		}
		// The schema's defaults are filled in before storing.
		expect(rows[0].payload).toEqual({ cycles: 1 });
	});

	it('updates the fixture state in the same batch: 3 reseats and a cleaning', async () => {
		const f = await makeFixture();
		await ingestBatch(tech, 'phone-1', [
			reseat(f.code, ago(4)),
			reseat(f.code, ago(3)),
			reseat(f.code, ago(2)),
			cleaning(f.code, ago(1))
		]);
		const row = await stateOf(f.id);
		expect(row).toMatchObject({
			eventCount: 4,
			totalCycles: 3,
			cyclesSinceCleaning: 0,
			cyclesSinceInspection: 3
		});
		expect((row.data as unknown as FixtureState).totalCycles).toBe(3);
		expect(row.data).toEqual(await rebuilt(f));
	});

	it('folds by when things happened, not by the order they arrived in', async () => {
		const f = await makeFixture();
		// The cleaning happened before the last reseat, though it is listed last.
		await ingestBatch(tech, 'phone-1', [
			reseat(f.code, ago(5)),
			reseat(f.code, ago(4)),
			reseat(f.code, ago(1)),
			cleaning(f.code, ago(3))
		]);
		expect(await stateOf(f.id)).toMatchObject({ totalCycles: 3, cyclesSinceCleaning: 1 });

		// A phone that was offline syncs a reseat from before the cleaning: recomputed from history.
		await ingestBatch(operator, 'phone-2', [reseat(f.code, ago(3.5), { cycles: 5 })]);
		const row = await stateOf(f.id);
		expect(row).toMatchObject({ totalCycles: 8, cyclesSinceCleaning: 1, eventCount: 5 });
		expect(row.data).toEqual(await rebuilt(f));
	});

	it('answers a batch sent twice with all duplicates and changes nothing', async () => {
		const f = await makeFixture();
		const batch = [reseat(f.code, ago(2)), reseat(f.code, ago(1)), cleaning(f.code, ago(0.5))];
		expect(statuses(await ingestBatch(tech, 'phone-1', batch))).toEqual([
			'accepted',
			'accepted',
			'accepted'
		]);
		const before = await stateOf(f.id);
		const flagsBefore = await db
			.select()
			.from(schema.flags)
			.where(eq(schema.flags.fixtureId, f.id));

		const again = await ingestBatch(tech, 'phone-1', batch);
		expect(again).toEqual(batch.map((e) => ({ id: e.id, status: 'duplicate' })));
		expect(await eventCount(f.id)).toBe(3);
		expect(await stateOf(f.id)).toEqual(before);
		expect(await db.select().from(schema.flags).where(eq(schema.flags.fixtureId, f.id))).toEqual(
			flagsBefore
		);
	});

	it('counts a re-send by another person on the same phone as a duplicate', async () => {
		const f = await makeFixture();
		const e = reseat(f.code, ago(1));
		await ingestBatch(operator, 'phone-3', [e]);
		expect(await ingestBatch(tech, 'phone-3', [{ ...e, id: e.id.toUpperCase() }])).toEqual([
			{ id: e.id.toUpperCase(), status: 'duplicate' }
		]);
		const [row] = await db.select().from(schema.events).where(eq(schema.events.id, e.id));
		expect(row.userId).toBe(operator.id);
	});

	it("answers duplicate for a technician's stored inspection re-sent under an operator", async () => {
		const f = await makeFixture();
		const insp = inspection(f.code, ago(2));
		await ingestBatch(tech, 'phone-6', [insp]);
		expect(await ingestBatch(operator, 'phone-6', [insp])).toEqual([
			{ id: insp.id, status: 'duplicate' }
		]);
	});

	it('stores the new events of a batch that is partly a re-send', async () => {
		const f = await makeFixture();
		const old = [reseat(f.code, ago(5)), reseat(f.code, ago(4))];
		await ingestBatch(tech, 'phone-1', old);
		const clash = { ...old[1], payload: { cycles: 9 } };
		const fresh = [reseat(f.code, ago(3)), cleaning(f.code, ago(2))];
		const results = await ingestBatch(tech, 'phone-1', [old[0], fresh[0], clash, fresh[1]]);
		expect(statuses(results)).toEqual(['duplicate', 'accepted', 'rejected', 'accepted']);
		expect(results[2].error).toMatch(/different content/);
		expect(await eventCount(f.id)).toBe(4);
		const row = await stateOf(f.id);
		expect(row).toMatchObject({ eventCount: 4, totalCycles: 3, cyclesSinceCleaning: 0 });
		expect(row.data).toEqual(await rebuilt(f));
	});

	it('treats a fixture code in any spelling as the same content', async () => {
		const f = await makeFixture();
		const e = reseat(f.code, ago(1));
		await ingestBatch(tech, 'phone-1', [e]);
		const typed = f.code.toLowerCase().replace('-', ' ');
		expect(statuses(await ingestBatch(tech, 'phone-1', [{ ...e, fixtureCode: typed }]))).toEqual([
			'duplicate'
		]);
	});

	it('rejects the same id with different content and keeps the stored event', async () => {
		const f = await makeFixture();
		const e = reseat(f.code, ago(1), { cycles: 2 });
		await ingestBatch(tech, 'phone-1', [e]);
		const [result] = await ingestBatch(tech, 'phone-1', [{ ...e, payload: { cycles: 3 } }]);
		expect(result).toEqual({
			id: e.id,
			status: 'rejected',
			error: expect.stringMatching(/already exists with different content/)
		});
		const [row] = await db.select().from(schema.events).where(eq(schema.events.id, e.id));
		expect(row.payload).toEqual({ cycles: 2 });
		expect(await stateOf(f.id)).toMatchObject({ totalCycles: 2, eventCount: 1 });
	});

	it('stores the valid events of a mixed batch and says why each other one was refused', async () => {
		const f = await makeFixture();
		const good1 = reseat(f.code, ago(3));
		const badPayload = reseat(f.code, ago(2), { cycles: 0, readings: { dx: 'wide' } });
		// A well-formed code that is not in the register.
		let stranger = generateFixtureCode();
		while (stranger === f.code) stranger = generateFixtureCode();
		const unknownFixture = reseat(stranger, ago(2));
		const typo = reseat(f.code.slice(0, -1) + (f.code.endsWith('2') ? '3' : '2'), ago(2));
		const noId = { fixtureCode: f.code, kind: 'reseat', occurredAt: ago(2), payload: {} };
		const badKind = { ...reseat(f.code, ago(2)), kind: 'polish' };
		const good2 = cleaning(f.code, ago(1));
		const batch = [good1, badPayload, unknownFixture, typo, noId, badKind, 'nonsense', good2];

		const results = await ingestBatch(tech, 'phone-1', batch);
		expect(results).toHaveLength(batch.length);
		expect(statuses(results)).toEqual([
			'accepted',
			'rejected',
			'rejected',
			'rejected',
			'rejected',
			'rejected',
			'rejected',
			'accepted'
		]);
		expect(results[1].id).toBe(badPayload.id);
		expect(results[1].error).toMatch(/payload\.cycles: Cycles must be at least 1/);
		expect(results[1].error).toMatch(/payload\.readings\.dx: dx must be a number/);
		expect(results[2].error).toBe(`No fixture with code ${stranger} in the register.`);
		expect(results[3].error).toMatch(/check character/);
		expect(results[4]).toMatchObject({
			id: '',
			error: expect.stringMatching(/^Invalid event — id:/)
		});
		expect(results[5].error).toMatch(/Kind must be one of/);
		expect(results[6]).toMatchObject({ id: '', status: 'rejected' });

		expect(await eventCount(f.id)).toBe(2);
		expect(await stateOf(f.id)).toMatchObject({ eventCount: 2, totalCycles: 1 });
	});

	it("rejects an operator's inspection with a role message and keeps the rest", async () => {
		const f = await makeFixture();
		const ok = reseat(f.code, ago(2));
		const insp = inspection(f.code, ago(1));
		const results = await ingestBatch(operator, 'phone-4', [ok, insp]);
		expect(results[0]).toEqual({ id: ok.id, status: 'accepted' });
		expect(results[1]).toEqual({
			id: insp.id,
			status: 'rejected',
			error: 'Operators cannot log inspections; a technician, supervisor or admin can.'
		});
		// The same inspection from a technician is fine.
		expect(statuses(await ingestBatch(tech, 'phone-5', [insp]))).toEqual(['accepted']);
	});

	it('names every role a person holds when none of them may log the kind', async () => {
		const f = await makeFixture();
		const both = await makeUser({ roles: ['operator', 'planner'] });
		const [r] = await ingestBatch(both, 'phone-1', [
			{
				id: randomUUID(),
				fixtureCode: f.code,
				kind: 'hold',
				occurredAt: ago(1),
				payload: { reason: 'x' }
			}
		]);
		expect(r.error).toBe(
			'Operators and planners cannot log holds; a technician, supervisor or admin can.'
		);
	});

	it('rejects an event more than 10 minutes in the future, and allows a little clock drift', async () => {
		const f = await makeFixture();
		const now = new Date();
		const at = (minutes: number) => new Date(now.getTime() + minutes * 60_000).toISOString();
		const near = reseat(f.code, at(9));
		const far = reseat(f.code, at(25));
		const results = await ingestBatch(tech, 'phone-1', [near, far], { now });
		expect(results[0].status).toBe('accepted');
		expect(results[1]).toMatchObject({
			status: 'rejected',
			error: expect.stringMatching(/25 minutes ahead of the server clock/)
		});
		expect(await eventCount(f.id)).toBe(1);
	});

	it('accepts the first of two events with one id in a batch and calls the second a duplicate', async () => {
		const f = await makeFixture();
		const e = reseat(f.code, ago(1));
		const clash = { ...e, payload: { cycles: 4 } };
		expect(await ingestBatch(tech, 'phone-1', [e, e, clash])).toEqual([
			{ id: e.id, status: 'accepted' },
			{ id: e.id, status: 'duplicate' },
			{ id: e.id, status: 'rejected', error: expect.stringMatching(/different content/) }
		]);
		expect(await stateOf(f.id)).toMatchObject({ eventCount: 1, totalCycles: 1 });
	});

	it('raises flags with the event that raised them and clears them with the one that cleared them', async () => {
		const f = await makeFixture();
		const first = reseat(f.code, ago(5), { cycles: DEFAULT_POLICY.cleaningIntervalCycles! });
		await ingestBatch(tech, 'phone-1', [first]);
		const open = await db.select().from(schema.flags).where(eq(schema.flags.fixtureId, f.id));
		const cleaningDue = open.find((x) => x.kind === 'cleaning-due');
		expect(cleaningDue).toMatchObject({ raisedByEventId: first.id, clearedAt: null });
		expect(cleaningDue!.reason).toMatch(/250 cycles since/);
		// A new fixture needs a break-in.
		expect(open.map((x) => x.kind)).toContain('break-in-due');

		const wipe = cleaning(f.code, ago(4));
		const after = reseat(f.code, ago(3));
		await ingestBatch(tech, 'phone-1', [wipe, after]);
		const [closed] = await db
			.select()
			.from(schema.flags)
			.where(eq(schema.flags.id, cleaningDue!.id));
		expect(closed.clearedByEventId).toBe(wipe.id);
		expect(closed.clearedAt).not.toBeNull();
		const stillOpen = await db.select().from(schema.flags).where(eq(schema.flags.fixtureId, f.id));
		expect(stillOpen.filter((x) => x.kind === 'cleaning-due' && !x.clearedAt)).toHaveLength(0);
	});

	it('attributes a flag raised inside a batch to the event that tipped it over', async () => {
		const f = await makeFixture();
		const interval = DEFAULT_POLICY.cleaningIntervalCycles!;
		const batch = [
			reseat(f.code, ago(6), { cycles: interval - 2 }),
			reseat(f.code, ago(5)),
			reseat(f.code, ago(4)),
			reseat(f.code, ago(3))
		];
		await ingestBatch(tech, 'phone-1', batch);
		const rows = await db.select().from(schema.flags).where(eq(schema.flags.fixtureId, f.id));
		expect(rows.find((x) => x.kind === 'cleaning-due')?.raisedByEventId).toBe(batch[2].id);
		expect(rows.find((x) => x.kind === 'break-in-due')?.raisedByEventId).toBe(batch[0].id);
	});

	it('keeps the register status in step with holds and releases', async () => {
		const f = await makeFixture({ status: 'in-service' });
		await ingestBatch(tech, 'phone-1', [
			{
				id: randomUUID(),
				fixtureCode: f.code,
				kind: 'hold',
				occurredAt: ago(2),
				payload: { reason: 'Chipped ball' }
			}
		]);
		const [held] = await db.select().from(schema.fixtures).where(eq(schema.fixtures.id, f.id));
		expect(held.status).toBe('on-hold');
		await ingestBatch(tech, 'phone-1', [
			{ id: randomUUID(), fixtureCode: f.code, kind: 'release', occurredAt: ago(1), payload: {} }
		]);
		const [released] = await db.select().from(schema.fixtures).where(eq(schema.fixtures.id, f.id));
		// A new fixture has not been broken in yet.
		expect(released.status).toBe('breaking-in');
	});

	it('writes nothing when the transaction fails midway, and the retry is accepted once', async () => {
		const f = await makeFixture();
		await ingestBatch(tech, 'phone-1', [reseat(f.code, ago(10))]);
		const stateBefore = await stateOf(f.id);
		const flagsBefore = await db
			.select()
			.from(schema.flags)
			.where(eq(schema.flags.fixtureId, f.id));

		// A trigger makes the state update fail after the events were inserted in the transaction.
		const pool = getPool();
		await pool.query('DROP TRIGGER IF EXISTS test_fail_state_update');
		await pool.query(
			`CREATE TRIGGER test_fail_state_update BEFORE UPDATE ON fixture_state FOR EACH ROW
			 BEGIN IF NEW.fixture_id = ${f.id} THEN
			   SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'simulated crash';
			 END IF; END`
		);
		const other = await makeFixture();
		const batch = [reseat(other.code, ago(3)), reseat(f.code, ago(2)), cleaning(f.code, ago(1))];
		try {
			await expect(ingestBatch(tech, 'phone-1', batch)).rejects.toThrow(/simulated crash/);
		} finally {
			await pool.query('DROP TRIGGER IF EXISTS test_fail_state_update');
		}

		expect(await eventCount(f.id)).toBe(1);
		expect(await eventCount(other.id)).toBe(0);
		expect(await stateOf(other.id)).toBeUndefined();
		expect(await stateOf(f.id)).toEqual(stateBefore);
		expect(await db.select().from(schema.flags).where(eq(schema.flags.fixtureId, f.id))).toEqual(
			flagsBefore
		);

		expect(statuses(await ingestBatch(tech, 'phone-1', batch))).toEqual([
			'accepted',
			'accepted',
			'accepted'
		]);
		expect(statuses(await ingestBatch(tech, 'phone-1', batch))).toEqual([
			'duplicate',
			'duplicate',
			'duplicate'
		]);
		expect(await eventCount(f.id)).toBe(3);
		expect(await stateOf(f.id)).toMatchObject({
			eventCount: 3,
			totalCycles: 2,
			cyclesSinceCleaning: 0
		});
	});

	it('stores each event once when two phones send the same batch at the same moment', async () => {
		const fs = await Promise.all([makeFixture(), makeFixture(), makeFixture()]);
		const batch = fs.flatMap((f, i) => [reseat(f.code, ago(3 + i)), reseat(f.code, ago(1 + i))]);
		const answers = await Promise.all([
			ingestBatch(tech, 'phone-a', batch),
			ingestBatch(tech, 'phone-b', batch),
			ingestBatch(operator, 'phone-c', batch)
		]);
		for (let i = 0; i < batch.length; i++) {
			const got = answers.map((a) => a[i].status).sort();
			expect(got).toEqual(['accepted', 'duplicate', 'duplicate']);
		}
		for (const f of fs) {
			expect(await eventCount(f.id)).toBe(2);
			const row = await stateOf(f.id);
			expect(row).toMatchObject({ eventCount: 2, totalCycles: 2 });
			expect(row.data).toEqual(await rebuilt(f));
		}
	});

	it('keeps every event when phones sync different events for one fixture at once', async () => {
		const f = await makeFixture();
		const batches = [0, 1, 2, 3].map((p) =>
			Array.from({ length: 20 }, (_, i) => reseat(f.code, ago(10 - p * 2 - i * 0.05)))
		);
		const answers = await Promise.all(batches.map((b, p) => ingestBatch(tech, `phone-${p}`, b)));
		expect(answers.flat().every((r) => r.status === 'accepted')).toBe(true);
		const row = await stateOf(f.id);
		expect(row).toMatchObject({ eventCount: 80, totalCycles: 80 });
		expect(row.data).toEqual(await rebuilt(f));
	});
});
