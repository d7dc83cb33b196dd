import http from 'node:http';
import { randomUUID } from 'node:crypto';
import { expect, test, type BrowserContext } from '@playwright/test';
import { signInAs } from '../helpers/auth';

// How the built app answers what is not a normal request: every /api answer is JSON, a form
// action refuses a body that is not a form with 400, and a refused sync body does not spoil the
// kept-alive connection it came on. Node's http module, so sockets and bodies are ours to shape.

const origin = process.env.ORIGIN!;
const { hostname, port } = new URL(origin);

interface Answer {
	status: number;
	headers: http.IncomingHttpHeaders;
	text: string;
	/** Whether the request went out on a socket an earlier request had used. */
	reused: boolean;
}

/** One request; `body` as chunks is sent chunked (no Content-Length). */
function send(options: {
	method?: string;
	path: string;
	headers?: Record<string, string>;
	body?: string | Buffer | Buffer[];
	agent?: http.Agent;
}): Promise<Answer> {
	return new Promise((resolve, reject) => {
		const req = http.request(
			{
				hostname,
				port,
				method: options.method ?? 'GET',
				path: options.path,
				headers: options.headers,
				agent: options.agent ?? false
			},
			(res) => {
				const parts: Buffer[] = [];
				res.on('data', (c: Buffer) => parts.push(c));
				res.on('end', () =>
					resolve({
						status: res.statusCode!,
						headers: res.headers,
						text: Buffer.concat(parts).toString('utf8'),
						reused: req.reusedSocket
					})
				);
				res.on('error', reject);
			}
		);
		req.on('error', reject);
		const body = options.body;
		if (Array.isArray(body)) {
			const write = (i: number): void => {
				if (i === body.length) return void req.end();
				if (req.write(body[i])) write(i + 1);
				else req.once('drain', () => write(i + 1));
			};
			write(0);
		} else req.end(body);
	});
}

const jsonOf = (a: Answer) => {
	expect(a.headers['content-type']).toMatch(/^application\/json/);
	return JSON.parse(a.text) as { error: string; fields?: unknown };
};

async function cookieHeader(context: BrowserContext): Promise<string> {
	return (await context.cookies()).map((c) => `${c.name}=${c.value}`).join('; ');
}

test.describe('every /api answer is JSON', () => {
	test('signed out: unknown paths, encoded paths and undecodable paths', async () => {
		const unknown = await send({ path: '/api/no-such-thing' });
		expect(unknown.status).toBe(401);
		expect(jsonOf(unknown).error).toBe('Not signed in.');

		// "/%61pi/sync" is /api/sync once decoded: the API's 401, not a redirect to sign in.
		const encoded = await send({
			method: 'POST',
			path: '/%61pi/sync',
			headers: { 'content-type': 'application/json' },
			body: '{}'
		});
		expect(encoded.status).toBe(401);
		expect(jsonOf(encoded).error).toBe('Not signed in.');

		const health = await send({ path: '/%61pi/health' });
		expect(health.status).toBe(200);
		jsonOf(health);
	});

	test('signed in: 404, 405 with Allow, and 400 for %ff, all as { error }', async ({
		page,
		context
	}) => {
		await signInAs(page, 'technician');
		const cookie = await cookieHeader(context);

		const unknown = await send({ path: '/api/no-such-thing/here', headers: { cookie } });
		expect(unknown.status).toBe(404);
		expect(jsonOf(unknown)).toEqual({
			error: 'There is no API endpoint at /api/no-such-thing/here.'
		});

		const wrongMethod = await send({ method: 'DELETE', path: '/api/sync', headers: { cookie } });
		expect(wrongMethod.status).toBe(405);
		expect(wrongMethod.headers.allow).toMatch(/POST/);
		expect(jsonOf(wrongMethod).error).toMatch(
			/^DELETE is not allowed on \/api\/sync; allowed: .*POST/
		);

		const malformed = await send({ path: '/api/fixtures/%ff', headers: { cookie } });
		expect(malformed.status).toBe(400);
		expect(jsonOf(malformed).error).toBe(
			'The address cannot be decoded (a malformed percent-escape).'
		);
	});
});

test.describe('form actions refuse a body that is not a form', () => {
	const headers = (type: string, extra: Record<string, string> = {}) => ({
		'content-type': type,
		origin,
		...extra
	});

	test('anonymous sign-in with text/plain or a broken multipart body: 400 with the reason', async () => {
		const plain = await send({
			method: 'POST',
			path: '/signin?/password',
			headers: headers('text/plain'),
			body: 'email=a@b.example&password=x'
		});
		expect(plain.status).toBe(400);
		expect(plain.text).toContain('The form was sent as text/plain');

		const broken = await send({
			method: 'POST',
			path: '/signin?/password',
			headers: headers('multipart/form-data; boundary=XYZ'),
			body: '--XYZ\r\nContent-Disposition: form-data; name="email"\r\n\r\na@b.example'
		});
		expect(broken.status).toBe(400);
		expect(broken.text).toContain('The form could not be read');

		// use:enhance asks for an action result: it gets one it can show.
		const enhanced = await send({
			method: 'POST',
			path: '/signin?/password',
			headers: headers('text/plain', {
				accept: 'application/json',
				'x-sveltekit-action': 'true'
			}),
			body: 'x'
		});
		expect(enhanced.status).toBe(400);
		expect(JSON.parse(enhanced.text)).toEqual({
			type: 'error',
			error: { message: expect.stringContaining('The form was sent as text/plain') }
		});
	});

	test('a signed-in action gets the same 400', async ({ page, context }) => {
		await signInAs(page, 'supervisor');
		const res = await send({
			method: 'POST',
			path: '/fixtures/new',
			headers: headers('application/json', { cookie: await cookieHeader(context) }),
			body: '{"name":"x"}'
		});
		expect(res.status).toBe(400);
		expect(res.text).toContain('The form was sent as application/json');
	});
});

test.describe('a sync body over the limit', () => {
	// 3 MB of JSON-ish text, over the 2 MB limit of /api/sync.
	const big = Buffer.from(
		JSON.stringify({ deviceId: 'keep-alive', events: [{ pad: 'x'.repeat(3 * 1024 * 1024) }] })
	);

	test('answers 400 JSON, and the next request on the same connection is answered', async ({
		page,
		context
	}) => {
		await signInAs(page, 'technician');
		const cookie = await cookieHeader(context);
		const agent = new http.Agent({ keepAlive: true, maxSockets: 1 });
		try {
			const declared = await send({
				method: 'POST',
				path: '/api/sync',
				headers: {
					cookie,
					'content-type': 'application/json',
					'content-length': String(big.length)
				},
				body: big,
				agent
			});
			expect(declared.status).toBe(400);
			expect(jsonOf(declared).error).toBe('The request body is larger than the limit of 2 MB.');
			expect(declared.headers.connection).not.toBe('close');

			const next = await send({ path: '/api/health', agent });
			expect(next.reused).toBe(true);
			expect(next.status).toBe(200);

			// Chunked, without a length: counted while reading, answered, connection kept.
			const chunks: Buffer[] = [];
			for (let i = 0; i < big.length; i += 64 * 1024) chunks.push(big.subarray(i, i + 64 * 1024));
			const chunked = await send({
				method: 'POST',
				path: '/api/sync',
				headers: { cookie, 'content-type': 'application/json' },
				body: chunks,
				agent
			});
			expect(chunked.status).toBe(400);
			expect(jsonOf(chunked).error).toBe('The request body is larger than the limit of 2 MB.');

			const after = await send({
				method: 'POST',
				path: '/api/sync',
				headers: { cookie, 'content-type': 'application/json' },
				body: JSON.stringify({
					deviceId: 'keep-alive',
					events: [{ id: randomUUID(), kind: 'note' }]
				}),
				agent
			});
			expect(after.reused).toBe(true);
			expect(after.status).toBe(200);
			expect(JSON.parse(after.text).results[0].status).toBe('rejected');
		} finally {
			agent.destroy();
		}
	});
});
