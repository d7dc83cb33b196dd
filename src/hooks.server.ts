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
import { can, refusal } from '$lib/permissions';
import { apiJsonErrors, decodedPath, under } from '$lib/server/api-answers';
import { authHandle, type SessionWithId } from '$lib/server/auth';
import { config, configure } from '$lib/server/config';
import { startDueScan } from '$lib/server/due-scan';
import { formBodyCheck } from '$lib/server/form-body';
import { forbiddenJson } from '$lib/server/guard';
import { pinOrigin } from '$lib/server/origin-handle';
import { overloadError, overloadHandle } from '$lib/server/overload';
import { accessFor } from '$lib/server/route-access';
import { securityHeaders } from '$lib/server/security-headers';
import { loadSessionUser } from '$lib/server/users';

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
	const publicApi =
		!!event.route.id &&
		under(event.route.id, '/api') &&
		accessFor(event.route.id, event.request.method, event.url) === 'public';
	if (publicApi) {
		event.locals.user = null;
		return resolve(event);
	}
	const session: SessionWithId | null = await event.locals.auth();
	const id = session?.user?.id;
	event.locals.user = id ? await loadSessionUser(id, session?.sessionId) : null;
	return resolve(event);
};

/**
 * The first line of the route guards, from the route table (route-access.ts); every load, action
 * and endpoint checks again itself. API: JSON 401/403. Pages: signed-out people go to the sign-in
 * page; a page opened without the needed role gets the 403 page from its own load (an error
 * thrown here would show the bare fallback page), and a form post without it is refused here.
 */
const guard: Handle = async ({ event, resolve }) => {
	// Judged on the path as routed: "/%61pi/sync" reaches /api/sync and is guarded as the API.
	const path = decodedPath(event.url.pathname) ?? event.url.pathname;
	const api = under(path, '/api');
	const user = event.locals.user;
	const routeId = event.route.id;

	// Unknown paths: the API still wants a session first; pages fall through to the 404 page.
	// /auth/** never reaches here for Auth.js's own actions.
	if (!routeId) {
		if (api && !user) return json({ error: 'Not signed in.' }, { status: 401 });
		return resolve(event);
	}

	const access = accessFor(routeId, event.request.method, event.url);
	if (access === 'public') return resolve(event);
	if (!user) {
		if (api) return json({ error: 'Not signed in.' }, { status: 401 });
		const next = event.url.pathname + event.url.search;
		redirect(303, `/signin?next=${encodeURIComponent(next)}`);
	}
	if (access === 'signed-in' || (access && can(user, access))) return resolve(event);

	// A route missing from the table is refused to everyone until it has an entry.
	if (!access) console.error(`[guard] ${routeId} has no entry in the route table`);
	const message = access ? refusal(access) : 'This address has no access rule yet.';
	if (api) return forbiddenJson(message);
	const method = event.request.method;
	if (access && (method === 'GET' || method === 'HEAD')) return resolve(event);
	error(403, { message });
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
