/**
 * The app's connection pool: mysql2's pool behind a gate that gives it what mysql2 lacks — a
 * bounded wait queue and an acquire timeout — and a guard against holding one connection while
 * asking for another.
 *
 * Why a gate of our own: a mysql2 pool queues callers for ever and without limit, so a burst
 * larger than the pool turns into requests that never answer, and one code path that takes a
 * second connection while holding one wedges the whole server once every connection is held that
 * way. Here at most `size` callers hold a connection; up to `queueLimit` more wait, each at most
 * `acquireTimeoutMs`; anyone beyond that is refused at once with a DatabaseBusyError, which the
 * server answers with 503 and Retry-After (./overload.ts) instead of hanging.
 *
 * The gate counts permits, not connections: mysql2 still opens, reuses and discards the
 * connections (a connection that broke — say MariaDB restarted — leaves mysql2's pool on its
 * `end`/`error` event and the next caller gets a fresh one). Because the gate never lets more
 * than `size` callers in, mysql2's own unbounded queue is never used.
 */
import { AsyncLocalStorage } from 'node:async_hooks';
import type { Pool, PoolConnection } from 'mysql2/promise';
import { config, parseConfig, type Env } from '../config';

/** How big the pool is and how long and how many may wait for it. */
export interface PoolLimits {
	/** Connections at most (DB_POOL_SIZE). */
	size: number;
	/** Callers that may wait for a connection at once (DB_POOL_QUEUE_LIMIT). */
	queueLimit: number;
	/** How long one caller waits for a connection before giving up (DB_ACQUIRE_TIMEOUT_MS). */
	acquireTimeoutMs: number;
}

export { DEFAULT_POOL_LIMITS } from '../config';

/** The pool limits from the configuration (or from `env`, checked the same way). */
export function poolLimits(env?: Env): PoolLimits {
	return (env ? parseConfig(env) : config()).pool;
}

/** The pool could not give a connection in time: too many requests at once. Answered with 503. */
export class DatabaseBusyError extends Error {
	readonly code = 'NESTMARK_DB_BUSY';
	constructor(
		readonly reason: 'queue-full' | 'timeout',
		/** Seconds after which a retry is sensible (the Retry-After header). */
		readonly retryAfterS: number
	) {
		super(
			reason === 'queue-full'
				? 'The database pool is saturated and its wait queue is full.'
				: 'No database connection became free in time.'
		);
		this.name = 'DatabaseBusyError';
	}
}

/**
 * A code path asked the pool for a connection while it already held one (only raised where the
 * guard is on: tests and development). In production the second request would only wait, and at
 * pool-size concurrency every holder waits for every other — the wedge this guard exists to catch.
 */
export class NestedConnectionError extends Error {
	constructor() {
		super(
			'A database connection was requested while this code path already holds one (a transaction ' +
				'or withConnection). Pass the connection or transaction down, or read what is needed ' +
				'before taking it.'
		);
		this.name = 'NestedConnectionError';
	}
}

/** Marks the async context that holds a connection; `held` goes false when it is given back. */
interface Holding {
	held: boolean;
}
const holding = new AsyncLocalStorage<Holding>();

/** Whether nesting is refused: in tests and development (NESTMARK_ENV, or under vitest). */
export function nestingGuardOn(env?: Env): boolean {
	return (env ? parseConfig(env) : config()).nestingGuard;
}

/**
 * Runs `fn` marked as holding a connection: a request for another connection from inside it (in
 * tests and development) throws NestedConnectionError instead of waiting.
 */
export async function asHolder<T>(fn: () => Promise<T>): Promise<T> {
	const mark: Holding = { held: true };
	try {
		return await holding.run(mark, fn);
	} finally {
		// Work started inside but still running later (a mail sent without waiting) is no longer
		// inside the hold.
		mark.held = false;
	}
}

function assertNotHolding(guard: boolean): void {
	if (guard && holding.getStore()?.held) throw new NestedConnectionError();
}

interface Waiter {
	grant: () => void;
	refuse: (err: Error) => void;
	timer: ReturnType<typeof setTimeout>;
}

/** What the pool is doing now (for /api/health and tests). */
export interface PoolStats {
	size: number;
	/** Callers holding a connection (or connecting). */
	inUse: number;
	/** Callers waiting for one. */
	waiting: number;
}

/** The query interface the app and Drizzle use: mysql2's pool, minus what bypasses the gate. */
export type AppPool = Pick<Pool, 'query' | 'execute' | 'getConnection'>;

/** mysql2's pool behind the gate. */
export class GatedPool {
	readonly limits: PoolLimits;
	readonly #inner: Pool;
	readonly #guard: boolean;
	#inUse = 0;
	readonly #waiters: Waiter[] = [];
	#closed = false;

	constructor(inner: Pool, limits: PoolLimits, options: { guard?: boolean } = {}) {
		this.#inner = inner;
		this.limits = limits;
		this.#guard = options.guard ?? nestingGuardOn();
	}

	/** Now: holders and waiters. */
	stats(): PoolStats {
		return { size: this.limits.size, inUse: this.#inUse, waiting: this.#waiters.length };
	}

	/**
	 * A sensible Retry-After, in whole seconds: spread at random over 1..max(3, timeout in s), so
	 * the phones refused together do not all come back in the same second and be refused again.
	 */
	retryAfterS(): number {
		const span = Math.max(3, Math.ceil(this.limits.acquireTimeoutMs / 1000));
		return 1 + Math.floor(Math.random() * span);
	}

	/** Takes a permit, waiting in the bounded queue at most `timeoutMs`. */
	#permit(timeoutMs: number): Promise<void> {
		if (this.#closed) return Promise.reject(new Error('Pool is closed.'));
		if (this.#inUse < this.limits.size) {
			this.#inUse++;
			return Promise.resolve();
		}
		if (this.#waiters.length >= this.limits.queueLimit) {
			return Promise.reject(new DatabaseBusyError('queue-full', this.retryAfterS()));
		}
		return new Promise((resolve, reject) => {
			const waiter: Waiter = {
				grant: resolve,
				refuse: reject,
				timer: setTimeout(() => {
					// Out of the queue before giving up, so no permit is ever handed to a caller that
					// has left (the permit goes to the next waiter instead).
					const at = this.#waiters.indexOf(waiter);
					if (at >= 0) this.#waiters.splice(at, 1);
					reject(new DatabaseBusyError('timeout', this.retryAfterS()));
				}, timeoutMs)
			};
			this.#waiters.push(waiter);
		});
	}

	/** Gives a permit back: to the first waiter (the count stays), or to the pool. */
	#unpermit(): void {
		const next = this.#waiters.shift();
		if (next) {
			clearTimeout(next.timer);
			next.grant();
		} else {
			this.#inUse--;
		}
	}

	/**
	 * A connection of the pool; call `release()` (or `destroy()`) when done. Waits at most the
	 * acquire timeout in all, the wait for a permit and the connecting together. Drizzle takes its
	 * transactions' connections here; app code uses withConnection (./index.ts), which also marks
	 * the hold for the nesting guard.
	 */
	async getConnection(): Promise<PoolConnection> {
		assertNotHolding(this.#guard);
		const deadline = Date.now() + this.limits.acquireTimeoutMs;
		await this.#permit(this.limits.acquireTimeoutMs);
		const conn = await this.#connect(deadline);
		let returned = false;
		const giveBack = () => {
			if (returned) return;
			returned = true;
			this.#unpermit();
		};
		// The connection goes back to mysql2 first, then the permit to the next waiter, which
		// then finds it free. Patched on this acquisition's wrapper only (mysql2 makes a new one
		// per getConnection).
		const release = conn.release.bind(conn);
		const destroy = conn.destroy.bind(conn);
		conn.release = () => {
			if (!returned) release();
			giveBack();
		};
		conn.destroy = () => {
			if (!returned) destroy();
			giveBack();
		};
		return conn;
	}

	/**
	 * mysql2's getConnection within what is left of the acquire timeout; gives the permit back
	 * whenever no connection comes of it. A connection that arrives after the caller gave up is
	 * released at once, and only then is the permit given back, so the gate never lets more than
	 * `size` connections be open or opening.
	 */
	#connect(deadline: number): Promise<PoolConnection> {
		const pending = this.#inner.getConnection();
		return new Promise<PoolConnection>((resolve, reject) => {
			let gaveUp = false;
			const timer = setTimeout(
				() => {
					gaveUp = true;
					reject(new DatabaseBusyError('timeout', this.retryAfterS()));
				},
				Math.max(0, deadline - Date.now())
			);
			pending.then(
				(conn) => {
					if (gaveUp) {
						conn.release();
						this.#unpermit();
						return;
					}
					clearTimeout(timer);
					resolve(conn);
				},
				(err) => {
					this.#unpermit();
					if (gaveUp) return;
					clearTimeout(timer);
					reject(err);
				}
			);
		});
	}

	/** One statement on a connection of its own, given back as soon as the answer is in. */
	query: AppPool['query'] = (async (...args: unknown[]) => {
		const conn = await this.getConnection();
		try {
			return await (conn.query as (...a: unknown[]) => Promise<unknown>)(...args);
		} finally {
			conn.release();
		}
	}) as AppPool['query'];

	/** One prepared statement on a connection of its own. */
	execute: AppPool['execute'] = (async (...args: unknown[]) => {
		const conn = await this.getConnection();
		try {
			return await (conn.execute as (...a: unknown[]) => Promise<unknown>)(...args);
		} finally {
			conn.release();
		}
	}) as AppPool['execute'];

	/** Refuses every waiter and closes mysql2's pool. */
	async end(): Promise<void> {
		this.#closed = true;
		for (const w of this.#waiters.splice(0)) {
			clearTimeout(w.timer);
			w.refuse(new Error('Pool is closed.'));
		}
		await this.#inner.end();
	}
}
