import { drizzle, type MySql2Database } from 'drizzle-orm/mysql2';
import mysql from 'mysql2/promise';
import * as schema from './schema';

export { schema };
export type Db = MySql2Database<typeof schema>;

let pool: mysql.Pool | undefined;
let instance: Db | undefined;

/** The connection URL; read from the process environment so scripts and the app share it. */
export function databaseUrl(): string {
	const url = process.env.DATABASE_URL;
	if (!url) throw new Error('DATABASE_URL is not set (see .env.example)');
	return url;
}

/** The shared pool, created on first use so that building the app needs no database. */
export function getPool(): mysql.Pool {
	pool ??= mysql.createPool({
		uri: databaseUrl(),
		connectionLimit: Number(process.env.DB_POOL_SIZE ?? 10),
		// Every DATETIME is UTC; the app converts for display.
		timezone: 'Z',
		dateStrings: false,
		supportBigNumbers: true
	});
	return pool;
}

/** The Drizzle database. */
export function getDb(): Db {
	instance ??= drizzle({ client: getPool(), schema, mode: 'default' });
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

/** Closes the pool (scripts and tests call this so the process can exit). */
export async function closeDb(): Promise<void> {
	await pool?.end();
	pool = undefined;
	instance = undefined;
}
