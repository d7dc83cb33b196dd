/**
 * Applies the Drizzle migrations in ./drizzle to the database named by DATABASE_URL.
 * Run through `npm run db:migrate` (which fills in the local defaults) or scripts/nestmark.sh.
 */
import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { drizzle } from 'drizzle-orm/mysql2';
import { migrate } from 'drizzle-orm/mysql2/migrator';
import mysql from 'mysql2/promise';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const migrationsFolder = join(root, 'drizzle');
const journal = join(migrationsFolder, 'meta', '_journal.json');
const migrationsTable = '__drizzle_migrations';

/** Counts the migrations already recorded as applied (0 before the first run). */
async function appliedCount(conn: mysql.Connection): Promise<number> {
	const [tables] = await conn.query<mysql.RowDataPacket[]>('SHOW TABLES LIKE ?', [migrationsTable]);
	if (tables.length === 0) return 0;
	const [rows] = await conn.query<mysql.RowDataPacket[]>(
		`SELECT COUNT(*) AS n FROM \`${migrationsTable}\``
	);
	return Number(rows[0].n);
}

/** Applies pending migrations and reports how many were applied. */
async function main(): Promise<void> {
	const url = process.env.DATABASE_URL;
	if (!url) {
		throw new Error('DATABASE_URL is not set (use `npm run db:migrate`, which sets the defaults)');
	}
	const target = new URL(url);
	const where = `${target.hostname}:${target.port || 3306}${target.pathname}`;

	if (!existsSync(journal)) {
		console.log(`migrate: no migrations in drizzle/ yet; nothing to apply to ${where}`);
		return;
	}

	const conn = await mysql.createConnection({ uri: url });
	try {
		const before = await appliedCount(conn);
		await migrate(drizzle(conn), { migrationsFolder, migrationsTable });
		const after = await appliedCount(conn);
		console.log(
			`migrate: ${after - before} migration(s) applied to ${where} (${after} applied in total)`
		);
	} finally {
		await conn.end();
	}
}

main().catch((err: unknown) => {
	console.error('migrate: failed:', err instanceof Error ? err.message : err);
	process.exit(1);
});
