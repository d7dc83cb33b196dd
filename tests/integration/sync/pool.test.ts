import { randomUUID } from 'node:crypto';
import net from 'node:net';
import { count, inArray, sql } from 'drizzle-orm';
import mysql from 'mysql2/promise';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import {
	DatabaseBusyError,
	getPool,
	NestedConnectionError,
	poolStats,
	withConnection
} from '$lib/server/db';
import type { Actor } from '$lib/server/guard';
import { rebuildStates } from '$lib/server/health';
import { ingestBatch } from '$lib/server/ingest';
import { closeDb, db, makeFixture, makeUser, resetDb, schema } from '../helpers/db';

// The pool's limits are read from the environment when the pool is made; each test sets its own
// and starts a new pool, and the file puts the environment back as it found it.
const LIMIT_VARS = ['DB_POOL_SIZE', 'DB_POOL_QUEUE_LIMIT', 'DB_ACQUIRE_TIMEOUT_MS'] as const;
const savedEnv = Object.fromEntries(LIMIT_VARS.map((k) => [k, process.env[k]]));
const realUrl = process.env.DATABASE_URL!;

async function usePool(
	limits: { size: number; queue?: number; timeoutMs?: number },
	url = realUrl
) {
	await closeDb();
	process.env.DATABASE_URL = url;
	process.env.DB_POOL_SIZE = String(limits.size);
	process.env.DB_POOL_QUEUE_LIMIT = String(limits.queue ?? 100);
	process.env.DB_ACQUIRE_TIMEOUT_MS = String(limits.timeoutMs ?? 10_000);
}

beforeAll(resetDb);
afterEach(async () => {
	await closeDb();
	process.env.DATABASE_URL = realUrl;
});
afterAll(async () => {
	await closeDb();
	for (const k of LIMIT_VARS) {
		if (savedEnv[k] === undefined) delete process.env[k];
		else process.env[k] = savedEnv[k];
	}
});

/** A promise and the function that settles it. */
function gate() {
	let open = () => {};
	const closed = new Promise<void>((resolve) => (open = resolve));
	return { closed, open };
}

/** What a promise settled with, without throwing. */
const outcome = (p: Promise<unknown>) =>
	p.then(
		() => ({ ok: true as const, error: undefined }),
		(error: unknown) => ({ ok: false as const, error })
	);

const reasonOf = (e: unknown) => (e instanceof DatabaseBusyError ? e.reason : String(e));

/** Whether `err` is, or was caused by, a NestedConnectionError (Drizzle wraps driver errors). */
function isNesting(err: unknown): boolean {
	for (let e = err; e; e = (e as { cause?: unknown }).cause) {
		if (e instanceof NestedConnectionError) return true;
	}
	return false;
}

const HOUR = 3_600_000;
const ago = (hours: number) => new Date(Date.now() - hours * HOUR).toISOString();

/** Rejects after `ms` with a message that says what hung, so a wedge fails instead of hanging. */
function within<T>(ms: number, what: string, work: Promise<T>): Promise<T> {
	let timer: ReturnType<typeof setTimeout> | undefined;
	const deadline = new Promise<never>((_, reject) => {
		timer = setTimeout(() => reject(new Error(`${what}: no answer within ${ms} ms`)), ms);
	});
	return Promise.race([work, deadline]).finally(() => clearTimeout(timer));
}

describe('ingest under more concurrent batches than the pool has connections', () => {
	// A pool far smaller than the number of batches in flight: before the fix, each batch held a
	// connection while asking the pool for another (its policies), and at pool-size concurrent
	// batches every one waited for every other, for ever.
	const POOL_SIZE = 2;
	let tech: Actor;
	beforeAll(async () => {
		tech = await makeUser({ roles: ['technician'] });
	});

	it('answers every batch, stores every event once, and the state equals a rebuild', async () => {
		await usePool({ size: POOL_SIZE });
		const BATCHES = 12;
		const PER_BATCH = 50;
		// Fixtures of several types, some with own figures: several distinct policy lookups.
		const types = ['three-vee', 'trihedral-vee-flat', 'pallet', 'three-vee'] as const;
		const fixtures = await Promise.all(
			types.map((type, i) =>
				makeFixture({ type, repeatabilitySpec_um: i % 2 ? 2 + i : null, ratedLifeCycles: null })
			)
		);
		const batches = Array.from({ length: BATCHES }, (_, b) =>
			Array.from({ length: PER_BATCH }, (_, i) => ({
				id: randomUUID(),
				fixtureCode: fixtures[(b + i) % fixtures.length].code,
				kind: 'reseat',
				occurredAt: ago(48 - (b * PER_BATCH + i) / 100),
				payload: { readings: { dx: ((b + i) % 7) * 0.1, dz: -((b * i) % 5) * 0.05 } }
			}))
		);

		const results = await within(
			15_000,
			`${BATCHES} concurrent batches on a pool of ${POOL_SIZE}`,
			Promise.all(batches.map((events, b) => ingestBatch(tech, `phone-${b}`, events)))
		);
		for (const [b, answer] of results.entries()) {
			expect(answer.map((r) => r.status)).toEqual(batches[b].map(() => 'accepted'));
		}

		const ids = batches.flat().map((e) => e.id);
		const [stored] = await db
			.select({ n: count() })
			.from(schema.events)
			.where(inArray(schema.events.id, ids));
		expect(stored.n).toBe(BATCHES * PER_BATCH);

		const report = await rebuildStates({ ids: fixtures.map((f) => f.id) });
		expect(report.differing).toEqual([]);
	});
});

describe('the pool when it is full', () => {
	it('refuses at once beyond its queue, and a waiter gives up after the acquire timeout', async () => {
		await usePool({ size: 1, queue: 2, timeoutMs: 300 });
		const hold = gate();
		const holder = withConnection(() => hold.closed);
		try {
			await expect.poll(() => poolStats().inUse).toBe(1);
			const first = outcome(getPool().query('SELECT 1'));
			const second = outcome(getPool().query('SELECT 1'));
			expect(poolStats()).toEqual({ size: 1, inUse: 1, waiting: 2 });

			// The queue is full: refused without waiting, with a pause to suggest.
			const third = await outcome(getPool().query('SELECT 1'));
			expect(third.ok).toBe(false);
			expect(reasonOf(third.error)).toBe('queue-full');
			const pause = (third.error as DatabaseBusyError).retryAfterS;
			expect(pause).toBeGreaterThanOrEqual(1);
			expect(pause).toBeLessThanOrEqual(3);

			// The two in the queue give up after the acquire timeout.
			const queued = await Promise.all([first, second]);
			expect(queued.map((o) => reasonOf(o.error))).toEqual(['timeout', 'timeout']);
			expect(poolStats()).toEqual({ size: 1, inUse: 1, waiting: 0 });
		} finally {
			hold.open();
			await holder;
		}
		// Nothing leaked: the connection is free again and serves the next caller.
		expect(poolStats()).toEqual({ size: 1, inUse: 0, waiting: 0 });
		const [rows] = await getPool().query<mysql.RowDataPacket[]>('SELECT 1 AS one');
		expect(rows[0].one).toBe(1);
		expect(poolStats().inUse).toBe(0);
	});

	it('hands a connection freed in time to the first waiter', async () => {
		await usePool({ size: 1, queue: 5, timeoutMs: 5_000 });
		const hold = gate();
		const holder = withConnection(() => hold.closed);
		await expect.poll(() => poolStats().inUse).toBe(1);
		const waiting = getPool().query<mysql.RowDataPacket[]>('SELECT 2 AS two');
		expect(poolStats().waiting).toBe(1);
		hold.open();
		await holder;
		const [rows] = await waiting;
		expect(rows[0].two).toBe(2);
		expect(poolStats()).toEqual({ size: 1, inUse: 0, waiting: 0 });
	});

	it('a connection that arrives after its caller gave up goes back to the pool, not lost', async () => {
		// A loopback proxy that holds each new connection for a while before passing it on to
		// MariaDB: the caller's acquire timeout passes while the connection is still being made.
		const target = new URL(realUrl);
		const opened: net.Socket[] = [];
		let connections = 0;
		const proxy = net.createServer((client) => {
			connections++;
			opened.push(client);
			client.pause();
			setTimeout(() => {
				const upstream = net.connect(Number(target.port), target.hostname, () => {
					client.pipe(upstream).pipe(client);
					client.resume();
				});
				opened.push(upstream);
				upstream.on('error', () => client.destroy());
				client.on('error', () => upstream.destroy());
			}, 600);
		});
		await new Promise<void>((resolve) => proxy.listen(0, '127.0.0.1', resolve));
		try {
			const port = (proxy.address() as net.AddressInfo).port;
			const viaProxy = new URL(realUrl);
			viaProxy.port = String(port);
			await usePool({ size: 1, queue: 5, timeoutMs: 200 }, viaProxy.toString());

			const late = await outcome(getPool().query('SELECT 1'));
			expect(reasonOf(late.error)).toBe('timeout');
			// Until the connection is made, it still counts against the pool's size.
			expect(poolStats().inUse).toBe(1);
			await expect.poll(() => poolStats().inUse, { timeout: 5_000 }).toBe(0);

			// The next caller gets that connection (no second one is opened) and it works.
			const [rows] = await getPool().query<mysql.RowDataPacket[]>('SELECT 3 AS three');
			expect(rows[0].three).toBe(3);
			expect(connections).toBe(1);
		} finally {
			await closeDb();
			for (const s of opened) s.destroy();
			await new Promise((resolve) => proxy.close(resolve));
		}
	});
});

describe('the nesting guard (on in tests and development)', () => {
	it('refuses a pool request from inside withConnection, and gives the connection back', async () => {
		await usePool({ size: 2 });
		const nested = await outcome(withConnection(() => db.execute(sql`SELECT 1`)));
		expect(isNesting(nested.error)).toBe(true);
		expect(poolStats().inUse).toBe(0);
	});

	it('refuses a pool request from inside a transaction', async () => {
		await usePool({ size: 2 });
		const nested = db.transaction(async (tx) => {
			await tx.execute(sql`SELECT 1`);
			await getPool().query('SELECT 1');
		});
		expect(isNesting((await outcome(nested)).error)).toBe(true);
		expect(poolStats().inUse).toBe(0);
	});

	it('lets work go on after the hold ends', async () => {
		await usePool({ size: 2 });
		const value = await withConnection(async (conn) => {
			const [rows] = await conn.query<mysql.RowDataPacket[]>('SELECT 4 AS four');
			return rows[0].four as number;
		});
		expect(value).toBe(4);
		const [rows] = await getPool().query<mysql.RowDataPacket[]>('SELECT 5 AS five');
		expect(rows[0].five).toBe(5);
	});
});

describe('after the database drops every connection (as a restart does)', () => {
	it('discards the broken connections and the next requests work', async () => {
		const SIZE = 4;
		await usePool({ size: SIZE });
		// Fill the pool with open connections and learn their ids.
		const ids = await Promise.all(
			Array.from({ length: SIZE }, () =>
				withConnection(async (conn) => {
					const [rows] = await conn.query<mysql.RowDataPacket[]>(
						'SELECT CONNECTION_ID() AS id, SLEEP(0.05)'
					);
					return Number(rows[0].id);
				})
			)
		);
		expect(new Set(ids).size).toBe(SIZE);

		// Kill them on the server side, from a connection of our own.
		const admin = await mysql.createConnection({ uri: realUrl });
		try {
			for (const id of ids) await admin.query('KILL CONNECTION ?', [id]);
		} finally {
			await admin.end();
		}
		// The closed sockets reach the driver, which drops those connections from the pool.
		await new Promise((resolve) => setTimeout(resolve, 200));

		const after = await Promise.all(
			Array.from({ length: SIZE * 2 }, () =>
				getPool().query<mysql.RowDataPacket[]>('SELECT CONNECTION_ID() AS id')
			)
		);
		const fresh = new Set(after.map(([rows]) => Number(rows[0].id)));
		for (const id of ids) expect(fresh.has(id)).toBe(false);
		const [[row]] = (await db.execute(sql`SELECT 6 AS six`)) as unknown as [mysql.RowDataPacket[]];
		expect(row.six).toBe(6);
		expect(poolStats().inUse).toBe(0);
	});
});
