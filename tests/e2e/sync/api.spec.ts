import { randomUUID } from 'node:crypto';
import { expect, test, type APIRequestContext } from '@playwright/test';
import mysql from 'mysql2/promise';
import { generateFixtureCode } from '../../../src/lib/domain/fixture-code';
import { signInAs } from '../helpers/auth';

// The sync contract against the built app: sessions, envelopes and per-event answers over HTTP.

let fixtureCode: string;

/** A fixture of its own for this file, written straight into the test database. */
test.beforeAll(async () => {
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		const tag = randomUUID().slice(0, 8);
		const [site] = await conn.query<mysql.ResultSetHeader>(
			'INSERT INTO sites (name, created_at) VALUES (?, NOW(3))',
			[`Sync test site ${tag}`]
		);
		const [area] = await conn.query<mysql.ResultSetHeader>(
			'INSERT INTO areas (site_id, name, created_at) VALUES (?, ?, NOW(3))',
			[site.insertId, 'CMM lab']
		);
		const [location] = await conn.query<mysql.ResultSetHeader>(
			'INSERT INTO locations (area_id, name, created_at) VALUES (?, ?, NOW(3))',
			[area.insertId, 'Probe rack 2']
		);
		for (;;) {
			fixtureCode = generateFixtureCode();
			const [taken] = await conn.query<mysql.RowDataPacket[]>(
				'SELECT 1 FROM fixtures WHERE code = ?',
				[fixtureCode]
			);
			if (!taken.length) break;
		}
		await conn.query(
			`INSERT INTO fixtures (code, name, type, status, location_id, created_at, updated_at)
			 VALUES (?, ?, 'three-vee', 'in-service', ?, NOW(3), NOW(3))`,
			[fixtureCode, 'Sync test probe-rack mount', location.insertId]
		);
	} finally {
		await conn.end();
	}
});

const minutesAgo = (m: number) => new Date(Date.now() - m * 60_000).toISOString();

const reseat = (m: number) => ({
	id: randomUUID(),
	fixtureCode,
	kind: 'reseat',
	occurredAt: minutesAgo(m),
	payload: { readings: { dx: 0.3, dz: -0.1 } }
});

async function sync(request: APIRequestContext, body: unknown) {
	return request.post('/api/sync', {
		headers: { 'content-type': 'application/json' },
		// A Buffer is sent byte for byte (a string that is not JSON would be JSON-encoded).
		data: Buffer.from(typeof body === 'string' ? body : JSON.stringify(body))
	});
}

test('without a session the sync API answers 401 JSON', async ({ playwright, baseURL }) => {
	const api = await playwright.request.newContext({ baseURL });
	const response = await sync(api, { deviceId: 'p', events: [reseat(1)] });
	expect(response.status()).toBe(401);
	expect(response.headers()['content-type']).toContain('application/json');
	expect(await response.json()).toEqual({ error: expect.any(String) });
	await api.dispose();
});

test('an operator syncs a batch: accepted, a role refusal, then duplicates on a resend', async ({
	page
}) => {
	const account = await signInAs(page, 'operator');
	const first = reseat(3);
	const second = {
		id: randomUUID(),
		fixtureCode,
		kind: 'cleaning',
		occurredAt: minutesAgo(2),
		payload: { method: 'dry-wipe', relubricated: false }
	};
	const inspection = {
		id: randomUUID(),
		fixtureCode,
		kind: 'inspection',
		occurredAt: minutesAgo(1),
		payload: { contacts: [{ contact: 'ball 1', grade: 1 }], verdict: 'serviceable' }
	};
	const batch = { deviceId: `e2e-${randomUUID()}`, events: [first, second, inspection] };

	const response = await sync(page.request, batch);
	expect(response.status()).toBe(200);
	const body = await response.json();
	expect(body.results).toEqual([
		{ id: first.id, status: 'accepted' },
		{ id: second.id, status: 'accepted' },
		{
			id: inspection.id,
			status: 'rejected',
			error: 'Operators cannot log inspections; a technician, supervisor or admin can.'
		}
	]);
	expect(Number.isNaN(Date.parse(body.serverTime))).toBe(false);

	const again = await (await sync(page.request, batch)).json();
	expect(again.results.map((r: { status: string }) => r.status)).toEqual([
		'duplicate',
		'duplicate',
		'rejected'
	]);

	// The history shows each accepted event once, newest first, attributed to the operator.
	const history = await page.request.get(`/api/fixtures/${fixtureCode}/events?limit=200`);
	expect(history.status()).toBe(200);
	const { events } = await history.json();
	const ours = new Set<string>([first.id, second.id, inspection.id]);
	const mine = events.filter((e: { id: string }) => ours.has(e.id));
	expect(mine.map((e: { id: string }) => e.id)).toEqual([second.id, first.id]);
	expect(mine[0]).toMatchObject({
		kind: 'cleaning',
		deviceId: batch.deviceId,
		user: { email: account.email }
	});
});

test('a malformed envelope answers 400 with a message', async ({ page }) => {
	await signInAs(page, 'operator');
	const cases: [unknown, RegExp][] = [
		['{"deviceId": "p", "events": [', /not valid JSON/],
		[{ deviceId: 'p', events: 'all of them' }, /events must be an array/],
		[{ deviceId: 'p', events: [] }, /at least one event/],
		[{ events: [reseat(1)] }, /deviceId is required/],
		[{ deviceId: 'p', events: Array.from({ length: 501 }, () => reseat(1)) }, /at most 500 events/]
	];
	for (const [body, message] of cases) {
		const response = await sync(page.request, body);
		expect(response.status(), String(message)).toBe(400);
		expect(response.headers()['content-type']).toContain('application/json');
		expect((await response.json()).error).toMatch(message);
	}
});

test('a body over the 2 MB limit answers 400', async ({ page }) => {
	await signInAs(page, 'operator');
	const big = JSON.stringify({
		deviceId: 'p',
		events: [{ ...reseat(1), payload: { note: 'x'.repeat(2 * 1024 * 1024) } }]
	});
	const response = await sync(page.request, big);
	expect(response.status()).toBe(400);
	expect((await response.json()).error).toMatch(/larger than the limit of 2 MB/);
});

test('the event history needs a session and a known fixture', async ({
	page,
	playwright,
	baseURL
}) => {
	const api = await playwright.request.newContext({ baseURL });
	expect((await api.get(`/api/fixtures/${fixtureCode}/events`)).status()).toBe(401);
	await api.dispose();

	await signInAs(page, 'technician');
	const unknown = await page.request.get('/api/fixtures/NM-2222/events');
	expect(unknown.status()).toBe(404);
	expect(await unknown.json()).toEqual({ error: expect.any(String) });
	const bad = await page.request.get(`/api/fixtures/${fixtureCode}/events?limit=500`);
	expect(bad.status()).toBe(400);
});
