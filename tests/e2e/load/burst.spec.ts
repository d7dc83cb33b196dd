import { spawn, type ChildProcess } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { createServer, type AddressInfo } from 'node:net';
import { expect, test, type APIRequestContext, type PlaywrightWorkerArgs } from '@playwright/test';
import mysql from 'mysql2/promise';
import { generateFixtureCode } from '../../../src/lib/domain/fixture-code';
import { demoAccounts } from '../helpers/auth';

type Playwright = PlaywrightWorkerArgs['playwright'];

/*
 * A shift change: 30 phones, each with its own session and device id, send 3 batches of 50 events
 * each at the same moment. Every batch must be answered — 200, or 503 with Retry-After and then
 * 200 on the retry — every event stored exactly once, the health check answering 200 all along,
 * and the stored state equal to a fold of the history. Loopback only; bounded in requests
 * (RETRY_LIMIT per batch) and time (each test's timeout).
 *
 * The second test sends a smaller burst (10 of the phones) to a second server whose pool is tiny,
 * so the 503 path is certain to be taken: the refusals must carry Retry-After and JSON, and the
 * retries must store every event once.
 *
 * Timeouts here only stop a hang; nothing is asserted about speed (that is `npm run bench`'s
 * business). The figures are printed for the record.
 */

const PHONES = 30;
/** Phones in the burst against the small-pool server. */
const SMALL_POOL_PHONES = 10;
const BATCHES_PER_PHONE = 3;
const EVENTS_PER_BATCH = 50;
const FIXTURES = 10;
/** Attempts per batch before the test gives up on it (the first send included). */
const RETRY_LIMIT = 40;
/** The longest Retry-After the test will honour, s (the server's are a few seconds). */
const LONGEST_PAUSE_S = 10;

test.describe.configure({ mode: 'serial' });

/** Roles that may log reseats, cleanings and notes; phones take them in turn. */
const LOGGING_ROLES = new Set(['operator', 'technician', 'supervisor', 'admin']);

let fixtureCodes: string[] = [];

/** Fixtures of their own for this file (several types, so several policies), straight into the DB. */
test.beforeAll(async () => {
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		const tag = randomUUID().slice(0, 8);
		const [site] = await conn.query<mysql.ResultSetHeader>(
			'INSERT INTO sites (name, created_at) VALUES (?, NOW(3))',
			[`Burst test site ${tag}`]
		);
		const [area] = await conn.query<mysql.ResultSetHeader>(
			'INSERT INTO areas (site_id, name, created_at) VALUES (?, ?, NOW(3))',
			[site.insertId, 'Cell 4']
		);
		const [location] = await conn.query<mysql.ResultSetHeader>(
			'INSERT INTO locations (area_id, name, created_at) VALUES (?, ?, NOW(3))',
			[area.insertId, 'Pallet changer']
		);
		const types = ['three-vee', 'trihedral-vee-flat', 'pallet', 'vise', 'plate'];
		fixtureCodes = [];
		while (fixtureCodes.length < FIXTURES) {
			const code = generateFixtureCode();
			const [taken] = await conn.query<mysql.RowDataPacket[]>(
				'SELECT 1 FROM fixtures WHERE code = ?',
				[code]
			);
			if (taken.length || fixtureCodes.includes(code)) continue;
			const i = fixtureCodes.length;
			await conn.query(
				`INSERT INTO fixtures (code, name, type, status, location_id, repeatability_spec_um,
				   created_at, updated_at)
				 VALUES (?, ?, ?, 'in-service', ?, ?, NOW(3), NOW(3))`,
				[
					code,
					`Burst fixture ${i + 1}`,
					types[i % types.length],
					location.insertId,
					i % 3 ? null : 3
				]
			);
			fixtureCodes.push(code);
		}
	} finally {
		await conn.end();
	}
});

test.beforeAll(async ({ playwright }) => {
	test.setTimeout(120_000);
	// The app's own origin (playwright.config.ts puts the test environment in process.env).
	phones = await signInPhones(playwright, process.env.ORIGIN!);
});

test.afterAll(async () => {
	await Promise.all(phones.map((p) => p.api.dispose()));
	phones = [];
});

/** One simulated phone: a signed-in API context, a device id and the batches it sends. */
interface Phone {
	api: APIRequestContext;
	deviceId: string;
	batches: Record<string, unknown>[][];
}

/** The signed-in phones, shared by the tests (each test gives them new batches). */
let phones: Phone[] = [];

/** Signs a fresh API context in with e-mail and password, as the sign-in form does. */
async function signedInContext(
	playwright: Playwright,
	baseURL: string,
	account: { email: string; password: string }
): Promise<APIRequestContext> {
	const api = await playwright.request.newContext({ baseURL });
	// SvelteKit refuses form posts from another origin; Auth.js's callback is one.
	const res = await api.post('/auth/callback/credentials', {
		headers: { origin: baseURL },
		form: { email: account.email, password: account.password, redirectTo: '/' },
		maxRedirects: 0
	});
	expect(res.status(), 'sign-in answers with a redirect').toBeLessThan(400);
	const state = await api.storageState();
	expect(
		state.cookies.some((c) => /session-token/.test(c.name)),
		`a session for ${account.email}`
	).toBe(true);
	return api;
}

/** 3 batches × 50 events for phone `p`: mostly reseats, some cleanings and notes, in the past. */
function batchesFor(p: number): Record<string, unknown>[][] {
	const now = Date.now();
	return Array.from({ length: BATCHES_PER_PHONE }, (_, b) =>
		Array.from({ length: EVENTS_PER_BATCH }, (_, i) => {
			const n = b * EVENTS_PER_BATCH + i;
			// Every fifth event on the fixture every phone shares (its state row is contended);
			// the rest on the phone's own. Times interleave across phones, so batches arrive late
			// for each other and the server refolds from history as well as incrementally.
			const fixtureCode = fixtureCodes[n % 5 === 0 ? 0 : 1 + (p % (FIXTURES - 1))];
			const occurredAt = new Date(now - 6 * 3_600_000 + (n * PHONES + p) * 1_000).toISOString();
			const base = { id: randomUUID(), fixtureCode, occurredAt };
			if (n % 37 === 36) {
				return {
					...base,
					kind: 'cleaning',
					payload: { method: 'dry-wipe', relubricated: false }
				};
			}
			if (n % 41 === 40) {
				return { ...base, kind: 'note', payload: { text: `Phone ${p}: chip on the pallet` } };
			}
			return {
				...base,
				kind: 'reseat',
				payload: { readings: { dx: ((p + n) % 9) * 0.1 - 0.4, dz: ((p * n) % 7) * 0.05 } }
			};
		})
	);
}

/** What the burst saw. */
interface BurstFigures {
	requests: number;
	refusals: number;
	retryAfters: number[];
	accepted: number;
	duplicates: number;
	slowestMs: number;
	wallMs: number;
}

/**
 * Sends every phone's batches at once to `origin`; a 503 must carry Retry-After and a JSON error,
 * and the batch is sent again after that pause. Returns what happened; fails on anything else.
 */
async function burst(phones: Phone[], origin: string): Promise<BurstFigures> {
	const figures: BurstFigures = {
		requests: 0,
		refusals: 0,
		retryAfters: [],
		accepted: 0,
		duplicates: 0,
		slowestMs: 0,
		wallMs: 0
	};
	const started = performance.now();
	const sendBatch = async (phone: Phone, events: Record<string, unknown>[]) => {
		for (let attempt = 1; ; attempt++) {
			const t0 = performance.now();
			const res = await phone.api.post(`${origin}/api/sync`, {
				headers: { 'content-type': 'application/json', accept: 'application/json' },
				data: { deviceId: phone.deviceId, events },
				timeout: 60_000
			});
			figures.requests++;
			figures.slowestMs = Math.max(figures.slowestMs, performance.now() - t0);
			if (res.status() === 200) {
				const { results } = (await res.json()) as { results: { id: string; status: string }[] };
				expect(results.map((r) => r.id)).toEqual(events.map((e) => e.id));
				for (const r of results) {
					expect(['accepted', 'duplicate']).toContain(r.status);
					if (r.status === 'accepted') figures.accepted++;
					else figures.duplicates++;
				}
				return;
			}
			expect(res.status(), `batch answered 200 or 503, got ${res.status()}`).toBe(503);
			figures.refusals++;
			const retryAfter = res.headers()['retry-after'];
			expect(retryAfter, '503 carries Retry-After in seconds').toMatch(/^[1-9][0-9]*$/);
			expect(res.headers()['content-type']).toContain('application/json');
			expect(await res.json()).toEqual({ error: expect.any(String) });
			figures.retryAfters.push(Number(retryAfter));
			expect(attempt, 'a batch got through within the retry limit').toBeLessThan(RETRY_LIMIT);
			await new Promise((r) => setTimeout(r, Math.min(Number(retryAfter), LONGEST_PAUSE_S) * 1000));
		}
	};
	await Promise.all(phones.flatMap((phone) => phone.batches.map((b) => sendBatch(phone, b))));
	figures.wallMs = performance.now() - started;
	return figures;
}

/**
 * Polls /api/health (without a session, as a load balancer does) every 250 ms until `done`
 * settles; every answer must be 200 with the database up. Returns how many answers came.
 */
async function healthAllAlong(
	playwright: Playwright,
	origin: string,
	done: Promise<unknown>
): Promise<{ checks: number; slowestMs: number }> {
	const api = await playwright.request.newContext();
	let finished = false;
	void done.finally(() => (finished = true)).catch(() => undefined);
	let checks = 0;
	let slowestMs = 0;
	try {
		while (!finished) {
			const t0 = performance.now();
			// Generous: only a hang fails here. Under a burst on a 2-core machine the answer waits
			// for the server's turn, not for the database.
			const res = await api.get(`${origin}/api/health`, { timeout: 30_000 });
			slowestMs = Math.max(slowestMs, performance.now() - t0);
			expect(res.status(), 'health during the burst').toBe(200);
			expect(await res.json()).toMatchObject({ app: 'ok', database: 'ok' });
			checks++;
			await new Promise((r) => setTimeout(r, 250));
		}
		const after = await api.get(`${origin}/api/health`);
		expect(after.status(), 'health after the burst').toBe(200);
		expect(await after.json()).toMatchObject({ database: 'ok', pool: { waiting: 0 } });
	} finally {
		await api.dispose();
	}
	return { checks, slowestMs };
}

/** Every event of the phones is stored exactly once, with its device. */
async function expectStoredOnce(phones: Phone[]): Promise<void> {
	const ids = phones.flatMap((p) => p.batches.flat().map((e) => String(e.id)));
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		const [[row]] = await conn.query<mysql.RowDataPacket[]>(
			'SELECT COUNT(*) AS n, COUNT(DISTINCT id) AS distinct_ids FROM events WHERE id IN (?)',
			[ids]
		);
		expect(Number(row.n)).toBe(ids.length);
		expect(Number(row.distinct_ids)).toBe(ids.length);
		const [[byDevice]] = await conn.query<mysql.RowDataPacket[]>(
			'SELECT COUNT(*) AS n FROM events WHERE device_id IN (?)',
			[phones.map((p) => p.deviceId)]
		);
		expect(Number(byDevice.n)).toBe(ids.length);
	} finally {
		await conn.end();
	}
}

/** `npm run state:rebuild` on the test database (what `npm test` runs last): no difference. */
async function expectStateEqualsRebuild(): Promise<void> {
	const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/state-rebuild.ts'], {
		env: process.env,
		stdio: ['ignore', 'pipe', 'pipe']
	});
	let output = '';
	child.stdout!.on('data', (d) => (output += d));
	child.stderr!.on('data', (d) => (output += d));
	const code = await new Promise<number | null>((resolve) => child.on('close', resolve));
	expect(output).toMatch(/fixtures checked, 0 differed/);
	expect(code, output).toBe(0);
}

/** Signs in PHONES phones (the demo accounts that may log, in turn), a few at a time. */
async function signInPhones(playwright: Playwright, baseURL: string): Promise<Phone[]> {
	const accounts = demoAccounts().filter((a) => LOGGING_ROLES.has(a.role));
	const out: Phone[] = [];
	for (let p = 0; p < PHONES; p += 5) {
		const group = await Promise.all(
			Array.from({ length: Math.min(5, PHONES - p) }, (_, k) =>
				signedInContext(playwright, baseURL, accounts[(p + k) % accounts.length])
			)
		);
		for (const api of group) out.push({ api, deviceId: `burst-${randomUUID()}`, batches: [] });
	}
	return out;
}

/** Gives each phone new batches (new event ids) and a new device id. */
function freshBatches(list: Phone[]): Phone[] {
	return list.map((phone, p) => ({
		...phone,
		deviceId: `burst-${randomUUID()}`,
		batches: batchesFor(p)
	}));
}

function report(
	label: string,
	count: number,
	f: BurstFigures,
	health: { checks: number; slowestMs: number }
) {
	const pauses = f.retryAfters.length
		? `Retry-After ${Math.min(...f.retryAfters)}–${Math.max(...f.retryAfters)} s`
		: 'no Retry-After';
	console.log(
		`${label}: ${count} phones × ${BATCHES_PER_PHONE} batches × ${EVENTS_PER_BATCH} events in ` +
			`${(f.wallMs / 1000).toFixed(1)} s; ${f.requests} requests, ${f.refusals} answered 503 ` +
			`(${pauses}); ${f.accepted} accepted, ${f.duplicates} duplicate; slowest answer ` +
			`${(f.slowestMs / 1000).toFixed(1)} s; health ${health.checks} checks, slowest ` +
			`${health.slowestMs.toFixed(0)} ms`
	);
}

test('30 phones send 3 batches of 50 at once: every batch answered, every event stored once', async ({
	playwright,
	baseURL
}) => {
	test.setTimeout(300_000);
	const burstPhones = freshBatches(phones);
	const sending = burst(burstPhones, baseURL!);
	const [figures, health] = await Promise.all([
		sending,
		healthAllAlong(playwright, baseURL!, sending)
	]);
	report('burst', burstPhones.length, figures, health);
	expect(figures.accepted).toBe(PHONES * BATCHES_PER_PHONE * EVENTS_PER_BATCH);
	await expectStoredOnce(burstPhones);
	await expectStateEqualsRebuild();
});

/** A free loopback port (asked of the OS, then given back for the server to take). */
async function freePort(): Promise<number> {
	const server = createServer();
	await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
	const { port } = server.address() as AddressInfo;
	await new Promise((resolve) => server.close(resolve));
	return port;
}

/** Starts the built app on `port` with a tiny pool; resolves once it answers. */
async function startSmallPoolServer(port: number): Promise<ChildProcess> {
	const origin = `http://127.0.0.1:${port}`;
	const child = spawn(process.execPath, ['build'], {
		env: {
			...process.env,
			PORT: String(port),
			ORIGIN: origin,
			DB_POOL_SIZE: '2',
			DB_POOL_QUEUE_LIMIT: '8',
			DB_ACQUIRE_TIMEOUT_MS: '1000',
			NESTMARK_DUE_SCAN_MINUTES: '0',
			NESTMARK_REQUEST_LOG: 'off'
		},
		stdio: ['ignore', 'ignore', 'pipe']
	});
	let stderr = '';
	child.stderr!.on('data', (d) => (stderr += d));
	const deadline = Date.now() + 30_000;
	for (;;) {
		if (child.exitCode !== null) throw new Error(`the second server exited: ${stderr}`);
		try {
			const res = await fetch(`${origin}/api/health`);
			if (res.ok) return child;
		} catch {
			// Not listening yet.
		}
		if (Date.now() > deadline) throw new Error(`the second server did not start: ${stderr}`);
		await new Promise((r) => setTimeout(r, 200));
	}
}

test('with a pool of 2 and a queue of 8, the burst gets 503 + Retry-After and every retry lands once', async ({
	playwright
}) => {
	test.setTimeout(300_000);
	const port = await freePort();
	const server = await startSmallPoolServer(port);
	const origin = `http://127.0.0.1:${port}`;
	// Sessions are signed with the same secret, and cookies do not depend on the port: the
	// phones' sessions from the test server work on this one.
	const burstPhones = freshBatches(phones.slice(0, SMALL_POOL_PHONES));
	try {
		const sending = burst(burstPhones, origin);
		const [figures, health] = await Promise.all([
			sending,
			healthAllAlong(playwright, origin, sending)
		]);
		report('small pool', burstPhones.length, figures, health);
		expect(figures.refusals, 'the small pool refused some batches').toBeGreaterThan(0);
		expect(figures.accepted).toBe(SMALL_POOL_PHONES * BATCHES_PER_PHONE * EVENTS_PER_BATCH);
		await expectStoredOnce(burstPhones);
		await expectStateEqualsRebuild();
	} finally {
		// Asked to stop, it closes its pool and exits; killed if it does not within 15 s.
		const exited = new Promise((resolve) => {
			if (server.exitCode !== null) resolve(null);
			else server.once('exit', resolve);
		});
		server.kill('SIGTERM');
		const stubborn = setTimeout(() => server.kill('SIGKILL'), 15_000);
		await exited;
		clearTimeout(stubborn);
	}
});
