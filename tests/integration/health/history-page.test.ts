import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { breakInCurve } from '$lib/domain/break-in-curves';
import { DEFAULT_POLICY } from '$lib/domain/policy';
import { historyCursor } from '$lib/schemas/history-query';
import { fixtureHealth } from '$lib/server/health-report';
import { fixtureTimeline } from '$lib/server/history';
import { ingestBatch } from '$lib/server/ingest';
import { closeDb, makeFixture, makeUser, resetDb } from '../helpers/db';

// The fixture page's history (kinds, pages) and its past break-in runs, on real ingested events.

beforeAll(resetDb);
afterAll(closeDb);

const start = Date.now() - 10 * 86_400_000;
const at = (minutes: number) => new Date(start + minutes * 60_000).toISOString();

describe('fixture history page', () => {
	it('pages a history newest first, by kind, with each page older than the one before', async () => {
		const tech = await makeUser({ roles: ['technician'] });
		const f = await makeFixture();
		const events = Array.from({ length: 12 }, (_, i) => ({
			id: randomUUID(),
			fixtureCode: f.code,
			kind: i % 3 === 0 ? 'note' : 'reseat',
			// Two events share each minute, so the id must break the tie between pages.
			occurredAt: at(Math.floor(i / 2)),
			payload: i % 3 === 0 ? { text: `note ${i}` } : { cycles: 1 }
		}));
		const results = await ingestBatch(tech, 'test', events);
		expect(results.every((r) => r.status === 'accepted')).toBe(true);

		const seen: string[] = [];
		let before: string | undefined;
		for (let page = 0; page < 4; page++) {
			const p = await fixtureTimeline(f.id, { limit: 5, before });
			seen.push(...p.events.map((e) => e.id));
			expect(p.kinds).toEqual({ note: 4, reseat: 8 });
			if (!p.older) break;
			expect(p.older).toBe(historyCursor(p.events[4]));
			before = p.older;
		}
		// Every event once, newest first (time, then id, descending).
		const expected = events
			.map((e) => ({ id: e.id.toLowerCase(), t: e.occurredAt }))
			.sort((a, b) => (a.t !== b.t ? (a.t < b.t ? 1 : -1) : a.id < b.id ? 1 : -1))
			.map((e) => e.id);
		expect(seen).toEqual(expected);

		const notes = await fixtureTimeline(f.id, { kind: 'note', limit: 10 });
		expect(notes.events.map((e) => e.kind)).toEqual(['note', 'note', 'note', 'note']);
		expect(notes.older).toBeNull();
		expect(notes.events[0].user.name).toBe(tech.name);
	});

	it('gives each past break-in run its rolling R against the spec', async () => {
		const tech = await makeUser({ roles: ['technician'] });
		const f = await makeFixture({ repeatabilitySpec_um: 1 });
		const readings = Array.from({ length: 12 }, (_, i) => ({
			dx: Number((0.05 * Math.cos(i) * (12 - i)).toFixed(3))
		}));
		await ingestBatch(tech, 'test', [
			{
				id: randomUUID(),
				fixtureCode: f.code,
				kind: 'break-in',
				occurredAt: at(1),
				payload: { cycles: 24, readings }
			},
			{
				id: randomUUID(),
				fixtureCode: f.code,
				kind: 'break-in',
				occurredAt: at(2),
				payload: { cycles: 5 }
			}
		]);
		const h = await fixtureHealth(f.code);
		// The run without readings draws nothing; the other is the domain's curve for the policy.
		expect(h!.series.breakInRuns).toHaveLength(1);
		const run = h!.series.breakInRuns[0];
		expect(run).toMatchObject({ cycles: 24, readings: 12, window: DEFAULT_POLICY.settleWindow });
		const curve = breakInCurve(readings, 24, DEFAULT_POLICY.settleWindow, 1);
		expect(run.points).toEqual(curve.points);
		expect(run.points.map((p) => p.cycle)).toEqual([20, 22, 24]);
	});
});
