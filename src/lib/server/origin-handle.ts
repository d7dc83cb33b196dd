import type { Handle } from '@sveltejs/kit';
import { pinOriginHeaders, publicOrigin } from './origin';

/**
 * Runs before Auth.js: pins the Host and X-Forwarded-* headers of every request to the public
 * origin, so nothing Auth.js builds from them (sign-in links, redirects, cookie names) can be
 * steered by the client. SvelteKit's own `event.url` already comes from ORIGIN (adapter-node).
 */
export const pinOrigin: Handle = ({ event, resolve }) => {
	pinOriginHeaders(event.request.headers, publicOrigin(event.url.origin));
	return resolve(event);
};
