import { randomUUID } from 'node:crypto';
import { count } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Actor } from '$lib/server/guard';
import { SYNC_BODY_LIMIT_BYTES } from '$lib/server/ingest';
import { GET as getEvents } from '../../../src/routes/api/fixtures/[code]/events/+server';
import { POST as postSync } from '../../../src/routes/api/sync/+server';
import { closeDb, db, makeFixture, makeUser, resetDb, schema } from '../helpers/db';

// The endpoints called through their SvelteKit handlers with a request and the locals the auth
// hook would have set; the built app is exercised over HTTP by tests/e2e/sync/api.spec.ts.

beforeAll(resetDb);
afterAll(closeDb);

type Handler = (event: never) => Promise<Response> | Response;

function call(handler: Handler, user: Actor | null, request: Request, params = {}) {
	const event = { locals: { user }, request, params, url: new URL(request.url) };
	return handler(event as never);
}

function syncRequest(body: unknown, init: RequestInit = {}) {
	return new Request('http://127.0.0.1/api/sync', {
		method: 'POST',
		headers: { 'content-type': 'application/json' },
		body: typeof body === 'string' ? body : JSON.stringify(body),
		...init
	});
}

const reseat = (fixtureCode: string, minutesAgo = 5) => ({
	id: randomUUID(),
	fixtureCode,
	kind: 'reseat',
	occurredAt: new Date(Date.now() - minutesAgo * 60_000).toISOString(),
	payload: { readings: { dx: 0.4, dy: -0.2 } }
});

async function storedEvents(): Promise<number> {
	const [r] = await db.select({ n: count() }).from(schema.events);
	return r.n;
}

describe('POST /api/sync', () => {
	let tech: Actor;
	let code: string;

	beforeAll(async () => {
		tech = await makeUser({ roles: ['technician'] });
		code = (await makeFixture()).code;
	});

	it('answers 401 in JSON without a session, and stores nothing', async () => {
		const res = await call(postSync, null, syncRequest({ deviceId: 'p', events: [reseat(code)] }));
		expect(res.status).toBe(401);
		expect(await res.json()).toEqual({ error: expect.any(String) });
		expect(await storedEvents()).toBe(0);
	});

	it('answers 200 with one result per event and the server time', async () => {
		const events = [reseat(code, 3), { ...reseat(code, 2), kind: 'inspection' }, reseat(code, 1)];
		const before = Date.now();
		const res = await call(postSync, tech, syncRequest({ deviceId: 'phone-1', events }));
		expect(res.status).toBe(200);
		const body = await res.json();
		expect(body.results).toEqual([
			{ id: events[0].id, status: 'accepted' },
			{ id: events[1].id, status: 'rejected', error: expect.stringMatching(/^Invalid event/) },
			{ id: events[2].id, status: 'accepted' }
		]);
		expect(Date.parse(body.serverTime)).toBeGreaterThanOrEqual(before - 1000);

		const again = await call(postSync, tech, syncRequest({ deviceId: 'phone-1', events }));
		expect((await again.json()).results.map((r: { status: string }) => r.status)).toEqual([
			'duplicate',
			'rejected',
			'duplicate'
		]);
	});

	const malformed: [string, string | object, RegExp][] = [
		['a body that is not JSON', '{"deviceId": "p", "events": [', /not valid JSON/],
		['an empty body', '', /empty/],
		['a JSON array', [reseat('NM-2222')], /JSON object/],
		['a JSON string', '"hello"', /JSON object/],
		[
			'events that are not an array',
			{ deviceId: 'p', events: { 0: {} } },
			/events must be an array/
		],
		['no events at all', { deviceId: 'p', events: [] }, /at least one event/],
		['a missing deviceId', { events: [{}] }, /deviceId is required/],
		['an unknown envelope field', { deviceId: 'p', events: [{}], extra: 1 }, /extra/]
	];
	for (const [what, body, message] of malformed) {
		it(`answers 400 in JSON for ${what}`, async () => {
			const res = await call(postSync, tech, syncRequest(body));
			expect(res.status).toBe(400);
			expect((await res.json()).error).toMatch(message);
		});
	}

	it('answers 400 for 501 events and stores none of them', async () => {
		const before = await storedEvents();
		const events = Array.from({ length: 501 }, () => reseat(code));
		const res = await call(postSync, tech, syncRequest({ deviceId: 'p', events }));
		expect(res.status).toBe(400);
		expect((await res.json()).error).toMatch(/at most 500 events/);
		expect(await storedEvents()).toBe(before);
	});

	it('accepts 500 events in one request', async () => {
		const events = Array.from({ length: 500 }, (_, i) => reseat(code, 600 - i));
		const res = await call(postSync, tech, syncRequest({ deviceId: 'p', events }));
		expect(res.status).toBe(200);
		const { results } = await res.json();
		expect(results.filter((r: { status: string }) => r.status === 'accepted')).toHaveLength(500);
	});

	it('rejects alone an event whose text is not valid Unicode, and stores the other 100', async () => {
		const before = await storedEvents();
		const good = Array.from({ length: 100 }, (_, i) => reseat(code, 2000 - i));
		const bad = {
			id: randomUUID(),
			fixtureCode: code,
			kind: 'note',
			occurredAt: new Date(Date.now() - 60_000).toISOString(),
			payload: { text: 'seat 2 chipped \ud800 see photo' }
		};
		// JSON.stringify writes the lone surrogate as the escape "\ud800", as a phone's would.
		const body = JSON.stringify({
			deviceId: 'p',
			events: [...good.slice(0, 50), bad, ...good.slice(50)]
		});
		expect(body).toContain('\\ud800');
		const res = await call(postSync, tech, syncRequest(body));
		expect(res.status).toBe(200);
		const { results } = await res.json();
		expect(results).toHaveLength(101);
		expect(results[50]).toEqual({
			id: bad.id,
			status: 'rejected',
			error: expect.stringMatching(/payload\.text: Text contains text that is not valid Unicode/)
		});
		const accepted = results.filter((r: { status: string }) => r.status === 'accepted');
		expect(accepted).toHaveLength(100);
		expect(await storedEvents()).toBe(before + 100);
	});

	it('answers 400 for a body over the size limit, by its declared length or its real size', async () => {
		const big = JSON.stringify({
			deviceId: 'p',
			events: [{ ...reseat(code), payload: { pad: 'x'.repeat(SYNC_BODY_LIMIT_BYTES) } }]
		});
		const declared = await call(
			postSync,
			tech,
			syncRequest(big, { headers: { 'content-length': String(big.length) } })
		);
		expect(declared.status).toBe(400);
		expect((await declared.json()).error).toMatch(/larger than the limit of 2 MB/);

		// Streamed without a length: counted while reading.
		const bytes = new TextEncoder().encode(big);
		const stream = new ReadableStream<Uint8Array>({
			start(controller) {
				for (let i = 0; i < bytes.length; i += 64 * 1024)
					controller.enqueue(bytes.slice(i, i + 64 * 1024));
				controller.close();
			}
		});
		const streamed = await call(
			postSync,
			tech,
			new Request('http://127.0.0.1/api/sync', {
				method: 'POST',
				body: stream,
				duplex: 'half'
			} as RequestInit)
		);
		expect(streamed.status).toBe(400);
		expect((await streamed.json()).error).toMatch(/larger than the limit/);

		// The adapter's own limit (BODY_SIZE_LIMIT) ends the stream with a 413 error: still 400 JSON.
		const cut = new ReadableStream<Uint8Array>({
			start(controller) {
				controller.enqueue(bytes.slice(0, 1024));
				controller.error(Object.assign(new Error('Payload Too Large'), { status: 413 }));
			}
		});
		const limited = await call(
			postSync,
			tech,
			new Request('http://127.0.0.1/api/sync', {
				method: 'POST',
				body: cut,
				duplex: 'half'
			} as RequestInit)
		);
		expect(limited.status).toBe(400);
		expect((await limited.json()).error).toMatch(/larger than the server accepts/);
	});
});

describe('GET /api/fixtures/[code]/events', () => {
	let op: Actor;
	let fixture: Awaited<ReturnType<typeof makeFixture>>;
	let posted: ReturnType<typeof reseat>[];

	const get = (user: Actor | null, fixtureCode: string, query = '') =>
		call(
			getEvents,
			user,
			new Request(`http://127.0.0.1/api/fixtures/${fixtureCode}/events${query}`),
			{ code: fixtureCode }
		);

	beforeAll(async () => {
		op = await makeUser({
			roles: ['operator'],
			name: 'Ines Marlow',
			email: 'ines@larchmere.example'
		});
		fixture = await makeFixture();
		posted = Array.from({ length: 60 }, (_, i) => reseat(fixture.code, 120 - i));
		const res = await call(postSync, op, syncRequest({ deviceId: 'phone-9', events: posted }));
		expect(res.status).toBe(200);
	});

	it('answers 401 without a session', async () => {
		expect((await get(null, fixture.code)).status).toBe(401);
	});

	it('answers 404 for an unknown or malformed code', async () => {
		expect((await get(op, 'NM-2222')).status).toBe(404);
		const res = await get(op, 'not-a-code');
		expect(res.status).toBe(404);
		expect(await res.json()).toEqual({ error: expect.stringMatching(/No fixture/) });
	});

	it('gives the newest 50 by default, newest first, with who and when', async () => {
		const res = await get(op, fixture.code.toLowerCase());
		expect(res.status).toBe(200);
		const body = await res.json();
		expect(body.fixture).toEqual({ code: fixture.code, name: fixture.name });
		expect(body.events).toHaveLength(50);
		const times = body.events.map((e: { occurredAt: string }) => Date.parse(e.occurredAt));
		expect(times).toEqual([...times].sort((a, b) => b - a));
		expect(body.events[0]).toMatchObject({
			kind: 'reseat',
			deviceId: 'phone-9',
			payload: { cycles: 1, readings: { dx: 0.4, dy: -0.2 } },
			user: { id: op.id, name: 'Ines Marlow', email: 'ines@larchmere.example' }
		});
		expect(Date.parse(body.events[0].receivedAt)).toBeGreaterThanOrEqual(times[0]);
	});

	it('honours limit from 1 to 200 and refuses anything else', async () => {
		expect((await (await get(op, fixture.code, '?limit=5')).json()).events).toHaveLength(5);
		expect((await (await get(op, fixture.code, '?limit=200')).json()).events).toHaveLength(60);
		for (const bad of ['0', '201', 'ten', '2.5', '-1']) {
			const res = await get(op, fixture.code, `?limit=${bad}`);
			expect(res.status, `limit=${bad}`).toBe(400);
			expect((await res.json()).fields.limit[0]).toMatch(/limit/);
		}
	});

	it('gives an empty history for a fixture with no events', async () => {
		const quiet = await makeFixture();
		const body = await (await get(op, quiet.code)).json();
		expect(body.events).toEqual([]);
	});

	it('lists only the fixture asked for', async () => {
		const other = await makeFixture();
		const theirs = reseat(other.code, 1);
		await call(postSync, op, syncRequest({ deviceId: 'phone-9', events: [theirs] }));
		const body = await (await get(op, fixture.code, '?limit=200')).json();
		const ids = body.events.map((e: { id: string }) => e.id).sort();
		expect(ids).toEqual(posted.map((e) => e.id).sort());
	});
});
