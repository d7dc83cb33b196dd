import { error, type Handle } from '@sveltejs/kit';
import { isHttpUrl, pinOriginHeaders, publicOrigin, withoutBadCallbackCookies } from './origin';

/**
 * Runs before Auth.js and makes what it reads from the request safe:
 * - Host and X-Forwarded-* are pinned to the public origin, so nothing Auth.js builds from them
 *   (sign-in links, redirects, cookie names) can be steered by the client. SvelteKit's own
 *   `event.url` already comes from ORIGIN (adapter-node).
 * - A callback-url cookie that names no place on this site (tampered, or just `x`) is dropped,
 *   here and in the browser; Auth.js would answer every request with a 500.
 * - On Auth.js's own routes, a malformed `callbackUrl` parameter is a 400, not Auth.js's 500.
 *   A well-formed one naming another site passes: the redirect callback sends it home instead.
 */
export const pinOrigin: Handle = ({ event, resolve }) => {
	const origin = publicOrigin(event.url.origin);
	const headers = event.request.headers;
	pinOriginHeaders(headers, origin);

	const cookie = headers.get('cookie');
	if (cookie) {
		const clean = withoutBadCallbackCookies(cookie, origin);
		if (clean.dropped.length) {
			headers.set('cookie', clean.header);
			// Secure only where the browser would keep it: plain http on a shop LAN is allowed.
			const https = event.url.protocol === 'https:';
			for (const name of clean.dropped) {
				event.cookies.delete(name, { path: '/', secure: https || name.startsWith('__Secure-') });
			}
		}
	}

	const callbackUrl = event.url.searchParams.get('callbackUrl');
	const authPath = event.url.pathname === '/auth' || event.url.pathname.startsWith('/auth/');
	if (authPath && callbackUrl !== null && !isHttpUrl(callbackUrl, origin)) {
		error(400, {
			message: 'That sign-in address is not valid. Start again from the sign-in page.'
		});
	}
	return resolve(event);
};
