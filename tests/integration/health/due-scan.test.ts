import { randomUUID } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { dueScanIntervalMs, runDueScan, startDueScan, stopDueScan } from '$lib/server/due-scan';
import type { Actor } from '$lib/server/guard';
import { evaluateDueFlags } from '$lib/server/health';
import { ingestBatch } from '$lib/server/ingest';
import { closeDb, db, makeFixture, makeUser, resetDb, schema } from '../helpers/db';

beforeAll(resetDb);
afterAll(closeDb);
afterEach(stopDueScan);

const DAY = 86_400_000;
const daysAgo = (d: number) => new Date(Date.now() - d * DAY);

const cleaning = (fixtureCode: string, occurredAt: Date) => ({
	id: randomUUID(),
	fixtureCode,
	kind: 'cleaning',
	occurredAt: occurredAt.toISOString(),
	payload: { method: 'dry-wipe', relubricated: false }
});

async function flagsOf(fixtureId: number, kind: 'cleaning-due' | 'inspection-due') {
	return db
		.select()
		.from(schema.flags)
		.where(and(eq(schema.flags.fixtureId, fixtureId), eq(schema.flags.kind, kind)));
}

/** A fixture on the default policy (30-day cleaning interval) cleaned `days` ago, synced then. */
async function cleanedDaysAgo(tech: Actor, days: number) {
	const f = await makeFixture();
	const at = daysAgo(days);
	const results = await ingestBatch(tech, 'phone-1', [cleaning(f.code, at)], { now: at });
	expect(results[0].status).toBe('accepted');
	expect(await flagsOf(f.id, 'cleaning-due')).toEqual([]);
	return f;
}

describe('calendar flags', () => {
	let tech: Actor;
	beforeAll(async () => {
		tech = await makeUser({ roles: ['technician'] });
	});

	it('raises cleaning due 40 days after a cleaning on a 30-day interval; a cleaning clears it', async () => {
		const f = await cleanedDaysAgo(tech, 40);
		const recent = await cleanedDaysAgo(tech, 10);

		const changes = await evaluateDueFlags();
		expect(changes.find((c) => c.fixtureId === f.id)?.raised).toEqual(['cleaning-due']);
		expect(changes.find((c) => c.fixtureId === recent.id)).toBeUndefined();
		const [flag] = await flagsOf(f.id, 'cleaning-due');
		expect(flag.clearedAt).toBeNull();
		expect(flag.raisedByEventId).toBeNull();
		expect(flag.reason).toMatch(
			/^Cleaning due: 40 days since the last cleaning on .+ \(interval 30 days\)\.$/
		);
		expect(flag.figures).toMatchObject({ daysSince: 40, intervalDays: 30 });

		// A second scan changes nothing: one open flag, not two.
		expect((await evaluateDueFlags()).find((c) => c.fixtureId === f.id)).toBeUndefined();
		expect(await flagsOf(f.id, 'cleaning-due')).toHaveLength(1);

		const clean = cleaning(f.code, new Date(Date.now() - 60_000));
		await ingestBatch(tech, 'phone-1', [clean]);
		const [cleared] = await flagsOf(f.id, 'cleaning-due');
		expect(cleared.clearedAt).not.toBeNull();
		expect(cleared.clearedByEventId).toBe(clean.id);
		expect(await flagsOf(recent.id, 'cleaning-due')).toEqual([]);
	});

	it('the scheduled job in the process raises the flag on its own', async () => {
		const f = await cleanedDaysAgo(tech, 35);
		const logged: unknown[] = [];
		const log = console.log;
		console.log = (...args: unknown[]) => logged.push(args);
		let open: Awaited<ReturnType<typeof flagsOf>> = [];
		try {
			expect(startDueScan({ intervalMs: 100 })).toBe(true);
			expect(startDueScan({ intervalMs: 100 })).toBe(false);
			// Polls the flag (not a fixed wait): the job raises it on its first run.
			await vi.waitFor(
				async () => {
					open = await flagsOf(f.id, 'cleaning-due');
					expect(open).toHaveLength(1);
				},
				{ timeout: 20_000, interval: 100 }
			);
			expect(open[0].reason).toContain('35 days since the last cleaning');
			// Later runs leave the one open flag as it is: wait for one (it joins the job's if under way).
			await runDueScan();
			await runDueScan();
			expect(await flagsOf(f.id, 'cleaning-due')).toEqual(open);
		} finally {
			stopDueScan();
			console.log = log;
		}
		expect(logged).toEqual([['due scan: 1 calendar flag(s) raised']]);
	});

	it('joins a scan already under way instead of starting a second', async () => {
		const a = runDueScan();
		const b = runDueScan();
		expect(a).toBe(b);
		await a;
	});

	it('reads the interval from NESTMARK_DUE_SCAN_MINUTES', () => {
		expect(dueScanIntervalMs({})).toBe(15 * 60_000);
		expect(dueScanIntervalMs({ NESTMARK_DUE_SCAN_MINUTES: '5' })).toBe(5 * 60_000);
		expect(dueScanIntervalMs({ NESTMARK_DUE_SCAN_MINUTES: '0' })).toBeNull();
		expect(() => dueScanIntervalMs({ NESTMARK_DUE_SCAN_MINUTES: 'often' })).toThrow(
			/must be a number of minutes/
		);
	});
});
