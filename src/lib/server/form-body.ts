/**
 * Form actions read their body with `request.formData()`, which throws on a body that is not a
 * form (text/plain, JSON, a broken multipart) — a 500 for what is the client's mistake. This
 * handle checks the body of every POST to a page once, before any action runs, and answers 400
 * with a message: the error page for a browser, an action result for `use:enhance`.
 */
import { error, json, type Handle } from '@sveltejs/kit';
import { decodedPath, under } from './api-answers';

const FORM_TYPES = ['application/x-www-form-urlencoded', 'multipart/form-data'];

/** Why a POST body cannot be read as a form, or null when it can. */
export async function formBodyProblem(request: Request): Promise<string | null> {
	const type = (request.headers.get('content-type') ?? '').split(';')[0].trim().toLowerCase();
	if (!FORM_TYPES.includes(type)) {
		return `The form was sent as ${type || 'no content type'}; send it as ${FORM_TYPES.join(' or ')}.`;
	}
	try {
		// A copy is read, so the action still gets the body.
		await request.clone().formData();
		return null;
	} catch {
		return 'The form could not be read (a broken or cut-off body); send it again.';
	}
}

/** 400 for a POST to a page whose body is not a readable form (see the module comment). */
export const formBodyCheck: Handle = async ({ event, resolve }) => {
	const path = decodedPath(event.url.pathname) ?? event.url.pathname;
	// Pages only: the API reads JSON and answers for itself; /auth is Auth.js's own.
	if (
		event.request.method !== 'POST' ||
		!event.route.id ||
		under(path, '/api') ||
		under(path, '/auth')
	) {
		return resolve(event);
	}
	const problem = await formBodyProblem(event.request);
	if (!problem) return resolve(event);
	if (event.request.headers.get('x-sveltekit-action') === 'true') {
		// What use:enhance expects from an action that failed: it shows the error page.
		return json({ type: 'error', error: { message: problem } }, { status: 400 });
	}
	error(400, problem);
};
