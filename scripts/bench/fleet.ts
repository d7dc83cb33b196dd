/**
 * Fleet board benchmark: `GET /api/fleet/summary` of the built app on 5,000 fixtures with
 * 1,000,000 events behind them, against a raw mysql2 read of the 5,000-row fixture_state table
 * joined with its open flags, measured in the same run. Goal: the API at most 2× the raw read
 * (medians of several runs).
 *
 * The fixtures' state and flags are made the way the app makes them: each fixture's own short
 * history (a break-in run, reseats with readings, cleanings, a hold now and then) goes through the
 * ingest service, which folds it and writes fixture_state and the flags. The million events are
 * a backdrop written in bulk SQL (notes, older than every ingested entry, so the latest entry of
 * each fixture stays the one its state knows): the board must not read them, and the figures show
 * whether it does.
 *
 * Works in a scratch database (`nestmark_bench_fleet`), recreated per run and dropped at the end
 * (BENCH_KEEP_DB=1 keeps it). Needs `npm run db:up` and a build (`npm run build`).
 */
import { randomBytes, randomUUID } from 'node:crypto';
import { fileURLToPath } from 'node:url';
import mysql from 'mysql2/promise';
import {
	assertBuilt,
	dropScratchDb,
	log,
	recreateScratchDb,
	seedScratch,
	startApp,
	stopApp
} from './support.ts';

const DB = 'nestmark_bench_fleet';
const PORT = Number(process.env.BENCH_FLEET_PORT ?? 3202);
const FIXTURES = Number(process.env.BENCH_FLEET_FIXTURES ?? 5_000);
const BACKDROP_EVENTS = Number(process.env.BENCH_FLEET_EVENTS ?? 1_000_000);
const RUNS = Number(process.env.BENCH_FLEET_RUNS ?? 15);
const GOAL = 2;
const EMAIL = 'bench.supervisor@larchmere.example';
const TECH_EMAIL = 'bench.technician@larchmere.example';
const PASSWORD = `bench-${randomBytes(9).toString('base64url')}`;
const AREAS = ['Diamond-turning bay', 'CMM lab', 'Interferometry room'];

const fmt = (n: number) => n.toLocaleString('en-GB');
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

interface BenchEvent {
	id: string;
	fixtureCode: string;
	kind: string;
	occurredAt: string;
	payload: Record<string, unknown>;
}

/** Readings whose windows all have R ≈ 0.49 µm (settled against the default 1 µm spec). */
const STEADY = [0, 0.1, 0.2, 0.1, 0, -0.1, -0.2, -0.1, 0, 0.1];
const steady = (i: number) => ({ dx: STEADY[i % 10], dy: STEADY[(i + 3) % 10] });
const CLEANED = { method: 'dry-wipe', relubricated: false };

/**
 * A fixture's own recent history, by its number: most settled and healthy, and a tenth each due
 * for break-in, cleaning, inspection, or out of spec; one in fifty on hold.
 */
function historyOf(code: string, i: number, start: number): BenchEvent[] {
	let t = start;
	const ev = (kind: string, payload: Record<string, unknown>): BenchEvent => ({
		id: randomUUID(),
		fixtureCode: code,
		kind,
		occurredAt: new Date((t += 90_000)).toISOString(),
		payload
	});
	const settle = () =>
		ev('break-in', { cycles: 30, readings: Array.from({ length: 30 }, (_, k) => steady(k)) });
	const out: BenchEvent[] = [];
	switch (i % 10) {
		case 6:
			for (let k = 0; k < 5; k++) out.push(ev('reseat', {}));
			break;
		case 7:
			out.push(settle(), ev('reseat', { cycles: 230 }), ev('reseat', { readings: steady(1) }));
			break;
		case 8:
			out.push(settle());
			for (let k = 0; k < 10; k++) out.push(ev('reseat', { readings: { dx: k % 2 ? 1 : -1 } }));
			break;
		case 9:
			out.push(settle(), ev('cleaning', CLEANED), ev('reseat', { cycles: 2_100 }));
			break;
		default:
			out.push(settle(), ev('cleaning', CLEANED));
			for (let k = 0; k < 10; k++) out.push(ev('reseat', { readings: steady(k) }));
	}
	if (i % 50 === 3) out.push(ev('hold', { reason: 'Seat chipped; waiting for a new insert.' }));
	return out;
}

/** Places, fixtures (bulk SQL), their histories (the ingest service), then the backdrop. */
async function prepare(url: string): Promise<void> {
	await seedScratch(url, {
		email: EMAIL,
		name: 'Bench Supervisor',
		role: 'supervisor',
		password: PASSWORD,
		area: AREAS[0],
		location: 'Lathe 1',
		fixtures: { count: 0, type: 'three-vee', name: (i) => `Bench fixture ${i + 1}` },
		moreAccounts: [
			{ email: TECH_EMAIL, name: 'Bench Technician', role: 'technician', password: PASSWORD }
		]
	});
	const conn = await mysql.createConnection({ uri: url, multipleStatements: false });
	try {
		// Twelve locations in three areas of the one site.
		const [[site]] = await conn.query<mysql.RowDataPacket[]>('SELECT id FROM sites LIMIT 1');
		for (const name of AREAS.slice(1)) {
			await conn.query('INSERT INTO areas (site_id, name, created_at) VALUES (?, ?, NOW(3))', [
				site.id,
				name
			]);
		}
		await conn.query(
			`INSERT IGNORE INTO locations (area_id, name, created_at)
			 SELECT a.id, CONCAT('Station ', s.seq), NOW(3) FROM areas a JOIN seq_1_to_4 s`
		);
		const [locs] = await conn.query<mysql.RowDataPacket[]>('SELECT id FROM locations ORDER BY id');
		const types = ['three-vee', 'trihedral-vee-flat', 'pallet', 'vise', 'plate'];
		const { generateFixtureCode } = await import('../../src/lib/domain/fixture-code.ts');
		const codes = new Set<string>();
		while (codes.size < FIXTURES) codes.add(generateFixtureCode());
		const list = [...codes];
		for (let i = 0; i < list.length; i += 1_000) {
			const rows = list
				.slice(i, i + 1_000)
				.map((code, j) => [
					code,
					`Bench fixture ${i + j + 1}`,
					types[(i + j) % types.length],
					locs[(i + j) % locs.length].id
				]);
			await conn.query(
				'INSERT INTO fixtures (code, name, type, location_id, created_at, updated_at) VALUES ' +
					rows.map(() => '(?, ?, ?, ?, NOW(3), NOW(3))').join(', '),
				rows.flat()
			);
		}
		const [[tech]] = await conn.query<mysql.RowDataPacket[]>(
			'SELECT id, name, email FROM users WHERE email = ?',
			[TECH_EMAIL]
		);

		// Each fixture's history through the ingest service, four phones at a time.
		process.env.DATABASE_URL = url;
		const { ingestBatch } = await import('../../src/lib/server/ingest.ts');
		const { closeDb } = await import('../../src/lib/server/db/index.ts');
		const actor = {
			id: tech.id,
			name: tech.name,
			email: tech.email,
			roles: ['technician' as const]
		};
		const start = Date.now() - 20 * 86_400_000;
		const batches: BenchEvent[][] = [];
		let batch: BenchEvent[] = [];
		list.forEach((code, i) => {
			for (const e of historyOf(code, i, start + i * 1_000)) {
				batch.push(e);
				if (batch.length >= 100) {
					batches.push(batch);
					batch = [];
				}
			}
		});
		if (batch.length) batches.push(batch);
		const t0 = performance.now();
		let next = 0;
		let events = 0;
		try {
			await Promise.all(
				Array.from({ length: 4 }, async (_, phone) => {
					while (next < batches.length) {
						const mine = batches[next++];
						const results = await ingestBatch(actor, `bench-phone-${phone}`, mine);
						const refused = results.filter((r) => r.status !== 'accepted');
						if (refused.length) throw new Error(`ingest refused: ${JSON.stringify(refused[0])}`);
						events += mine.length;
					}
				})
			);
		} finally {
			await closeDb();
		}
		log(
			`histories: ${fmt(events)} events ingested through the app in ${((performance.now() - t0) / 1000).toFixed(1)} s`
		);

		// The backdrop: a million older notes in bulk, spread over the fixtures and the year before.
		const t1 = performance.now();
		const [[range]] = await conn.query<mysql.RowDataPacket[]>(
			'SELECT MIN(id) AS lo, COUNT(*) AS n FROM fixtures'
		);
		const chunk = 100_000;
		for (let done = 0; done < BACKDROP_EVENTS; done += chunk) {
			const size = Math.min(chunk, BACKDROP_EVENTS - done);
			await conn.query(
				`INSERT INTO events
				   (id, fixture_id, kind, occurred_at, received_at, user_id, device_id, payload, content_hash)
				 SELECT UUID(), ? + MOD(s.seq, ?), 'note',
				        TIMESTAMPADD(SECOND, -(400 * 86400) + s.seq * 25, NOW(3)) - INTERVAL 30 DAY,
				        TIMESTAMPADD(SECOND, -(400 * 86400) + s.seq * 25, NOW(3)) - INTERVAL 30 DAY,
				        ?, 'bench-backdrop', JSON_OBJECT('text', CONCAT('Backdrop note ', s.seq)),
				        SHA2(CONCAT('backdrop-', s.seq), 256)
				   FROM seq_1_to_${size} s`.replace(/s\.seq/g, `(CAST(s.seq AS SIGNED) + ${done})`),
				[range.lo, range.n, tech.id]
			);
		}
		await conn.query('ANALYZE TABLE events, fixtures, fixture_state, flags');
		log(
			`backdrop: ${fmt(BACKDROP_EVENTS)} events in bulk SQL in ${((performance.now() - t1) / 1000).toFixed(1)} s`
		);
		const [[counts]] = await conn.query<mysql.RowDataPacket[]>(
			`SELECT (SELECT COUNT(*) FROM events) AS events, (SELECT COUNT(*) FROM fixture_state) AS states,
			        (SELECT COUNT(*) FROM flags WHERE cleared_at IS NULL) AS open_flags,
			        (SELECT COUNT(DISTINCT fixture_id) FROM flags WHERE cleared_at IS NULL) AS flagged`
		);
		log(
			`database: ${fmt(FIXTURES)} fixtures, ${fmt(Number(counts.states))} state rows, ${fmt(Number(counts.events))} events, ${fmt(Number(counts.open_flags))} open flags on ${fmt(Number(counts.flagged))} fixtures`
		);
	} finally {
		await conn.end();
	}
}

/** Signs in as the supervisor the way the browser form does; returns the cookie header. */
async function signIn(origin: string): Promise<string> {
	const res = await fetch(`${origin}/auth/callback/credentials`, {
		method: 'POST',
		headers: { 'content-type': 'application/x-www-form-urlencoded', origin },
		body: new URLSearchParams({ email: EMAIL, password: PASSWORD, redirectTo: '/' }).toString(),
		redirect: 'manual'
	});
	const session = res.headers
		.getSetCookie()
		.map((c) => c.split(';')[0])
		.filter((c) => /session-token/.test(c));
	if (!session.length) throw new Error(`sign-in failed (status ${res.status}, no session cookie)`);
	return session.join('; ');
}

/** The raw read: every state row with its open flags, on one mysql2 connection. */
const RAW_SQL = `SELECT s.fixture_id, s.event_count, s.total_cycles, s.cycles_since_cleaning,
       s.cycles_since_inspection, s.repeatability_um, s.wear_grade, s.last_event_at,
       f.id AS flag_id, f.kind, f.reason, f.figures, f.raised_at
  FROM fixture_state s
  LEFT JOIN flags f ON f.fixture_id = s.fixture_id AND f.cleared_at IS NULL`;

/** Runs the fleet board benchmark and prints the API's median against the raw read's. */
export async function benchFleet(): Promise<{ apiMs: number; rawMs: number; ratio: number }> {
	console.log(
		`\nFleet board: GET /api/fleet/summary on ${fmt(FIXTURES)} fixtures with ${fmt(BACKDROP_EVENTS)} events, ${RUNS} runs`
	);
	assertBuilt();
	const url = await recreateScratchDb(DB);
	await prepare(url);
	const server = await startApp(PORT, url, { NESTMARK_DUE_SCAN_MINUTES: '0' });
	const raw = await mysql.createConnection({ uri: url, timezone: 'Z' });
	try {
		const cookie = await signIn(server.origin);
		const api = async () => {
			const t0 = performance.now();
			const res = await fetch(`${server.origin}/api/fleet/summary`, { headers: { cookie } });
			const body = (await res.json()) as { attention: { total: number; rows: unknown[] } };
			if (res.status !== 200) throw new Error(`summary answered ${res.status}`);
			return { ms: performance.now() - t0, body };
		};
		const rawRead = async () => {
			const t0 = performance.now();
			const [rows] = await raw.query<mysql.RowDataPacket[]>(RAW_SQL);
			return { ms: performance.now() - t0, rows: rows.length };
		};
		// Warm both (first-use code paths, the buffer pool), then alternate so drift hits both.
		for (let i = 0; i < 3; i++) {
			await api();
			await rawRead();
		}
		const apiTimes: number[] = [];
		const rawTimes: number[] = [];
		let shown = { total: 0, rows: 0 };
		let rawRows = 0;
		for (let i = 0; i < RUNS; i++) {
			const a = await api();
			apiTimes.push(a.ms);
			shown = { total: a.body.attention.total, rows: a.body.attention.rows.length };
			const r = await rawRead();
			rawTimes.push(r.ms);
			rawRows = r.rows;
		}
		const apiMs = median(apiTimes);
		const rawMs = median(rawTimes);
		const ratio = apiMs / rawMs;
		log(
			`API     ${apiMs.toFixed(1)} ms median (HTTP, session check, summary of ${fmt(shown.total)} fixtures needing attention, ${fmt(shown.rows)} rows listed)`
		);
		log(
			`raw     ${rawMs.toFixed(1)} ms median (mysql2, fixture_state ⟕ open flags: ${fmt(rawRows)} rows)`
		);
		log(
			`ratio   ${ratio.toFixed(2)}× the raw read; goal ≤ ${GOAL}×: ${ratio <= GOAL ? 'met' : 'NOT met'}`
		);
		return { apiMs, rawMs, ratio };
	} finally {
		await raw.end();
		await stopApp(server);
		dropScratchDb(DB);
	}
}

// Run on its own: npx tsx scripts/bench/fleet.ts
if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
	await benchFleet();
}
