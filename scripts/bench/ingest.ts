/**
 * Sync ingest benchmark: events per second through `POST /api/sync` of the built app, against the
 * same rows written by raw mysql2 multi-row `INSERT IGNORE` in the same run. In between, the same
 * events through the ingest service in process, to show what the web layer (HTTP, session) adds.
 * Ingest always runs the health rules (state fold and flags), so every figure includes them.
 *
 * Everything happens in a scratch database (`nestmark_bench`), recreated on every run and dropped
 * at the end (BENCH_KEEP_DB=1 keeps it for a look); the development and test databases are never
 * touched. Needs `npm run db:up` and a build (`npm run build`).
 */
import { createHash, randomBytes, randomUUID } from 'node:crypto';
import { readFileSync } from 'node:fs';
import http from 'node:http';
import { join } from 'node:path';
import mysql from 'mysql2/promise';
import { seededRandom } from '../../src/lib/domain/fixture-code.ts';
import {
	assertBuilt,
	dropScratchDb,
	log,
	ROOT,
	recreateScratchDb,
	seedScratch,
	startApp,
	stopApp,
	type App
} from './support.ts';
const BENCH_DB = 'nestmark_bench';
const PORT = Number(process.env.BENCH_PORT ?? 3200);
const ORIGIN = `http://127.0.0.1:${PORT}`;
const TOTAL_EVENTS = Number(process.env.BENCH_INGEST_EVENTS ?? 200_000);
const BATCH = 100;
const CLIENTS = 4;
const FIXTURES = 200;
const GOAL = 0.5;
const EMAIL = 'bench.technician@larchmere.example';
const PASSWORD = `bench-${randomBytes(9).toString('base64url')}`;

/** One event as the phone sends it. */
interface SyncEvent {
	id: string;
	fixtureCode: string;
	kind: string;
	occurredAt: string;
	payload: Record<string, unknown>;
}

const rate = (n: number, ms: number) => Math.round((n / ms) * 1000);
const fmt = (n: number) => n.toLocaleString('en-GB');

/** The scratch database with one technician and the fixtures; returns their codes. */
function prepare(url: string): Promise<string[]> {
	return seedScratch(url, {
		email: EMAIL,
		name: 'Bench Technician',
		role: 'technician',
		password: PASSWORD,
		area: 'Diamond-turning bay',
		location: 'Lathe 1',
		fixtures: { count: FIXTURES, type: 'three-vee', name: (i) => `Bench pallet ${i + 1}` }
	});
}

/**
 * The events of the run: mostly reseats with readings, and some cleanings, notes and
 * inspections. Each client works its own quarter of the fixtures with its own clock running
 * forward, as four phones at four machines would, so the events of one fixture arrive in order.
 * A phone logs a run of entries at one fixture before it moves on (a series of reseats, a
 * break-in): runs of 1 to 20 events, 10 on average, so a batch of 100 touches about 10 fixtures.
 */
function makeEvents(codes: string[]): SyncEvent[][] {
	const perClient = Math.ceil(TOTAL_EVENTS / CLIENTS);
	const start = Date.now() - 30 * 24 * 3600 * 1000;
	const streams: SyncEvent[][] = [];
	for (let c = 0; c < CLIENTS; c++) {
		const mine = codes.filter((_, i) => i % CLIENTS === c);
		const random = seededRandom(c + 1);
		const events: SyncEvent[] = [];
		let fixture = 0;
		let runLeft = 0;
		for (let i = 0; i < perClient && c * perClient + i < TOTAL_EVENTS; i++) {
			if (runLeft === 0) {
				fixture = Math.floor(random() * mine.length);
				runLeft = 1 + Math.floor(random() * 20);
			}
			runLeft--;
			const r = random();
			const occurredAt = new Date(start + i * 10_000 + c).toISOString();
			const fixtureCode = mine[fixture];
			let kind = 'reseat';
			let payload: Record<string, unknown>;
			if (r < 0.06) {
				kind = 'cleaning';
				payload = { method: 'solvent-wipe', relubricated: false };
			} else if (r < 0.09) {
				kind = 'note';
				payload = { text: `Bench note ${i}: seated cleanly, no debris on the balls.` };
			} else if (r < 0.1) {
				kind = 'inspection';
				payload = {
					contacts: ['ball 1', 'ball 2', 'ball 3'].map((contact) => ({
						contact,
						grade: 1,
						marks: []
					})),
					verdict: 'serviceable'
				};
			} else {
				const wobble = () => Math.round((random() - 0.5) * 400) / 1000;
				payload = { cycles: 1, readings: { dx: wobble(), dy: wobble(), dz: wobble() } };
			}
			events.push({ id: randomUUID(), fixtureCode, kind, occurredAt, payload });
		}
		streams.push(events);
	}
	return streams;
}

/** CPU seconds (user + system) a process has used so far, from /proc; null where unreadable. */
function cpuSeconds(pid: number | undefined): number | null {
	if (!pid) return null;
	try {
		const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
		const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
		// utime and stime are fields 14 and 15 of the whole line (11 and 12 after the name).
		return (Number(fields[11]) + Number(fields[12])) / 100;
	} catch {
		return null;
	}
}

function mariadbPid(): number | undefined {
	try {
		return Number(readFileSync(join(ROOT, '.data', 'mysqld.pid'), 'utf8').trim()) || undefined;
	} catch {
		return undefined;
	}
}

/** "app 1.2 ms, MariaDB 0.8 ms of CPU per 100 events" from CPU readings before and after. */
function cpuNote(label: string, before: number | null, after: number | null, events: number) {
	if (before === null || after === null) return '';
	return `${label} ${(((after - before) * 1000 * 100) / events).toFixed(1)} ms`;
}

function batches<T>(items: T[], size: number): T[][] {
	const out: T[][] = [];
	for (let i = 0; i < items.length; i += size) out.push(items.slice(i, i + size));
	return out;
}

/** Runs `work` on each item from `CLIENTS` workers at once; each worker owns its own queue. */
async function inParallel<T>(queues: T[][], work: (item: T, worker: number) => Promise<void>) {
	await Promise.all(
		queues.map(async (queue, worker) => {
			for (const item of queue) await work(item, worker);
		})
	);
}

/** The raw baseline: the same rows through multi-row INSERT IGNORE on 4 connections. */
async function rawBaseline(
	url: string,
	streams: SyncEvent[][],
	fixtureIds: Map<string, number>,
	userId: string
) {
	const setup = await mysql.createConnection({ uri: url });
	await setup.query('DROP TABLE IF EXISTS bench_raw_events');
	// Same columns and indexes as `events` (CREATE … LIKE copies no foreign keys).
	await setup.query('CREATE TABLE bench_raw_events LIKE events');
	await setup.end();

	const receivedAt = new Date();
	const rows = streams.map((events) =>
		batches(
			events.map((e) => [
				e.id,
				fixtureIds.get(e.fixtureCode),
				e.kind,
				new Date(e.occurredAt),
				receivedAt,
				userId,
				`bench-device-${0}`,
				JSON.stringify(e.payload),
				createHash('sha256').update(JSON.stringify(e)).digest('hex')
			]),
			BATCH
		)
	);

	const pool = mysql.createPool({ uri: url, connectionLimit: CLIENTS, timezone: 'Z' });
	const db0 = cpuSeconds(mariadbPid());
	const t0 = performance.now();
	await inParallel(rows, async (batch) => {
		await pool.query(
			'INSERT IGNORE INTO bench_raw_events (id, fixture_id, kind, occurred_at, received_at, user_id, device_id, payload, content_hash) VALUES ?',
			[batch]
		);
	});
	const ms = performance.now() - t0;
	const db1 = cpuSeconds(mariadbPid());
	const [[count]] = await pool.query<mysql.RowDataPacket[]>(
		'SELECT COUNT(*) AS n FROM bench_raw_events'
	);
	await pool.end();
	return { ms, stored: Number(count.n), cpu: cpuNote('MariaDB', db0, db1, TOTAL_EVENTS) };
}

const agent = new http.Agent({ keepAlive: true, maxSockets: CLIENTS });

/** A small HTTP client on a keep-alive agent (lighter on the CPU than fetch). */
function request(
	method: string,
	path: string,
	headers: Record<string, string>,
	body?: string
): Promise<{ status: number; headers: http.IncomingHttpHeaders; body: string }> {
	return new Promise((resolve, reject) => {
		const req = http.request(`${ORIGIN}${path}`, { method, headers, agent }, (res) => {
			const chunks: Buffer[] = [];
			res.on('data', (c: Buffer) => chunks.push(c));
			res.on('end', () =>
				resolve({
					status: res.statusCode ?? 0,
					headers: res.headers,
					body: Buffer.concat(chunks).toString('utf8')
				})
			);
			res.on('error', reject);
		});
		req.on('error', reject);
		if (body !== undefined) req.write(body);
		req.end();
	});
}

/** Signs in with e-mail and password the way a browser form does; returns the cookie header. */
async function signIn(): Promise<string> {
	const body = new URLSearchParams({
		email: EMAIL,
		password: PASSWORD,
		redirectTo: '/'
	}).toString();
	const res = await request(
		'POST',
		'/auth/callback/credentials',
		{ 'content-type': 'application/x-www-form-urlencoded', origin: ORIGIN },
		body
	);
	const cookies = (res.headers['set-cookie'] ?? []).map((c) => c.split(';')[0]);
	const session = cookies.filter((c) => /session-token/.test(c));
	if (!session.length) throw new Error(`sign-in failed (status ${res.status}, no session cookie)`);
	return session.join('; ');
}

/** Sends every batch through the API; checks that every event came back accepted. */
async function apiIngest(streams: SyncEvent[][], cookie: string, serverPid: number | undefined) {
	const queues = streams.map((events) => batches(events, BATCH));
	let accepted = 0;
	const problems: string[] = [];
	const db0 = cpuSeconds(mariadbPid());
	const app0 = cpuSeconds(serverPid);
	const t0 = performance.now();
	await inParallel(queues, async (events, worker) => {
		const res = await request(
			'POST',
			'/api/sync',
			{ 'content-type': 'application/json', cookie },
			JSON.stringify({ deviceId: `bench-device-${worker}`, events })
		);
		if (res.status !== 200) {
			problems.push(`HTTP ${res.status}: ${res.body.slice(0, 200)}`);
			return;
		}
		const { results } = JSON.parse(res.body) as { results: { status: string; error?: string }[] };
		for (const r of results) {
			if (r.status === 'accepted') accepted++;
			else if (problems.length < 5) problems.push(`${r.status}: ${r.error}`);
		}
	});
	const ms = performance.now() - t0;
	const cpu = [
		cpuNote('app', app0, cpuSeconds(serverPid), TOTAL_EVENTS),
		cpuNote('MariaDB', db0, cpuSeconds(mariadbPid()), TOTAL_EVENTS)
	];
	return { ms, accepted, problems, cpu: cpu.filter(Boolean).join(', ') };
}

/**
 * The same events through the ingest service called in this process (no HTTP, no session): the
 * cost of judging, storing and folding with the health rules on, apart from the web layer. The
 * tables it fills are emptied again afterwards, so the API run starts from the same state.
 */
async function directIngest(url: string, streams: SyncEvent[][], userId: string) {
	process.env.DATABASE_URL = url;
	const { ingestBatch } = await import('../../src/lib/server/ingest.ts');
	const { closeDb } = await import('../../src/lib/server/db/index.ts');
	const actor = { id: userId, email: EMAIL, name: 'Bench', roles: ['technician' as const] };
	const conn = await mysql.createConnection({ uri: url });
	const [statuses] = await conn.query<mysql.RowDataPacket[]>('SELECT id, status FROM fixtures');
	const db0 = cpuSeconds(mariadbPid());
	const cpu0 = process.cpuUsage();
	const t0 = performance.now();
	let accepted = 0;
	try {
		await inParallel(
			streams.map((events) => batches(events, BATCH)),
			async (batch, worker) => {
				const results = await ingestBatch(actor, `bench-direct-${worker}`, batch);
				accepted += results.filter((r) => r.status === 'accepted').length;
			}
		);
		const ms = performance.now() - t0;
		const cpu = process.cpuUsage(cpu0);
		const db1 = cpuSeconds(mariadbPid());
		const appMs = (((cpu.user + cpu.system) / 1000) * 100) / TOTAL_EVENTS;
		const note = [`ingest ${appMs.toFixed(1)} ms`, cpuNote('MariaDB', db0, db1, TOTAL_EVENTS)]
			.filter(Boolean)
			.join(', ');
		return { ms, accepted, cpu: note };
	} finally {
		await closeDb();
		// Back to the state before: no events, no derived state, the fixtures' first status.
		await conn.query('DELETE FROM flags');
		await conn.query('DELETE FROM fixture_state');
		await conn.query('DELETE FROM events');
		for (const r of statuses) {
			await conn.query('UPDATE fixtures SET status = ? WHERE id = ?', [r.status, r.id]);
		}
		await conn.end();
	}
}

/** Runs the ingest benchmark and prints both rates and their ratio. */
export async function benchIngest(): Promise<{ apiRate: number; rawRate: number; ratio: number }> {
	console.log(
		`\nSync ingest: ${fmt(TOTAL_EVENTS)} events, batches of ${BATCH}, ${CLIENTS} clients`
	);
	assertBuilt();
	const url = await recreateScratchDb(BENCH_DB);
	let server: App | undefined;
	try {
		const codes = await prepare(url);
		const streams = makeEvents(codes);

		const conn = await mysql.createConnection({ uri: url });
		const [fx] = await conn.query<mysql.RowDataPacket[]>('SELECT id, code FROM fixtures');
		const [[user]] = await conn.query<mysql.RowDataPacket[]>(
			'SELECT id FROM users WHERE email = ?',
			[EMAIL]
		);
		await conn.end();
		const fixtureIds = new Map(fx.map((r) => [r.code as string, r.id as number]));

		const raw = await rawBaseline(url, streams, fixtureIds, user.id as string);
		const rawRate = rate(TOTAL_EVENTS, raw.ms);
		log(
			`raw INSERT IGNORE:  ${fmt(rawRate)} events/s (${(raw.ms / 1000).toFixed(1)} s, ${fmt(raw.stored)} rows; CPU per 100 events: ${raw.cpu})`
		);

		const direct = await directIngest(url, streams, user.id as string);
		const directRate = rate(TOTAL_EVENTS, direct.ms);
		log(
			`ingest, in process: ${fmt(directRate)} events/s (${(direct.ms / 1000).toFixed(1)} s, ${fmt(direct.accepted)} accepted; CPU per 100 events: ${direct.cpu}) — ratio ${(directRate / rawRate).toFixed(2)}, health rules on, no HTTP or session`
		);

		server = await startApp(PORT, url, { BODY_SIZE_LIMIT: '4M' });
		const cookie = await signIn();
		const api = await apiIngest(streams, cookie, server.child.pid);
		const apiRate = rate(TOTAL_EVENTS, api.ms);
		log(
			`POST /api/sync:     ${fmt(apiRate)} events/s (${(api.ms / 1000).toFixed(1)} s, ${fmt(api.accepted)} accepted; CPU per 100 events: ${api.cpu})`
		);
		if (api.problems.length) log(`problems: ${api.problems.slice(0, 5).join(' | ')}`);

		const check = await mysql.createConnection({ uri: url });
		const [[stored]] = await check.query<mysql.RowDataPacket[]>(
			'SELECT COUNT(*) AS n, (SELECT SUM(event_count) FROM fixture_state) AS folded FROM events'
		);
		await check.end();
		log(
			`stored: ${fmt(Number(stored.n))} events, ${fmt(Number(stored.folded))} folded into fixture state`
		);

		const ratio = apiRate / rawRate;
		log(
			`ratio API / raw:    ${ratio.toFixed(2)} (goal ≥ ${GOAL}) ${ratio >= GOAL ? 'met' : 'NOT met'}`
		);
		if (api.accepted !== TOTAL_EVENTS)
			throw new Error(`only ${api.accepted} of ${TOTAL_EVENTS} events were accepted`);
		return { apiRate, rawRate, ratio };
	} finally {
		if (server) await stopApp(server);
		agent.destroy();
		dropScratchDb(BENCH_DB);
	}
}
