import {
	error,
	json,
	redirect,
	type Handle,
	type HandleServerError,
	type ServerInit
} from '@sveltejs/kit';
import { building } from '$app/environment';
import { env } from '$env/dynamic/private';
import { sequence } from '@sveltejs/kit/hooks';
import type { Role } from '$lib/schemas/roles';
import { apiJsonErrors, decodedPath, under } from '$lib/server/api-answers';
import { authHandle, type SessionWithId } from '$lib/server/auth';
import { config, configure } from '$lib/server/config';
import { startDueScan } from '$lib/server/due-scan';
import { formBodyCheck } from '$lib/server/form-body';
import { hasRole } from '$lib/server/guard';
import { pinOrigin } from '$lib/server/origin-handle';
import { overloadError, overloadHandle } from '$lib/server/overload';
import { securityHeaders } from '$lib/server/security-headers';
import { loadSessionUser } from '$lib/server/users';

/** API paths anyone may call without signing in. */
const PUBLIC_API = new Set(['/api/health']);

/** Pages anyone may open: the landing page (exactly) and the sign-in pages with what is below them. */
const PUBLIC_PAGES = ['/signin', '/signout'];
const PUBLIC_EXACT = new Set(['/']);

/** Route areas that need a role beyond being signed in. */
const ROLE_AREAS: { prefix: string; roles: readonly Role[] }[] = [
	{ prefix: '/admin', roles: ['admin'] },
	{ prefix: '/api/admin', roles: ['admin'] }
];

/** One line per request: method, path, status, time. Off with NESTMARK_REQUEST_LOG=off. */
const requestLog: Handle = async ({ event, resolve }) => {
	if (!config().requestLog) return resolve(event);
	const started = performance.now();
	const response = await resolve(event);
	const ms = (performance.now() - started).toFixed(0);
	console.log(`${event.request.method} ${event.url.pathname} ${response.status} ${ms}ms`);
	return response;
};

/**
 * Fills locals.user from the session, reading roles and the active flag from the database on
 * every request: a deactivated person is signed out at once, a role change applies at once.
 */
const locals: Handle = async ({ event, resolve }) => {
	// Auth.js re-issues the session cookie through SvelteKit's cookies without a `secure` flag,
	// and SvelteKit then marks it Secure even on plain http (a shop LAN), where browsers drop
	// it. Default `secure` to what the request really used instead.
	const secure = event.url.protocol === 'https:';
	const set = event.cookies.set.bind(event.cookies);
	event.cookies.set = (name, value, opts) =>
		set(name, value, { ...opts, secure: opts.secure ?? secure });

	// Public API answers (the health check) need nobody's identity, and must not wait on the pool.
	if (PUBLIC_API.has(event.url.pathname)) {
		event.locals.user = null;
		return resolve(event);
	}
	const session: SessionWithId | null = await event.locals.auth();
	const id = session?.user?.id;
	event.locals.user = id ? await loadSessionUser(id, session?.sessionId) : null;
	return resolve(event);
};

/**
 * The first line of the route guards (every load, action and endpoint checks again itself).
 * API: JSON 401/403. Pages: signed-out people go to the sign-in page; a missing role gets the
 * 403 page from the area's layout, and any other method is refused here.
 */
const guard: Handle = async ({ event, resolve }) => {
	// Judged on the path as routed: "/%61pi/sync" reaches /api/sync and is guarded as the API.
	const path = decodedPath(event.url.pathname) ?? event.url.pathname;
	const user = event.locals.user;
	const area = ROLE_AREAS.find((a) => under(path, a.prefix));

	if (under(path, '/api')) {
		if (PUBLIC_API.has(path)) return resolve(event);
		if (!user) return json({ error: 'Not signed in.' }, { status: 401 });
		if (area && !hasRole(user, area.roles)) {
			return json({ error: `Requires the ${area.roles.join(' or ')} role.` }, { status: 403 });
		}
		return resolve(event);
	}

	// Unknown paths fall through to the 404 page; /auth/** never reaches here for Auth.js actions.
	if (
		!event.route.id ||
		PUBLIC_EXACT.has(path) ||
		PUBLIC_PAGES.some((p) => under(path, p)) ||
		under(path, '/auth')
	) {
		return resolve(event);
	}
	if (!user) {
		const next = event.url.pathname + event.url.search;
		redirect(303, `/signin?next=${encodeURIComponent(next)}`);
	}
	if (area && !hasRole(user, area.roles)) {
		const method = event.request.method;
		if (method !== 'GET' && method !== 'HEAD') {
			error(403, { message: `This needs the ${area.roles.join(' or ')} role.` });
		}
	}
	return resolve(event);
};

// securityHeaders is first so it sees every answer, the rewritten ones included.
// apiJsonErrors stays outside overloadHandle: an overload thrown by the session lookup must reach
// overloadHandle (503 + Retry-After) before anything turns it into a JSON 500.
export const handle: Handle = sequence(
	securityHeaders,
	requestLog,
	apiJsonErrors,
	overloadHandle,
	pinOrigin,
	authHandle,
	locals,
	guard,
	formBodyCheck
);

/** Overloads (database pool saturated or unreachable) become 503 + Retry-After; see overload.ts. */
export const handleError: HandleServerError = ({ error, event, status, message }) => {
	const busy = overloadError(error, event);
	if (busy) return busy;
	// As SvelteKit's default: one line for a 404, with the stack for anything else.
	const where = `[${status}] ${event.request.method} ${event.url.pathname}`;
	if (status === 404) console.error(where);
	else console.error(where, error);
	return { message };
};

/**
 * Checks the environment once, at start (a bad or missing variable stops the server with a
 * message naming it), then starts the calendar scan (cleaning and inspection due by days).
 */
export const init: ServerInit = () => {
	if (building) return;
	configure(env);
	startDueScan();
};
