import { error, json, text } from '@sveltejs/kit';
import { describe, expect, it, vi } from 'vitest';
import { apiError, apiJsonErrors, decodedPath, isApiPath } from './api-answers';

// The handle with a request and a stand-in for what SvelteKit's resolve answers; the built app is
// asked over HTTP by tests/e2e/api/answers.spec.ts.

function run(path: string, resolve: () => Response | Promise<Response>, method = 'GET') {
	const url = new URL(`http://127.0.0.1${path}`);
	const event = { url, request: new Request(url, { method }) };
	return apiJsonErrors({ event: event as never, resolve: resolve as never });
}

describe('decodedPath', () => {
	it('decodes as SvelteKit routes, keeping %25 and refusing what cannot be decoded', () => {
		expect(decodedPath('/%61pi/sync')).toBe('/api/sync');
		expect(decodedPath('/api/fixtures/50%25')).toBe('/api/fixtures/50%25');
		expect(decodedPath('/api/fixtures/%ff')).toBeNull();
		expect(isApiPath('/%61pi/sync')).toBe(true);
		expect(isApiPath('/api/fixtures/%ff')).toBe(true);
		expect(isApiPath('/apiary')).toBe(false);
	});
});

describe('apiJsonErrors', () => {
	it('leaves successes and JSON errors that carry `error` as they are', async () => {
		const ok = new Response('%PDF-1.7', { headers: { 'content-type': 'application/pdf' } });
		expect(await run('/api/labels.pdf', () => ok)).toBe(ok);
		const refused = json({ error: 'Invalid fixture.', fields: { name: ['x'] } }, { status: 400 });
		expect(await run('/api/fixtures', () => refused)).toBe(refused);
	});

	it('turns a text 500, SvelteKit’s { message } and a thrown error into { error }', async () => {
		const spy = vi.spyOn(console, 'error').mockImplementation(() => undefined);
		try {
			const fromText = await run('/api/x', () => text('Internal Error', { status: 500 }));
			expect(fromText.status).toBe(500);
			expect(await fromText.json()).toEqual({
				error: 'The server failed on this request; it was not completed.'
			});

			const kit = await run('/api/x', () => json({ message: 'Internal Error' }, { status: 500 }));
			expect(await kit.json()).toEqual({
				error: 'The server failed on this request; it was not completed.'
			});

			const thrown = await run('/api/x', () => {
				throw new Error('pool closed');
			});
			expect(thrown.status).toBe(500);
			expect(thrown.headers.get('content-type')).toBe('application/json');
			expect(spy).toHaveBeenCalled();

			const http = await run('/api/x', () => error(403, 'Requires the admin role.'));
			expect(http.status).toBe(403);
			expect(await http.json()).toEqual({ error: 'Requires the admin role.' });
		} finally {
			spy.mockRestore();
		}
	});

	it('keeps status and headers: 405 with Allow, 503 with Retry-After', async () => {
		const notAllowed = await run(
			'/api/sync',
			() => text('DELETE method not allowed', { status: 405, headers: { allow: 'POST' } }),
			'DELETE'
		);
		expect(notAllowed.status).toBe(405);
		expect(notAllowed.headers.get('allow')).toBe('POST');
		expect(await notAllowed.json()).toEqual({
			error: 'DELETE is not allowed on /api/sync; allowed: POST.'
		});
		const busy = await run('/api/sync', () =>
			text('busy', { status: 503, headers: { 'retry-after': '2' } })
		);
		expect(busy.headers.get('retry-after')).toBe('2');
		expect((await busy.json()).error).toBe('The server is busy; try again in a moment.');
	});

	it('leaves pages alone', async () => {
		const page = new Response('<h1>404</h1>', {
			status: 404,
			headers: { 'content-type': 'text/html' }
		});
		expect(await run('/fixtures/nope', () => page)).toBe(page);
	});
});

describe('apiError', () => {
	it('answers { error } alone when there are no field messages', async () => {
		const res = apiError(404, 'No fixture has the code NM-0000.');
		expect(res.status).toBe(404);
		expect(res.headers.get('content-type')).toMatch(/^application\/json/);
		expect(await res.json()).toEqual({ error: 'No fixture has the code NM-0000.' });
		expect(await apiError(400, 'Invalid query.', {}).json()).toEqual({ error: 'Invalid query.' });
	});

	it('gives every field a list, even of one message, and keeps headers', async () => {
		const res = apiError(
			400,
			'Invalid upload.',
			{ file: 'Choose a photo.', eventId: ['Required.', 'Must be a UUID.'] },
			{ headers: { connection: 'close' } }
		);
		expect(res.headers.get('connection')).toBe('close');
		expect(await res.json()).toEqual({
			error: 'Invalid upload.',
			fields: { file: ['Choose a photo.'], eventId: ['Required.', 'Must be a UUID.'] }
		});
	});
});
