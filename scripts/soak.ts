/**
 * Soak test (`npm run soak`): many phones sync a shift's work into the built app at once while
 * things go wrong — requests aborted by the client, one `kill -9` of the app and its restart, one
 * MariaDB restart — and afterwards nothing may be lost or doubled:
 *
 * - every event sent is stored exactly once (ids compared with the table, counts per device);
 * - every photo comes back byte for byte (photo and thumbnail);
 * - `state:rebuild` finds no fixture whose stored state differs from a fold of its history.
 *
 * It prints events/s, sync batch latency, retries by cause and the unavailability around each
 * fault, and exits non-zero on any loss, doubling, unreadable photo, state difference or timeout.
 *
 * Everything runs in a scratch database (`nestmark_soak`, recreated each run, dropped after a
 * pass; kept after a failure or with SOAK_KEEP_DB=1), an S3 fake of its own (unless one already
 * listens on SOAK_S3_PORT) and the built app on 127.0.0.1:SOAK_PORT. Run through
 * `npm run soak` (scripts/nestmark.sh soak), which builds the app when the build is missing or
 * older than the sources and brings up the project's MariaDB. SOAK_DEVICES and SOAK_EVENTS make
 * it smaller for a quick look.
 */
import { execFile, spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { createWriteStream, rmSync } from 'node:fs';
import { join } from 'node:path';
import { promisify } from 'node:util';
import mysql from 'mysql2/promise';
import {
	assertBuilt,
	dropScratchDb,
	recreateScratchDb,
	ROOT,
	seedScratch,
	startApp,
	stopApp,
	type App
} from './bench/support.ts';
import { Device, sessionCookie, signInRequest, type Run } from './soak/device.ts';
import { makeWork, type Work } from './soak/workload.ts';

const DB = 'nestmark_soak';
const DEVICES = Number(process.env.SOAK_DEVICES ?? 50);
const EVENTS = Number(process.env.SOAK_EVENTS ?? 1000);
const PORT = Number(process.env.SOAK_PORT ?? 3300);
const S3_PORT = Number(process.env.SOAK_S3_PORT ?? 4580);
/** The whole soak, set-up and checks included, stops by itself after this long. */
const TIMEOUT_MS = Number(process.env.SOAK_TIMEOUT_MIN ?? 15) * 60_000;
/** Time kept back at the end for the checks: phones stop this long before the timeout. */
const CHECK_RESERVE_MS = Math.max(60_000, TIMEOUT_MS / 5);
const FIXTURES_PER_DEVICE = 4;
const PASSWORD = `soak-${randomBytes(9).toString('base64url')}`;
const ACCOUNTS = [
	{ email: 'soak.tech1@larchmere.example', role: 'technician' },
	{ email: 'soak.tech2@larchmere.example', role: 'technician' },
	{ email: 'soak.tech3@larchmere.example', role: 'technician' },
	{ email: 'soak.super1@larchmere.example', role: 'supervisor' },
	{ email: 'soak.super2@larchmere.example', role: 'supervisor' }
] as const;

const ORIGIN = `http://127.0.0.1:${PORT}`;
const S3_ENV = {
	S3_ENDPOINT: `http://127.0.0.1:${S3_PORT}`,
	S3_BUCKET: 'nestmark-attachments',
	S3_REGION: 'us-east-1',
	S3_FORCE_PATH_STYLE: 'true',
	S3_ACCESS_KEY_ID: 'S3RVER',
	S3_SECRET_ACCESS_KEY: 'S3RVER',
	S3_FAKE_DIR: join(ROOT, '.data', 's3-soak')
};
/** One secret for every start of the app, so sessions outlive the kill -9. */
const APP_ENV = {
	...S3_ENV,
	AUTH_SECRET: randomBytes(32).toString('base64url'),
	BODY_SIZE_LIMIT: '10M'
};

const started = Date.now();
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const secs = (ms: number) => `${(ms / 1000).toFixed(1)} s`;
const fmt = (n: number) => n.toLocaleString('en-GB');
const say = (line: string) => console.log(`  [${secs(Date.now() - started).padStart(7)}] ${line}`);

let app: App | undefined;
let s3: ChildProcess | undefined;
/** What the app writes to stderr, across its restarts, for a look after a failure. */
const APP_LOG = join(ROOT, '.data', 'soak-app.log');
const appLog = createWriteStream(APP_LOG);

/** Starts the built app on the soak's port, its stderr going to APP_LOG. */
async function launchApp(url: string): Promise<App> {
	const launched = await startApp(PORT, url, APP_ENV);
	launched.child.stderr?.pipe(appLog, { end: false });
	return launched;
}

/** A fault as it happened: when it was caused and when the server answered again. */
interface Fault {
	name: string;
	at: number;
	back: number;
}

async function answers(url: string): Promise<boolean> {
	try {
		await fetch(url, { signal: AbortSignal.timeout(1_000) });
		return true;
	} catch {
		return false;
	}
}

/** Starts the S3 fake on SOAK_S3_PORT with an empty folder, unless something already answers there. */
async function ensureS3Fake(): Promise<void> {
	if (await answers(S3_ENV.S3_ENDPOINT)) {
		say(`using the S3 server already listening on port ${S3_PORT}`);
		return;
	}
	rmSync(S3_ENV.S3_FAKE_DIR, { recursive: true, force: true });
	s3 = spawn(process.execPath, ['--import', 'tsx', 'scripts/s3-fake.ts'], {
		cwd: ROOT,
		env: { ...process.env, ...S3_ENV },
		stdio: 'ignore'
	});
	for (let i = 0; i < 100 && !(await answers(S3_ENV.S3_ENDPOINT)); i++) await sleep(200);
	if (!(await answers(S3_ENV.S3_ENDPOINT))) throw new Error('the S3 fake did not start');
}

async function waitUntil(done: () => boolean, deadline: number): Promise<boolean> {
	while (!done() && Date.now() < deadline) await sleep(100);
	return done();
}

/** The faults, each when the phones have delivered a share of the events. */
async function injectFaults(run: Run, total: number, url: string): Promise<Fault[]> {
	const faults: Fault[] = [];
	if (await waitUntil(() => run.delivered >= total * 0.3, run.deadline)) {
		const at = Date.now();
		const victim = app!;
		say(`kill -9 of the app (pid ${victim.child.pid}) at ${fmt(run.delivered)} events`);
		const gone = new Promise((r) => victim.child.once('exit', r));
		victim.child.kill('SIGKILL');
		await gone;
		app = await launchApp(url);
		faults.push({ name: 'kill -9 of the app', at, back: Date.now() });
		say(`app answering again (pid ${app.child.pid}) after ${secs(Date.now() - at)}`);
	}
	if (await waitUntil(() => run.delivered >= total * 0.6, run.deadline)) {
		const at = Date.now();
		say(`MariaDB restart at ${fmt(run.delivered)} events`);
		await promisify(execFile)('bash', [join(ROOT, 'scripts', 'nestmark.sh'), 'db:restart'], {
			cwd: ROOT,
			timeout: 120_000
		});
		faults.push({ name: 'MariaDB restart', at, back: Date.now() });
		say(`MariaDB answering again after ${secs(Date.now() - at)}`);
	}
	return faults;
}

/**
 * Unavailability around a fault as the phones saw it: from the first failed request (no answer
 * or a 5xx) after the fault to the first success of a request sent after the last failure that
 * began before the server was back.
 */
function unavailability(run: Run, fault: Fault): number | null {
	const failed = run.attempts.filter(
		(a) => a.ok === false && a.end >= fault.at && a.start <= fault.back
	);
	if (!failed.length) return null;
	const first = Math.min(...failed.map((a) => a.end));
	const last = Math.max(...failed.map((a) => a.start));
	const next = run.attempts
		.filter((a) => a.ok === true && a.start >= last)
		.reduce((min, a) => Math.min(min, a.end), Infinity);
	return Number.isFinite(next) ? next - first : null;
}

/** The p-th percentile of sorted values (nearest rank), as "123 ms"; "–" when there are none. */
function percentile(sorted: number[], p: number): string {
	if (!sorted.length) return '–';
	return `${sorted[Math.min(sorted.length - 1, Math.ceil((sorted.length * p) / 100) - 1)]} ms`;
}

/** Every event sent is stored once, by the device that sent it; returns what is wrong. */
async function checkEvents(url: string, works: Work[], deviceIds: string[]): Promise<string[]> {
	const conn = await mysql.createConnection({ uri: url });
	try {
		const [rows] = await conn.query<mysql.RowDataPacket[]>('SELECT id, kind FROM events');
		const stored = new Map(rows.map((r) => [r.id as string, r.kind as string]));
		const sent = new Map(works.flatMap((w) => w.events.map((e) => [e.id, e.kind])));
		const missing = [...sent.keys()].filter((id) => !stored.has(id));
		const unknown = [...stored.keys()].filter((id) => !sent.has(id));
		const changed = [...sent].filter(([id, kind]) => stored.has(id) && stored.get(id) !== kind);
		const wrong: string[] = [];
		say(
			`events: ${fmt(sent.size)} sent, ${fmt(stored.size)} stored, ${missing.length} missing, ${unknown.length} not sent`
		);
		if (missing.length)
			wrong.push(`${missing.length} events lost, e.g. ${missing.slice(0, 3).join(', ')}`);
		if (unknown.length) wrong.push(`${unknown.length} stored events were never sent`);
		if (changed.length) wrong.push(`${changed.length} events stored with another kind`);
		const [perDevice] = await conn.query<mysql.RowDataPacket[]>(
			'SELECT device_id, COUNT(*) AS n FROM events GROUP BY device_id'
		);
		const counts = new Map(perDevice.map((r) => [r.device_id as string, Number(r.n)]));
		deviceIds.forEach((id, i) => {
			const n = counts.get(id) ?? 0;
			if (n !== works[i].events.length)
				wrong.push(`${id}: ${n} stored of ${works[i].events.length} sent`);
		});
		return wrong;
	} finally {
		await conn.end();
	}
}

/** Every photo comes back byte for byte, and so does its thumbnail; returns what is wrong. */
async function checkPhotos(works: Work[]): Promise<string[]> {
	const photos = works.flatMap((w) => w.photos);
	// A wedged app must not hang the checks: each request has a time limit, and the first
	// request without an answer ends the photo check.
	let answering = true;
	const call = async (path: string, init: RequestInit = {}) => {
		if (!answering) return null;
		try {
			return await fetch(`${ORIGIN}${path}`, { ...init, signal: AbortSignal.timeout(20_000) });
		} catch {
			answering = false;
			return null;
		}
	};
	const signIn = await call('/auth/callback/credentials', {
		...signInRequest({ email: ACCOUNTS[0].email, password: PASSWORD }),
		headers: { 'content-type': 'application/x-www-form-urlencoded', origin: ORIGIN }
	});
	const cookie = signIn ? sessionCookie(signIn.headers) : '';
	const get = async (path: string) => {
		const res = await call(path, { headers: { cookie } });
		return res?.ok ? Buffer.from(await res.arrayBuffer()) : null;
	};
	const wrong: string[] = [];
	let same = 0;
	for (let i = 0; i < photos.length && answering; i += 8) {
		await Promise.all(
			photos.slice(i, i + 8).map(async (p) => {
				const [full, thumb] = await Promise.all([
					get(`/api/attachments/${p.id}`),
					get(`/api/attachments/${p.id}/thumb`)
				]);
				if (full?.equals(p.bytes) && thumb?.equals(p.thumb)) same++;
				else if (wrong.length < 5) wrong.push(`photo ${p.id} does not come back as sent`);
			})
		);
	}
	say(
		`photos: ${fmt(same)} of ${fmt(photos.length)} come back byte for byte (photo and thumbnail)` +
			(answering ? '' : '; the app stopped answering')
	);
	if (same < photos.length) wrong.unshift(`${photos.length - same} photos not retrievable as sent`);
	return wrong;
}

/** `state:rebuild` in report mode against the scratch database; returns what is wrong. */
function checkState(url: string): string[] {
	const r = spawnSync(join(ROOT, 'node_modules', '.bin', 'tsx'), ['scripts/state-rebuild.ts'], {
		cwd: ROOT,
		env: { ...process.env, DATABASE_URL: url },
		encoding: 'utf8',
		timeout: 120_000
	});
	const out = `${r.stdout}${r.stderr}`.trim();
	say(out.split('\n').at(-1) ?? '(state:rebuild said nothing)');
	return r.status === 0 ? [] : [`state:rebuild: ${out.split('\n').slice(0, 5).join(' | ')}`];
}

async function soak(): Promise<boolean> {
	const total = DEVICES * EVENTS;
	console.log(
		`\nSoak: ${DEVICES} phones × ${fmt(EVENTS)} events against ${ORIGIN}, timeout ${secs(TIMEOUT_MS)}`
	);
	assertBuilt();
	const url = await recreateScratchDb(DB);
	await ensureS3Fake();
	const codes = await seedScratch(url, {
		email: ACCOUNTS[0].email,
		name: 'Soak account 1',
		role: ACCOUNTS[0].role,
		password: PASSWORD,
		area: 'Shift-change bay',
		location: 'Cell 1',
		moreAccounts: ACCOUNTS.slice(1).map((a, i) => ({
			...a,
			name: `Soak account ${i + 2}`,
			password: PASSWORD
		})),
		fixtures: {
			count: DEVICES * FIXTURES_PER_DEVICE,
			type: 'three-vee',
			name: (i) => `Soak pallet ${i + 1}`
		}
	});
	const works = Array.from({ length: DEVICES }, (_, d) => makeWork(d, codes, EVENTS));
	const photoCount = works.reduce((n, w) => n + w.photos.length, 0);
	app = await launchApp(url);
	say(
		`${fmt(codes.length)} fixtures, ${ACCOUNTS.length} accounts, ${fmt(photoCount)} photos to send; app pid ${app.child.pid}`
	);

	const t0 = Date.now();
	const run: Run = {
		origin: ORIGIN,
		deadline: started + TIMEOUT_MS - CHECK_RESERVE_MS,
		latencies: [],
		retries: new Map(),
		answers: { accepted: 0, duplicate: 0, rejected: 0 },
		attempts: [],
		problems: [],
		delivered: 0
	};
	const deviceIds = works.map((_, d) => `soak-phone-${String(d + 1).padStart(2, '0')}`);
	const devices = works.map(
		(w, d) =>
			new Device(
				deviceIds[d],
				{ email: ACCOUNTS[d % ACCOUNTS.length].email, password: PASSWORD },
				w,
				run,
				d + 1
			)
	);
	const [faults] = await Promise.all([
		injectFaults(run, total, url),
		Promise.all(devices.map((d) => d.shift()))
	]);
	const ms = Date.now() - t0;
	const unfinished = devices.filter((d) => d.outbox.length || d.photos.length);

	console.log('\nFigures');
	say(
		`${fmt(Math.round((run.delivered / ms) * 1000))} events/s (${fmt(run.delivered)} events delivered in ${secs(ms)}, photos included)`
	);
	const lat = run.latencies.map((l) => l.ms).sort((a, b) => a - b);
	const slowest = run.latencies.find((l) => l.ms === lat.at(-1));
	say(
		`sync batch latency (${fmt(lat.length)} answered 200): p50 ${percentile(lat, 50)}, p95 ${percentile(lat, 95)}, max ${percentile(lat, 100)}` +
			(slowest ? ` (sent at ${secs(slowest.at - started)})` : '')
	);
	const retries = [...run.retries].sort((a, b) => b[1] - a[1]).map(([c, n]) => `${c} ${n}`);
	say(`retries by cause: ${retries.join(', ') || 'none'}`);
	say(
		`answers: ${fmt(run.answers.accepted)} accepted, ${fmt(run.answers.duplicate)} duplicate, ${run.answers.rejected} rejected`
	);
	for (const f of faults) {
		const u = unavailability(run, f);
		say(
			`${f.name}: ${u === null ? 'no failed request' : `${secs(u)} from first failed request to next success`} (server back after ${secs(f.back - f.at)})`
		);
	}

	console.log('\nChecks');
	const wrong = [...run.problems.slice(0, 10)];
	if (run.problems.length > 10) wrong.push(`… and ${run.problems.length - 10} more problems`);
	if (faults.length < 2)
		wrong.push(`only ${faults.length} of 2 faults happened before the deadline`);
	if (unfinished.length)
		wrong.push(`${unfinished.length} phones still had entries or photos waiting at the deadline`);
	wrong.push(
		...(await checkEvents(url, works, deviceIds)),
		...(await checkPhotos(works)),
		...checkState(url)
	);
	for (const w of wrong) console.log(`  FAIL ${w}`);
	return wrong.length === 0;
}

/** Stops what the soak started, by PID. */
async function cleanUp(passed: boolean): Promise<void> {
	if (app) await stopApp(app);
	if (s3 && s3.exitCode === null) s3.kill('SIGTERM');
	const keep = !passed || process.env.SOAK_KEEP_DB === '1';
	if (keep)
		console.log(
			`  the scratch database ${DB} is kept for a look; the app's errors are in ${APP_LOG}`
		);
	else dropScratchDb(DB, false);
}

/** Ends the soak at once, killing what it started (by PID). */
function abandon(why: string, code: number): never {
	console.error(`\nSoak FAILED: ${why}`);
	if (app?.child.exitCode === null) app.child.kill('SIGKILL');
	if (s3?.exitCode === null) s3.kill('SIGKILL');
	process.exit(code);
}

// However the run goes, it stops: after the timeout whatever is running is killed and it fails.
const hardStop = setTimeout(
	() => abandon(`not finished within ${secs(TIMEOUT_MS)}`, 1),
	TIMEOUT_MS
);
hardStop.unref();
process.once('SIGINT', () => abandon('interrupted', 130));
process.once('SIGTERM', () => abandon('interrupted', 130));

let passed = false;
try {
	passed = await soak();
} catch (err) {
	console.error(`\nSoak could not run: ${err instanceof Error ? err.message : err}`);
} finally {
	await cleanUp(passed);
	clearTimeout(hardStop);
}
console.log(passed ? '\nSoak PASSED' : '\nSoak FAILED');
process.exit(passed ? 0 : 1);
