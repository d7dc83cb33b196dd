import type { Handle } from '@sveltejs/kit';

/**
 * Headers every answer carries, pages and API alike. The page's Content-Security-Policy is
 * SvelteKit's own (`kit.csp` in svelte.config.js, with a nonce per answer); these are the rest.
 */
export const SECURITY_HEADERS: Readonly<Record<string, string>> = {
	// A file is what its Content-Type says, never what the browser guesses (photos, CSV, JSON).
	'X-Content-Type-Options': 'nosniff',
	// No one may frame the app (older browsers; newer ones read the CSP's frame-ancestors).
	'X-Frame-Options': 'DENY',
	// Full address within the app; nothing (no fixture codes or queries) to other sites.
	'Referrer-Policy': 'same-origin',
	// The scanner needs the camera, here and nowhere else; nothing else is ever asked for.
	'Permissions-Policy': [
		'camera=(self)',
		'microphone=()',
		'geolocation=()',
		'payment=()',
		'usb=()',
		'serial=()',
		'hid=()',
		'bluetooth=()',
		'midi=()',
		'display-capture=()',
		'accelerometer=()',
		'gyroscope=()',
		'magnetometer=()'
	].join(', '),
	// No window opened from elsewhere keeps a handle on ours.
	'Cross-Origin-Opener-Policy': 'same-origin',
	// Photos and JSON are for this app's pages only, never loaded by another site.
	'Cross-Origin-Resource-Policy': 'same-origin'
};

/**
 * Answers that set no caching of their own are private and never stored: pages are rendered
 * per person and per request (with a fresh CSP nonce), API answers hold personal data. Those that
 * do set one keep it (the register copy's `private, no-cache` + ETag, photos' immutable caching,
 * the health check's no-store). The service worker still keeps floor pages for offline use: its
 * Cache Storage is the app's own copy, not an HTTP cache.
 */
export const DEFAULT_CACHE_CONTROL = 'private, no-store';

/** For JSON opened as a document by itself: it may load nothing, run nothing, be framed by no one. */
export const JSON_CSP = "default-src 'none'; frame-ancestors 'none'; sandbox";

/** Adds the security headers (and the default caching) to an answer, keeping what it set itself. */
export function withSecurityHeaders(response: Response): Response {
	let res = response;
	try {
		apply(res.headers);
	} catch {
		// Headers of some answers (Response.redirect, a fetch passed through) cannot be changed.
		res = new Response(response.body, response);
		apply(res.headers);
	}
	return res;
}

function apply(headers: Headers): void {
	for (const [name, value] of Object.entries(SECURITY_HEADERS)) {
		if (!headers.has(name)) headers.set(name, value);
	}
	if (!headers.has('cache-control')) headers.set('cache-control', DEFAULT_CACHE_CONTROL);
	const type = headers.get('content-type') ?? '';
	if (!headers.has('content-security-policy') && /^application\/(.+\+)?json\b/i.test(type)) {
		headers.set('content-security-policy', JSON_CSP);
	}
}

/**
 * The handle (first in hooks.server.ts's sequence, so it sees every answer the others give).
 * Answers SvelteKit itself builds for a redirect or error *thrown* inside a handle (the route
 * guard's 303 to the sign-in page) bypass every handle and carry only SvelteKit's own headers.
 */
export const securityHeaders: Handle = async ({ event, resolve }) =>
	withSecurityHeaders(await resolve(event));
