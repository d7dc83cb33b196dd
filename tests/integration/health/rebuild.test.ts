import { randomUUID } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Actor } from '$lib/server/guard';
import { differingFields, rebuildStates } from '$lib/server/health';
import { ingestBatch } from '$lib/server/ingest';
import { closeDb, db, makeFixture, makeUser, resetDb, schema } from '../helpers/db';

beforeAll(resetDb);
afterAll(closeDb);

const HOUR = 3_600_000;
const ago = (hours: number) => new Date(Date.now() - hours * HOUR).toISOString();
const event = (fixtureCode: string, kind: string, occurredAt: string, payload: object) => ({
	id: randomUUID(),
	fixtureCode,
	kind,
	occurredAt,
	payload
});
/** Seatings with readings that wander a little, as an indicator shows them. */
const reseats = (code: string, fromHoursAgo: number, n: number, base = 0) =>
	Array.from({ length: n }, (_, i) =>
		event(code, 'reseat', ago(fromHoursAgo - i * 0.1), {
			readings: { dx: base + ((i * 7) % 5) * 0.05, dy: base - ((i * 3) % 4) * 0.04 }
		})
	);

describe('rebuildStates', () => {
	let tech: Actor;
	/** Ingests a batch and checks every event was accepted. */
	const ingest = async (events: ReturnType<typeof event>[]) => {
		const results = await ingestBatch(tech, 'phone-1', events);
		expect(results.map((r) => r.status)).toEqual(events.map(() => 'accepted'));
	};
	beforeAll(async () => {
		tech = await makeUser({ roles: ['technician'] });
	});

	it('reports no difference after a series of ingested batches, late ones included', async () => {
		const a = await makeFixture({ commissionedOn: '2026-01-05' });
		const b = await makeFixture();
		await ingest(reseats(a.code, 200, 35));
		await ingest([
			event(a.code, 'cleaning', ago(190), { method: 'dry-wipe', relubricated: false }),
			...reseats(b.code, 180, 12)
		]);
		// A phone that was offline syncs older work late: the fixture is recomputed.
		await ingest(reseats(a.code, 250, 5, 0.2));
		await ingest([
			event(b.code, 'inspection', ago(100), {
				contacts: [{ contact: 'ball 1', grade: 2 }],
				verdict: 'serviceable'
			}),
			event(b.code, 'part-swap', ago(90), { replaced: ['balls'] }),
			...reseats(b.code, 80, 15, 0.1)
		]);
		const untouched = await makeFixture();

		const report = await rebuildStates();
		expect(report.checked).toBeGreaterThanOrEqual(3);
		expect(report.differing).toEqual([]);
		const [none] = await db
			.select()
			.from(schema.fixtureState)
			.where(eq(schema.fixtureState.fixtureId, untouched.id));
		expect(none).toBeUndefined();
	});

	it('names a fixture whose stored state was changed, and --fix writes the recomputed one', async () => {
		const f = await makeFixture();
		await ingest(reseats(f.code, 50, 4));
		const [row] = await db
			.select()
			.from(schema.fixtureState)
			.where(eq(schema.fixtureState.fixtureId, f.id));
		const good = row.data;
		await db
			.update(schema.fixtureState)
			.set({ data: { ...good, totalCycles: 99, cyclesSinceCleaning: 99 } })
			.where(eq(schema.fixtureState.fixtureId, f.id));

		const report = await rebuildStates();
		expect(report.differing).toEqual([
			{ fixtureId: f.id, code: f.code, fields: ['cyclesSinceCleaning', 'totalCycles'] }
		]);
		const fixed = await rebuildStates({ fix: true });
		expect(fixed.differing.map((d) => d.code)).toEqual([f.code]);
		const [after] = await db
			.select()
			.from(schema.fixtureState)
			.where(eq(schema.fixtureState.fixtureId, f.id));
		expect(after.data).toEqual(good);
		expect(after.totalCycles).toBe(4);
		expect((await rebuildStates()).differing).toEqual([]);
	});

	it('compares after a JSON round trip, field by field', () => {
		expect(differingFields({ a: 1, b: [1, 2] }, { b: [1, 2], a: 1 })).toEqual([]);
		expect(differingFields({ a: 1, b: { x: 1 } }, { a: 1, b: { x: 2 }, c: 3 })).toEqual(['b', 'c']);
		// undefined disappears in JSON, as it does in the stored column.
		expect(differingFields({ a: 1, u: undefined }, { a: 1 })).toEqual([]);
	});
});
