import type { RequestEvent } from '@sveltejs/kit';

/**
 * The same request event with a new url-encoded form body, so Auth.js's signIn/signOut (which
 * read the form themselves) see only the fields we validated.
 */
export function withForm(event: RequestEvent, fields: Record<string, string>): RequestEvent {
	const headers = new Headers(event.request.headers);
	headers.set('content-type', 'application/x-www-form-urlencoded');
	headers.delete('content-length');
	const request = new Request(event.request.url, {
		method: 'POST',
		headers,
		body: new URLSearchParams(fields)
	});
	return { ...event, request };
}
