/**
 * The app's public origin, from configuration only. Every absolute URL the server writes (sign-in
 * links in mail, invitations, labels, Auth.js's own redirects) is built from it, never from the
 * request's Host or X-Forwarded-* headers, which anyone can forge: a forged host in a sign-in
 * link would send a genuine token to someone else's site.
 */
import { config } from './config';

/**
 * ORIGIN from the environment (scheme, host and port only). In development and test it falls
 * back to `fallback` (the request's origin under `vite dev`); anywhere else a missing ORIGIN is
 * an error, not a silent trust in request headers.
 */
export function publicOrigin(fallback?: string): string {
	const { origin, lenient } = config();
	if (origin) return origin;
	if (fallback && lenient) return new URL(fallback).origin;
	throw new Error('ORIGIN is not set: set it to the URL people use to reach Nestmark');
}

/**
 * Pins the headers Auth.js reads to find "its" URL (X-Forwarded-Host first, then Host, and
 * X-Forwarded-Proto) to the public origin. Auth.js builds sign-in links, redirects and cookie
 * names from them; with trustHost they would otherwise come straight from the client.
 */
export function pinOriginHeaders(headers: Headers, origin: string): void {
	const url = new URL(origin);
	headers.set('x-forwarded-host', url.host);
	headers.set('x-forwarded-proto', url.protocol.replace(/:$/, ''));
	headers.set('host', url.host);
}

/** True for a path or an absolute http(s) URL (the test Auth.js applies, without throwing). */
export function isHttpUrl(raw: string, origin: string): boolean {
	try {
		return /^https?:$/.test(new URL(raw, raw.startsWith('/') ? origin : undefined).protocol);
	} catch {
		return false;
	}
}

/** The URL `raw` names, if it is a path or an absolute http(s) URL on `origin`; else null. */
export function sameOriginUrl(raw: unknown, origin: string): URL | null {
	if (typeof raw !== 'string' || !raw) return null;
	let url: URL;
	try {
		if (raw.startsWith('/') && !raw.startsWith('//') && !raw.startsWith('/\\')) {
			url = new URL(raw, origin);
		} else {
			url = new URL(raw);
		}
	} catch {
		return null;
	}
	return url.origin === origin ? url : null;
}

/**
 * Where Auth.js may send someone after signing in or out: a path on this site, as an absolute
 * URL on the public origin. Anything else — another origin, a protocol-relative `//host`, a
 * malformed value such as a tampered callback-url cookie — goes to the start page instead of
 * throwing (Auth.js's default throws on a malformed value).
 */
export function sameOriginRedirect(raw: unknown, origin: string): string {
	return (sameOriginUrl(raw, origin) ?? new URL('/', origin)).toString();
}

/** Names of the cookie in which Auth.js keeps where to go after signing in (plain and https). */
export const CALLBACK_URL_COOKIES = ['authjs.callback-url', '__Secure-authjs.callback-url'];

/**
 * The request's Cookie header without callback-url cookies that do not name a place on this
 * site, and the names dropped. Auth.js refuses such a cookie with a 500 on every request (its
 * config check runs before any callback), so it must never see one.
 */
export function withoutBadCallbackCookies(
	header: string,
	origin: string
): { header: string; dropped: string[] } {
	const dropped: string[] = [];
	const kept = header
		.split(';')
		.map((part) => part.trim())
		.filter((part) => {
			const eq = part.indexOf('=');
			const name = eq < 0 ? part : part.slice(0, eq);
			if (!CALLBACK_URL_COOKIES.includes(name)) return true;
			const raw = part.slice(eq + 1);
			let value = raw;
			try {
				value = decodeURIComponent(raw);
			} catch {
				// Auth.js's cookie parser keeps an undecodable value as it is; so do we.
			}
			if (eq >= 0 && sameOriginUrl(value, origin)) return true;
			dropped.push(name);
			return false;
		});
	return { header: kept.join('; '), dropped };
}
