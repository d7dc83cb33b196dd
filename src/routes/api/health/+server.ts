import { json } from '@sveltejs/kit';
import { poolStats, probeDatabase } from '$lib/server/db';
import pkg from '../../../../package.json';
import type { RequestHandler } from './$types';

/** Longest the database may take to answer before it counts as down. */
const DB_TIMEOUT_MS = 3000;

/**
 * Is the app up, and can it reach its database? Public, for load balancers and monitoring. The
 * database is asked on a connection of the check's own, never one of the app's pool, so the answer
 * stays true while a burst of syncs keeps every pooled connection busy; `pool` says how busy.
 */
export const GET: RequestHandler = async () => {
	const database = (await probeDatabase(DB_TIMEOUT_MS)) ? 'ok' : 'down';
	return json(
		{ app: 'ok', database, version: pkg.version, pool: poolStats() },
		{ status: database === 'ok' ? 200 : 503, headers: { 'cache-control': 'no-store' } }
	);
};
