/**
 * Every answer under /api is JSON, errors included: `{ error, fields? }`. Handlers answer so
 * themselves; this handle covers what SvelteKit answers before or around them — an unknown path
 * (an HTML 404 page), a method the endpoint lacks (text 405), an address that cannot be decoded
 * (400), an error thrown anywhere below (500) — and keeps their status and headers (Allow).
 */
import { isHttpError, isRedirect, json, type Handle } from '@sveltejs/kit';

/** Messages by field: every field has a list, even of one. */
export type FieldMessages = Record<string, string[]>;

/** The one body of every API error answer. */
export interface ApiErrorBody {
	error: string;
	fields?: FieldMessages;
}

/**
 * An API error answer: `{ error, fields? }` with `status`. A field given one message gets a list
 * of one, so clients always read lists; an empty `fields` is left out.
 */
export function apiError(
	status: number,
	error: string,
	fields?: Record<string, string | readonly string[]>,
	init: { headers?: Record<string, string> } = {}
): Response {
	const body: ApiErrorBody = { error };
	const entries = Object.entries(fields ?? {});
	if (entries.length) {
		body.fields = Object.fromEntries(
			entries.map(([k, m]) => [k, typeof m === 'string' ? [m] : [...m]])
		);
	}
	return json(body, { status, headers: init.headers });
}

/**
 * The path as SvelteKit routes it (percent-escapes decoded, "%25" kept), so "/%61pi/sync" is
 * judged as the "/api/sync" it reaches; null when it cannot be decoded.
 */
export function decodedPath(pathname: string): string | null {
	try {
		return pathname.split('%25').map(decodeURI).join('%25');
	} catch {
		return null;
	}
}

/** Whether `path` is `prefix` or below it. */
export const under = (path: string, prefix: string) =>
	path === prefix || path.startsWith(`${prefix}/`);

/** Whether a request is for the API, judged on the decoded path (or the raw one if undecodable). */
export function isApiPath(pathname: string): boolean {
	return under(decodedPath(pathname) ?? pathname, '/api');
}

const isJson = (r: Response) =>
	/^application\/(?:[\w.+-]+\+)?json\b/i.test(r.headers.get('content-type') ?? '');

/** The message for an error answer that came without one, by status. */
function messageFor(status: number, method: string, path: string, allow: string | null): string {
	if (status === 404) return `There is no API endpoint at ${path}.`;
	if (status === 405) {
		return allow
			? `${method} is not allowed on ${path}; allowed: ${allow}.`
			: `${method} is not allowed on ${path}.`;
	}
	if (status === 400 && decodedPath(path) === null) {
		return 'The address cannot be decoded (a malformed percent-escape).';
	}
	if (status === 413) return 'The request body is larger than the server accepts.';
	if (status === 503) return 'The server is busy; try again in a moment.';
	if (status >= 500) return 'The server failed on this request; it was not completed.';
	return `The request was refused (${status}).`;
}

/** A JSON error answer with the status and headers of `from` (Allow, Retry-After, …). */
function asJson(from: Response, error: string): Response {
	const headers = new Headers(from.headers);
	headers.delete('content-length');
	headers.delete('content-encoding');
	headers.set('content-type', 'application/json');
	const body: ApiErrorBody = { error };
	return new Response(JSON.stringify(body), { status: from.status, headers });
}

/** Turns any non-JSON (or JSON without `error`) error answer under /api into `{ error }`. */
export const apiJsonErrors: Handle = async ({ event, resolve }) => {
	const { pathname } = event.url;
	if (!isApiPath(pathname)) return resolve(event);
	const method = event.request.method;

	let response: Response;
	try {
		response = await resolve(event);
	} catch (err) {
		// Thrown by a handle below (handlers' own errors come back as answers from resolve).
		if (isRedirect(err)) throw err;
		if (isHttpError(err)) {
			const message = typeof err.body?.message === 'string' ? err.body.message : '';
			return apiError(err.status, message || messageFor(err.status, method, pathname, null));
		}
		console.error(err);
		return apiError(500, messageFor(500, method, pathname, null));
	}
	if (response.status < 400) return response;

	if (isJson(response)) {
		const body: unknown = await response
			.clone()
			.json()
			.catch(() => null);
		if (
			body &&
			typeof body === 'object' &&
			typeof (body as { error?: unknown }).error === 'string'
		) {
			return response;
		}
		// SvelteKit's own JSON errors say `message`; keep its words when they are there.
		const message = (body as { message?: unknown } | null)?.message;
		const words =
			typeof message === 'string' && message && message !== 'Internal Error'
				? message
				: messageFor(response.status, method, pathname, response.headers.get('allow'));
		return asJson(response, words);
	}
	return asJson(
		response,
		messageFor(response.status, method, pathname, response.headers.get('allow'))
	);
};
