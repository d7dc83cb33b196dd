/**
 * Overload answers: when the database pool cannot give a connection in time (its wait queue is
 * full, or the acquire timeout passed — see db/pool.ts) or the database cannot be reached, the
 * request is answered 503 with a Retry-After header instead of a 500 or a hang. /api/* gets JSON
 * `{ error }`; pages get the error page with the busy copy. The phone's outbox keeps the batch
 * and sends it again after the pause the header names.
 *
 * Two ways such an error reaches us: thrown out of a handle (the session lookup runs in one) —
 * `overloadHandle` catches it; or thrown inside a route, where SvelteKit turns it into a 500
 * after calling handleError — `overloadError` notes it there, and `overloadHandle` rewrites that
 * answer on its way out.
 */
import type { Handle, RequestEvent } from '@sveltejs/kit';
import { apiError } from './api-answers';
import { DatabaseBusyError } from './db';

/** Seconds to wait before retrying when the database itself cannot be reached (restart, failover). */
const UNREACHABLE_RETRY_AFTER_S = 5;

/** mysql2 / MariaDB errors that mean the database is not reachable right now, not a bad query. */
const UNREACHABLE_CODES = new Set([
	'ECONNREFUSED',
	'ECONNRESET',
	'ETIMEDOUT',
	'EPIPE',
	'PROTOCOL_CONNECTION_LOST',
	'PROTOCOL_SEQUENCE_TIMEOUT',
	// Too many connections; server shutting down; connection killed (a restart under way).
	'ER_CON_COUNT_ERROR',
	'ER_SERVER_SHUTDOWN',
	'ER_CONNECTION_KILLED'
]);

/** Why a request cannot be served now, and when to try again. */
export interface Unavailable {
	retryAfterS: number;
	message: string;
}

/**
 * The next error down the chain: Drizzle wraps driver errors in `cause`; Auth.js wraps what its
 * callbacks threw as `cause: { err }` (a sign-in while the pool is full).
 */
function inner(e: unknown): unknown {
	const cause = (e as { cause?: unknown }).cause;
	if (cause && typeof cause === 'object' && !(cause instanceof Error) && 'err' in cause) {
		return (cause as { err: unknown }).err;
	}
	return cause;
}

/** The overload hidden in `err` (wrapped by Drizzle or Auth.js), or null. */
export function unavailable(err: unknown): Unavailable | null {
	for (let e: unknown = err, depth = 0; e && depth < 8; e = inner(e)) {
		depth++;
		if (e instanceof DatabaseBusyError) {
			return {
				retryAfterS: e.retryAfterS,
				message: `Nestmark is busy right now. Try again in ${e.retryAfterS} s.`
			};
		}
		const code = (e as { code?: unknown }).code;
		if (typeof code === 'string' && UNREACHABLE_CODES.has(code)) {
			return {
				retryAfterS: UNREACHABLE_RETRY_AFTER_S,
				message: `The database cannot be reached right now. Try again in ${UNREACHABLE_RETRY_AFTER_S} s.`
			};
		}
	}
	return null;
}

/** Requests whose route failed with an overload, noted by handleError for overloadHandle. */
const noted = new WeakMap<Request, Unavailable>();

/**
 * For handleError: notes an overload so the answer becomes a 503, and gives the error page its
 * busy copy (`code: 'busy'`). Undefined for every other error. Logs one line, not a stack:
 * under a burst a stack per refused request would drown the log.
 */
export function overloadError(error: unknown, event: RequestEvent): App.Error | undefined {
	const u = unavailable(error);
	if (!u) return undefined;
	noted.set(event.request, u);
	console.warn(`overload: ${event.request.method} ${event.url.pathname}: ${u.message}`);
	return { message: u.message, code: 'busy' };
}

const escapeHtml = (s: string) =>
	s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

function overloadResponse(event: RequestEvent, u: Unavailable, page?: Response): Response {
	const headers = { 'retry-after': String(u.retryAfterS), 'cache-control': 'no-store' };
	const path = event.url.pathname;
	if (path === '/api' || path.startsWith('/api/')) {
		return apiError(503, u.message, undefined, { headers });
	}
	if (page) {
		// The error page SvelteKit rendered (with the busy copy), answered as what it is.
		const out = new Headers(page.headers);
		for (const [k, v] of Object.entries(headers)) out.set(k, v);
		return new Response(page.body, { status: 503, headers: out });
	}
	// Thrown before any route ran (the session lookup): a plain page that says what happened and
	// comes back by itself when it was a page load.
	const again =
		event.request.method === 'GET' ? `<meta http-equiv="refresh" content="${u.retryAfterS}">` : '';
	const here = escapeHtml(event.url.pathname + event.url.search);
	const html = `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">${again}<title>Busy for a moment · Nestmark</title></head><body><main><p>Error 503</p><h1>Busy for a moment</h1><p>${escapeHtml(u.message)}</p><p><a href="${here}">Try again</a></p></main></body></html>`;
	return new Response(html, {
		status: 503,
		headers: { ...headers, 'content-type': 'text/html; charset=utf-8' }
	});
}

/**
 * Answers overloads with 503 + Retry-After. Goes before the handles that use the database (the
 * session lookup), so their overloads reach it as exceptions.
 */
export const overloadHandle: Handle = async ({ event, resolve }) => {
	let response: Response;
	try {
		response = await resolve(event);
	} catch (err) {
		const u = unavailable(err);
		if (!u) throw err;
		console.warn(`overload: ${event.request.method} ${event.url.pathname}: ${u.message}`);
		return overloadResponse(event, u);
	}
	const u = noted.get(event.request);
	// Data requests of client-side navigation carry the error in their body; the page shows it.
	if (!u || response.status < 500 || event.isDataRequest) return response;
	return overloadResponse(event, u, response);
};
