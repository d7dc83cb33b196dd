import type { RequestEvent } from '@sveltejs/kit';
import { CallbackRouteError } from '@auth/core/errors';
import { describe, expect, it, vi } from 'vitest';
import { DatabaseBusyError } from './db/pool';
import { overloadError, overloadHandle, unavailable } from './overload';

// The overload answers without a server: the handle is called as SvelteKit calls it.

function eventFor(path: string, init: { method?: string; data?: boolean } = {}) {
	const url = new URL(`http://127.0.0.1:3000${path}`);
	return {
		url,
		request: new Request(url, { method: init.method ?? 'GET' }),
		isDataRequest: init.data ?? false
	} as unknown as RequestEvent;
}

/** An error as Drizzle passes it on: its own, with the driver's (here the pool's) as cause. */
const wrapped = (cause: unknown) => Object.assign(new Error('Failed query: SELECT 1'), { cause });

const handle = (event: RequestEvent, resolve: () => Promise<Response>) =>
	overloadHandle({ event, resolve: resolve as never }) as Promise<Response>;

vi.spyOn(console, 'warn').mockImplementation(() => undefined);

describe('overloadHandle', () => {
	it('answers an API request whose pool wait failed with 503, Retry-After and JSON { error }', async () => {
		const busy = new DatabaseBusyError('timeout', 3);
		const res = await handle(eventFor('/api/sync', { method: 'POST' }), async () => {
			throw wrapped(busy);
		});
		expect(res.status).toBe(503);
		expect(res.headers.get('retry-after')).toBe('3');
		expect(res.headers.get('content-type')).toContain('application/json');
		expect(await res.json()).toEqual({ error: 'Nestmark is busy right now. Try again in 3 s.' });
	});

	it('answers a page whose session lookup was refused with a 503 page that comes back by itself', async () => {
		const res = await handle(eventFor('/fixtures?q=%22x%22'), async () => {
			throw new DatabaseBusyError('queue-full', 2);
		});
		expect(res.status).toBe(503);
		expect(res.headers.get('retry-after')).toBe('2');
		expect(res.headers.get('content-type')).toContain('text/html');
		const html = await res.text();
		expect(html).toContain('<meta http-equiv="refresh" content="2">');
		expect(html).toContain('Busy for a moment');
		expect(html).toContain('Nestmark is busy right now. Try again in 2 s.');
		expect(html).toContain('href="/fixtures?q=%22x%22"');
	});

	it('turns the 500 SvelteKit rendered for a route that hit the limit into a 503', async () => {
		const event = eventFor('/fixtures/NM-4K7QX');
		const res = await handle(event, async () => {
			// What SvelteKit does with an error thrown in a load: handleError, then the error page.
			expect(overloadError(wrapped(new DatabaseBusyError('timeout', 4)), event)).toEqual({
				message: 'Nestmark is busy right now. Try again in 4 s.',
				code: 'busy'
			});
			return new Response('<p>the error page</p>', {
				status: 500,
				headers: { 'content-type': 'text/html' }
			});
		});
		expect(res.status).toBe(503);
		expect(res.headers.get('retry-after')).toBe('4');
		expect(await res.text()).toBe('<p>the error page</p>');
	});

	it('answers an API route that hit the limit with JSON, whatever SvelteKit rendered', async () => {
		const event = eventFor('/api/fixtures');
		const res = await handle(event, async () => {
			overloadError(new DatabaseBusyError('timeout', 1), event);
			return new Response('Internal Error', { status: 500 });
		});
		expect(res.status).toBe(503);
		expect(res.headers.get('retry-after')).toBe('1');
		expect(await res.json()).toEqual({ error: expect.stringContaining('busy') });
	});

	it('leaves data requests, other errors and other answers alone', async () => {
		const data = eventFor('/fixtures/__data.json', { data: true });
		const dataRes = await handle(data, async () => {
			overloadError(new DatabaseBusyError('timeout', 1), data);
			return new Response('{"type":"error"}', { status: 500 });
		});
		expect(dataRes.status).toBe(500);

		const bug = new Error('a real bug');
		await expect(handle(eventFor('/api/sync'), () => Promise.reject(bug))).rejects.toBe(bug);
		expect(overloadError(bug, eventFor('/'))).toBeUndefined();

		const plain500 = await handle(eventFor('/'), async () => new Response('x', { status: 500 }));
		expect(plain500.status).toBe(500);
		const ok = await handle(eventFor('/'), async () => new Response('x'));
		expect(ok.status).toBe(200);
	});
});

describe('unavailable', () => {
	it('names the pool refusals and a database that cannot be reached, and nothing else', () => {
		expect(unavailable(new DatabaseBusyError('queue-full', 2))?.retryAfterS).toBe(2);
		expect(unavailable(wrapped({ code: 'ECONNREFUSED' }))?.retryAfterS).toBe(5);
		expect(unavailable(wrapped({ code: 'PROTOCOL_CONNECTION_LOST' }))).not.toBeNull();
		expect(unavailable(wrapped({ code: 'ER_DUP_ENTRY' }))).toBeNull();
		expect(unavailable(new Error('other'))).toBeNull();
		expect(unavailable(undefined)).toBeNull();
	});

	it('finds the refusal inside an Auth.js error (a password sign-in while the pool is full)', () => {
		// @auth/core's callback route wraps what `authorize` threw exactly like this
		// (`new CallbackRouteError(e, { provider })`, lib/actions/callback/index.js),
		// keeping it as `cause: { err }`. Its typings only admit a string message,
		// hence the cast.
		const wrap = (e: Error) =>
			new (CallbackRouteError as unknown as new (e: Error, o: object) => Error)(e, {
				provider: 'credentials'
			});
		expect(unavailable(wrap(new DatabaseBusyError('timeout', 3)))?.retryAfterS).toBe(3);
		expect(unavailable(wrap(new Error('other')))).toBeNull();
	});
});
