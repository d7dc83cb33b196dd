/**
 * Counts the SQL statements a piece of work sends, two ways: every call of the app pool's query
 * and execute (wrapped while `work` runs), and the server's own count of statements received
 * (Questions, read on a connection of its own; meaningful on the quiet test database).
 */
import mysql, { type RowDataPacket } from 'mysql2/promise';
import { getPool } from '$lib/server/db';

type Pool = { query: (...a: unknown[]) => unknown; execute: (...a: unknown[]) => unknown };

/** Runs `work`, returning its result with the statements counted at the pool and the server. */
export async function countStatements<T>(
	work: () => Promise<T>
): Promise<{ pool: number; server: number; result: T }> {
	const pool = getPool() as unknown as Pool;
	const { query, execute } = pool;
	let sent = 0;
	pool.query = (...a: unknown[]) => (sent++, query.apply(pool, a));
	pool.execute = (...a: unknown[]) => (sent++, execute.apply(pool, a));
	const watcher = await mysql.createConnection({ uri: process.env.DATABASE_URL });
	const questions = async () => {
		const [rows] = await watcher.query<RowDataPacket[]>("SHOW GLOBAL STATUS LIKE 'Questions'");
		return Number(rows[0].Value);
	};
	try {
		const before = await questions();
		const result = await work();
		const after = await questions();
		// The second SHOW counts itself.
		return { pool: sent, server: after - before - 1, result };
	} finally {
		pool.query = query;
		pool.execute = execute;
		await watcher.end();
	}
}
