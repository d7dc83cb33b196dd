import { json } from '@sveltejs/kit';
import { sql } from 'drizzle-orm';
import { db } from '$lib/server/db';
import pkg from '../../../../package.json';
import type { RequestHandler } from './$types';

const DB_TIMEOUT_MS = 3000;

/** Is the app up, and can it reach its database? Public, for load balancers and monitoring. */
export const GET: RequestHandler = async () => {
	let database: 'ok' | 'down' = 'ok';
	let timer: ReturnType<typeof setTimeout> | undefined;
	try {
		await Promise.race([
			db.execute(sql`SELECT 1`),
			new Promise((_, reject) => {
				timer = setTimeout(() => reject(new Error('no answer in time')), DB_TIMEOUT_MS);
			})
		]);
	} catch {
		// The answer itself says the database is down; there is nothing more to report here.
		database = 'down';
	} finally {
		clearTimeout(timer);
	}
	return json(
		{ app: 'ok', database, version: pkg.version },
		{ status: database === 'ok' ? 200 : 503, headers: { 'cache-control': 'no-store' } }
	);
};
