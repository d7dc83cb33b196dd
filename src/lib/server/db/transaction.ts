/**
 * Transactions on a held connection, retried when MariaDB gives up on them for reasons of
 * timing rather than content: a deadlock (1213) or a lock wait timeout (1205). Both undo the
 * statement or the whole transaction, so the work is run again from the start, after a short
 * random pause that keeps two retrying writers from meeting again in step.
 *
 * Runs on a connection the caller holds (see withConnection in ./index.ts): everything `work`
 * reads or writes goes through that connection, never through the pool.
 */
import type { PoolConnection } from 'mysql2/promise';
import { drizzle, type MySql2Database } from 'drizzle-orm/mysql2';
import type mysql from 'mysql2/promise';
import { withConnection } from './index';
import * as schema from './schema';

/** MariaDB: deadlock found when trying to get lock. */
export const ER_LOCK_DEADLOCK = 1213;
/** MariaDB: lock wait timeout exceeded. */
export const ER_LOCK_WAIT_TIMEOUT = 1205;

/** The MariaDB error number of an error, also when Drizzle wrapped it. */
export function errnoOf(err: unknown): number | undefined {
	const e = err as { errno?: number; cause?: { errno?: number } } | null;
	return e?.errno ?? e?.cause?.errno;
}

/** A deadlock or lock wait timeout: the same work may well succeed when run again. */
export function isLockConflict(err: unknown): boolean {
	const errno = errnoOf(err);
	return errno === ER_LOCK_DEADLOCK || errno === ER_LOCK_WAIT_TIMEOUT;
}

/** Options of transactionOn. */
export interface TransactionOptions {
	/** Runs of `work` in all, the first included (default 4; 1 never retries). */
	attempts?: number;
	/** Which errors are worth another run (default: deadlock and lock wait timeout). */
	retryable?: (err: unknown) => boolean;
	/** Called before each new run, to forget what the failed one left in memory. */
	beforeRetry?: () => void;
}

const pause = (attempt: number) =>
	new Promise((resolve) => setTimeout(resolve, Math.random() * 20 * attempt));

/**
 * Runs `work` in one READ COMMITTED transaction on `conn`: committed when it returns, rolled back
 * when it throws. A retryable failure runs it again (see TransactionOptions).
 */
export async function transactionOn<T>(
	conn: PoolConnection,
	work: (conn: PoolConnection) => Promise<T>,
	options: TransactionOptions = {}
): Promise<T> {
	const attempts = options.attempts ?? 4;
	const retryable = options.retryable ?? isLockConflict;
	for (let attempt = 1; ; attempt++) {
		await conn.query('SET TRANSACTION ISOLATION LEVEL READ COMMITTED');
		await conn.beginTransaction();
		try {
			const out = await work(conn);
			await conn.commit();
			return out;
		} catch (err) {
			await conn.rollback().catch(() => undefined);
			if (attempt >= attempts || !retryable(err)) throw err;
		}
		options.beforeRetry?.();
		await pause(attempt);
	}
}

/** transactionOn with a connection of its own from the pool, given back afterwards. */
export function inTransaction<T>(
	work: (conn: PoolConnection) => Promise<T>,
	options: TransactionOptions = {}
): Promise<T> {
	return withConnection((conn) => transactionOn(conn, work, options));
}

/** Drizzle over a connection the caller holds (inside its transaction, when one is open). */
export function drizzleOn(conn: PoolConnection): MySql2Database<typeof schema> {
	return drizzle({ client: conn as unknown as mysql.Connection, schema, mode: 'default' });
}
