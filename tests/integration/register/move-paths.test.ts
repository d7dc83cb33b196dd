import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { randomUUID } from 'node:crypto';
import { asc, eq } from 'drizzle-orm';
import * as fixtures from '$lib/server/fixtures';
import { rebuildStates } from '$lib/server/health';
import { contentHash, ingestBatch } from '$lib/server/ingest';
import { closeDb, db, makeFixture, makeLocation, makeUser, resetDb, schema } from '../helpers/db';

beforeAll(resetDb);
afterAll(closeDb);

/** The same history for a fixture, sent through sync: a few reseats and a note. */
async function history(tech: Awaited<ReturnType<typeof makeUser>>, code: string, base: number) {
	const at = (minutes: number) => new Date(base + minutes * 60_000).toISOString();
	const results = await ingestBatch(tech, 'phone-m', [
		{ id: randomUUID(), fixtureCode: code, kind: 'reseat', occurredAt: at(0), payload: {} },
		{ id: randomUUID(), fixtureCode: code, kind: 'reseat', occurredAt: at(5), payload: {} },
		{
			id: randomUUID(),
			fixtureCode: code,
			kind: 'note',
			occurredAt: at(10),
			payload: { text: 'Seats wiped' }
		},
		{ id: randomUUID(), fixtureCode: code, kind: 'reseat', occurredAt: at(15), payload: {} }
	]);
	expect(results.map((r) => r.status)).toEqual(['accepted', 'accepted', 'accepted', 'accepted']);
}

/** Event ids of a fixture in folding order, to compare two fixtures' states and flags. */
async function ordinals(fixtureId: number): Promise<Map<string, string>> {
	const rows = await db
		.select({ id: schema.events.id })
		.from(schema.events)
		.where(eq(schema.events.fixtureId, fixtureId))
		.orderBy(asc(schema.events.occurredAt), asc(schema.events.id));
	return new Map(rows.map((r, i) => [r.id, `event #${i + 1}`]));
}

/** The stored state and every flag row of a fixture, its event ids replaced by their ordinals. */
async function derived(fixtureId: number) {
	const names = await ordinals(fixtureId);
	const [state] = await db
		.select()
		.from(schema.fixtureState)
		.where(eq(schema.fixtureState.fixtureId, fixtureId));
	let data = JSON.stringify(state.data);
	for (const [id, name] of names) data = data.split(id).join(name);
	const flagRows = await db
		.select()
		.from(schema.flags)
		.where(eq(schema.flags.fixtureId, fixtureId))
		.orderBy(asc(schema.flags.kind), asc(schema.flags.id));
	const byName = (id: string | null) => (id === null ? null : (names.get(id) ?? id));
	return {
		data: JSON.parse(data),
		columns: {
			eventCount: state.eventCount,
			totalCycles: state.totalCycles,
			cyclesSinceCleaning: state.cyclesSinceCleaning,
			wearGrade: state.wearGrade,
			lastEventAt: state.lastEventAt
		},
		flags: flagRows.map((f) => ({
			kind: f.kind,
			reason: f.reason,
			figures: f.figures,
			open: f.clearedAt === null,
			raisedBy: byName(f.raisedByEventId),
			clearedBy: byName(f.clearedByEventId)
		}))
	};
}

describe('a move made in the register and the same move sent through sync', () => {
	it('leave the same state and flags, hash alike, and leave nothing for a rebuild', async () => {
		const sup = await makeUser({ roles: ['supervisor'] });
		const tech = await makeUser({ roles: ['technician'] });
		const from = await makeLocation();
		const to = await makeLocation();
		const a = await makeFixture({ locationId: from.id, commissionedOn: '2026-01-05' });
		const b = await makeFixture({ locationId: from.id, commissionedOn: '2026-01-05' });
		const base = Date.now() - 3_600_000;
		await history(tech, a.code, base);
		await history(tech, b.code, base);

		// A through the register.
		expect(await fixtures.update(sup, a.code, { locationId: to.id })).toEqual({
			code: a.code,
			moved: true
		});
		const [moveA] = await db
			.select()
			.from(schema.events)
			.where(eq(schema.events.fixtureId, a.id))
			.orderBy(asc(schema.events.occurredAt))
			.then((rows) => rows.filter((r) => r.kind === 'move'));
		expect(moveA).toBeDefined();

		// B through sync: the same move, at the same time, from a phone.
		const occurredAt = moveA.occurredAt.toISOString();
		const payload = { locationId: String(to.id), fromLocationId: String(from.id) };
		const [sent] = await ingestBatch(sup, 'phone-m', [
			{ id: randomUUID(), fixtureCode: b.code, kind: 'move', occurredAt, payload }
		]);
		expect(sent.status).toBe('accepted');

		// Ingest's content hash, not one of the register's own.
		expect(moveA.payload).toEqual(payload);
		expect(moveA.contentHash).toBe(
			contentHash({ fixtureCode: a.code, kind: 'move', occurredAt, payload })
		);

		const [stateA, stateB] = [await derived(a.id), await derived(b.id)];
		expect(stateA.data.lastMoveAt).toBe(occurredAt);
		expect(stateA.flags.length).toBeGreaterThan(0);
		expect(stateA).toEqual(stateB);

		const report = await rebuildStates({ ids: [a.id, b.id] });
		expect(report.checked).toBe(2);
		expect(report.differing).toEqual([]);
	});

	it('a register move rolls back with the fixture change when its location does not exist', async () => {
		const sup = await makeUser({ roles: ['supervisor'] });
		const f = await makeFixture();
		await expect(fixtures.update(sup, f.code, { locationId: 999_999 })).rejects.toMatchObject({
			fields: { locationId: expect.any(Array) }
		});
		expect(
			await db.select().from(schema.fixtureState).where(eq(schema.fixtureState.fixtureId, f.id))
		).toEqual([]);
	});
});
