import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runPayload, runVerdict, type RunCycle } from '$lib/domain/break-in-run';
import { DEFAULT_POLICY } from '$lib/domain/policy';
import { registerSnapshotSchema, type SnapshotFixture } from '$lib/schemas/register-snapshot';
import type { Actor } from '$lib/server/guard';
import { ingestBatch } from '$lib/server/ingest';
import { GET as getHealth } from '../../../src/routes/api/fixtures/[code]/health/+server';
import { GET as getSnapshot } from '../../../src/routes/api/register-snapshot/+server';
import { closeDb, makeFixture, makeUser, resetDb } from '../helpers/db';

// A break-in run as the phone judges it (runVerdict on the register snapshot's progress and
// rule) against what the server then does with the same event (ingest, flags). Policy numbers
// are the defaults (spec 1 µm, settling windows of 10, tolerance 0.1 µm, at least 30 cycles).

beforeAll(resetDb);
afterAll(closeDb);

let tech: Actor;
let clock = Date.now() - 86_400_000;
const ev = (fixtureCode: string, kind: string, payload: object) => ({
	id: randomUUID(),
	fixtureCode,
	kind,
	occurredAt: new Date((clock += 60_000)).toISOString(),
	payload
});
async function ingest(...events: ReturnType<typeof ev>[]) {
	const results = await ingestBatch(tech, 'phone-1', events);
	expect(results.map((r) => r.status)).toEqual(events.map(() => 'accepted'));
}

async function snapshotOf(code: string): Promise<SnapshotFixture> {
	const request = new Request(`http://127.0.0.1/api/register-snapshot?code=${code}`);
	const res = await getSnapshot({
		locals: { user: tech },
		request,
		params: {},
		url: new URL(request.url)
	} as never);
	expect(res.status).toBe(200);
	return registerSnapshotSchema.parse(await res.json()).fixtures[0];
}

async function openFlags(code: string): Promise<{ kind: string; reason: string }[]> {
	const url = new URL(`http://127.0.0.1/api/fixtures/${code}/health`);
	const res = await getHealth({ locals: { user: tech }, params: { code }, url } as never);
	expect(res.status).toBe(200);
	return (await res.json()).flags.open;
}

/** The phone's verdict on `run` from the device's copy of the fixture. */
async function phoneVerdict(code: string, run: RunCycle[]) {
	const { breakIn } = await snapshotOf(code);
	expect(breakIn).toBeDefined();
	return runVerdict(breakIn!, breakIn!.rule, run);
}

// Ten readings ±0.1 µm: R = 4·√(10·0.01/9) = 0.42 µm per window (ISO 230-2 style R = 4s).
const steady = (n: number): RunCycle[] =>
	Array.from({ length: n }, (_, i) => ({ dx: i % 2 ? -0.1 : 0.1, dy: i % 2 ? 0.1 : -0.1 }));

describe('break-in runs from the phone', () => {
	beforeAll(async () => {
		tech = await makeUser({ roles: ['technician'] });
	});

	it('the snapshot carries a new fixture’s progress and the rule its policy resolves to', async () => {
		const plain = await makeFixture();
		const strict = await makeFixture({ policyOverrides: { breakInMinCycles: 25 } });
		expect((await snapshotOf(plain.code)).breakIn).toEqual({
			required: true,
			reason: 'new',
			cycles: 0,
			acc: [0, 0, 0, 0, 0, 0, 0, 0, 0, 0],
			windows: [],
			rule: {
				repeatabilitySpec_um: DEFAULT_POLICY.repeatabilitySpec_um,
				breakInMinCycles: DEFAULT_POLICY.breakInMinCycles,
				settleWindow: DEFAULT_POLICY.settleWindow,
				settleTolerance_um: DEFAULT_POLICY.settleTolerance_um
			}
		});
		expect((await snapshotOf(strict.code)).breakIn!.rule.breakInMinCycles).toBe(25);
	});

	it('phone and server agree run by run, continuing the progress between runs', async () => {
		const f = await makeFixture();
		// 25 steady cycles: two equal windows, but short of the 30-cycle minimum.
		const first = steady(25);
		const v1 = await phoneVerdict(f.code, first);
		expect(v1).toMatchObject({ settled: false, cycles: 25, moreCycles: 5, moreReadings: 0 });
		await ingest(ev(f.code, 'break-in', runPayload(first)));
		expect((await openFlags(f.code)).map((x) => x.kind)).toEqual(['break-in-due']);
		expect((await snapshotOf(f.code)).breakIn).toMatchObject({ required: true, cycles: 25 });

		// Five more cycles without readings reach the minimum: the phone says settled, and so does the server.
		const second: RunCycle[] = [null, null, null, null, null];
		const v2 = await phoneVerdict(f.code, second);
		expect(v2).toMatchObject({ settled: true, cyclesBefore: 25, cycles: 30 });
		await ingest(ev(f.code, 'break-in', runPayload(second, 'second session')));
		expect(await openFlags(f.code)).toEqual([]);
		expect((await snapshotOf(f.code)).breakIn!.required).toBe(false);
	});

	it('a relubricating cleaning and a part swap each start a new requirement', async () => {
		const f = await makeFixture({ policyOverrides: { breakInMinCycles: 20 } });
		await ingest(ev(f.code, 'break-in', runPayload(steady(20))));
		expect(await openFlags(f.code)).toEqual([]);

		await ingest(
			ev(f.code, 'cleaning', {
				method: 'solvent-wipe',
				relubricated: true,
				lubricant: 'instrument oil'
			})
		);
		const [lube] = await openFlags(f.code);
		expect(lube.kind).toBe('break-in-due');
		expect(lube.reason).toMatch(/^After relubrication: break-in required — 0 of at least 20/);
		expect((await snapshotOf(f.code)).breakIn).toMatchObject({
			required: true,
			reason: 'relubricated',
			cycles: 0,
			windows: []
		});
		expect(await phoneVerdict(f.code, steady(19))).toMatchObject({ settled: false });
		const run = steady(20);
		expect(await phoneVerdict(f.code, run)).toMatchObject({ settled: true });
		await ingest(ev(f.code, 'break-in', runPayload(run)));
		expect(await openFlags(f.code)).toEqual([]);

		await ingest(ev(f.code, 'part-swap', { replaced: ['balls'] }));
		expect((await openFlags(f.code))[0].reason).toMatch(/^After a part swap: break-in required/);
		expect((await snapshotOf(f.code)).breakIn).toMatchObject({
			required: true,
			reason: 'part-swap',
			cycles: 0
		});
	});
});
