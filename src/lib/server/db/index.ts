import { drizzle, type MySql2Database } from 'drizzle-orm/mysql2';
import mysql, { type PoolConnection } from 'mysql2/promise';
import { asHolder, GatedPool, poolLimits, type AppPool, type PoolStats } from './pool';
import { config } from '../config';
import * as schema from './schema';

export { schema };
export {
	DatabaseBusyError,
	NestedConnectionError,
	poolLimits,
	type AppPool,
	type PoolLimits,
	type PoolStats
} from './pool';
export type Db = MySql2Database<typeof schema>;

let pool: GatedPool | undefined;
let instance: Db | undefined;
let closingOnShutdown = false;

/** The connection URL (DATABASE_URL), for the app and the scripts alike. */
export function databaseUrl(): string {
	const url = config().databaseUrl;
	if (!url) throw new Error('DATABASE_URL is not set (see .env.example)');
	return url;
}

/** Options every connection of the app shares. */
const CONNECTION_OPTIONS = {
	// Every DATETIME is UTC; the app converts for display.
	timezone: 'Z',
	dateStrings: false,
	supportBigNumbers: true
} as const;

function gatedPool(): GatedPool {
	if (!pool) {
		const limits = poolLimits();
		const inner = mysql.createPool({
			uri: databaseUrl(),
			connectionLimit: limits.size,
			// Idle connections are closed after a minute (a restarted MariaDB has closed them anyway).
			maxIdle: limits.size,
			idleTimeout: 60_000,
			// TCP keep-alive notices a peer that vanished without closing (a crashed host).
			enableKeepAlive: true,
			...CONNECTION_OPTIONS
		});
		pool = new GatedPool(inner, limits);
		if (!closingOnShutdown) {
			closingOnShutdown = true;
			// adapter-node emits this once it stopped taking requests (SIGTERM, SIGINT): open
			// connections would otherwise keep `node build` alive after it was asked to stop.
			process.once('sveltekit:shutdown', () => void closeDb());
		}
	}
	return pool;
}

/**
 * The shared pool, created on first use so that building the app needs no database. Bounded:
 * callers wait at most DB_ACQUIRE_TIMEOUT_MS, at most DB_POOL_QUEUE_LIMIT of them, and are
 * otherwise refused with DatabaseBusyError (see ./pool.ts).
 */
export function getPool(): AppPool {
	return gatedPool();
}

/** What the pool is doing now: its size, holders and waiters. */
export function poolStats(): PoolStats {
	return pool?.stats() ?? { size: poolLimits().size, inUse: 0, waiting: 0 };
}

/**
 * Runs `fn` with one connection of the pool and gives it back afterwards. Never ask the pool
 * for anything inside `fn` (no `db`, no getPool(), no service function that uses them): pass
 * `conn` down instead. In tests and development a request for a second connection from inside
 * throws NestedConnectionError; in production it would wait, and at pool-size concurrency wedge.
 */
export async function withConnection<T>(fn: (conn: PoolConnection) => Promise<T>): Promise<T> {
	const conn = await gatedPool().getConnection();
	try {
		return await asHolder(() => fn(conn));
	} finally {
		conn.release();
	}
}

/** The Drizzle database. */
export function getDb(): Db {
	if (!instance) {
		const real = drizzle({
			client: gatedPool() as unknown as mysql.Pool,
			schema,
			mode: 'default'
		});
		// A transaction holds a connection: inside it, only `tx` may be used (the nesting guard
		// then catches a stray `db` in tests and development). The Auth.js adapter gets this
		// instance too.
		const begin = real.transaction.bind(real);
		real.transaction = ((fn, config) =>
			begin((tx) => asHolder(() => fn(tx)), config)) as typeof real.transaction;
		instance = real;
	}
	return instance;
}

/** Lazily-connected Drizzle instance: `db.select()…` works without an explicit connect step. */
export const db: Db = new Proxy({} as Db, {
	get(_target, prop) {
		const real = getDb() as unknown as Record<string | symbol, unknown>;
		const value = real[prop];
		return typeof value === 'function' ? (value as (...a: unknown[]) => unknown).bind(real) : value;
	}
});

/* ------------------------------------------------------------------------------------------ */
/* The health probe: a connection of its own, never one of the pool's                          */

let probeConn: mysql.Connection | undefined;
let probing: Promise<boolean> | undefined;

function dropProbe(conn: mysql.Connection | undefined): void {
	if (!conn) return;
	if (probeConn === conn) probeConn = undefined;
	conn.destroy();
}

async function probeOnce(timeoutMs: number): Promise<boolean> {
	let timer: ReturnType<typeof setTimeout> | undefined;
	let gaveUp = false;
	let conn = probeConn;
	const work = (async () => {
		if (!conn) {
			const fresh = await mysql.createConnection({
				uri: databaseUrl(),
				connectTimeout: timeoutMs,
				...CONNECTION_OPTIONS
			});
			// A connection that breaks while idle (MariaDB restarted) is dropped, not thrown.
			fresh.on('error', () => dropProbe(fresh));
			conn = fresh;
			// Kept for the next probe only if this one is still waited for.
			if (gaveUp) throw new Error('too late');
			probeConn = fresh;
		}
		await conn.query('SELECT 1');
	})();
	try {
		await Promise.race([
			work,
			new Promise((_, reject) => {
				// Given up only after one more turn for I/O: on a busy event loop the timer can come
				// due in the same turn as the answer, and timers run first.
				timer = setTimeout(
					() => setImmediate(() => reject(new Error('no answer in time'))),
					timeoutMs
				);
			})
		]);
		return true;
	} catch {
		gaveUp = true;
		// Start afresh next time; a late answer on this connection no longer matters.
		dropProbe(conn);
		work.catch(() => dropProbe(conn));
		return false;
	} finally {
		clearTimeout(timer);
	}
}

/**
 * Is the database answering? Asked on a dedicated connection, outside the app's pool, so the
 * answer stays true (and quick) while the pool is saturated; at most `timeoutMs`. Concurrent
 * callers share one probe, so a flood of health checks costs the database one query at a time.
 */
export function probeDatabase(timeoutMs = 2000): Promise<boolean> {
	probing ??= probeOnce(timeoutMs).finally(() => {
		probing = undefined;
	});
	return probing;
}

/** Closes the pool and the health probe's connection (scripts and tests, so the process can exit). */
export async function closeDb(): Promise<void> {
	const closing = pool;
	pool = undefined;
	instance = undefined;
	dropProbe(probeConn);
	await closing?.end();
}
