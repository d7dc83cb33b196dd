import { expect, test, type APIResponse } from '@playwright/test';
import mysql from 'mysql2/promise';
import { signInAs } from '../helpers/auth';
import { insertArea, type TestFixture } from '../helpers/register-rows';

// The security headers of issue 9 row 5, on pages and API answers alike, as the built app sends them.

let fixture: TestFixture;

test.beforeAll(async () => {
	const made = await insertArea('Headers test', [{ name: 'Headers test datum plate' }]);
	fixture = made.fixtures[0];
});

/** The policy's directives by name, each with its sources. */
function directives(csp: string): Map<string, string[]> {
	const map = new Map<string, string[]>();
	for (const part of csp.split(';')) {
		const [name, ...sources] = part.trim().split(/\s+/);
		if (name) map.set(name.toLowerCase(), sources);
	}
	return map;
}

/** The headers every answer carries, whatever it is. */
function expectBaseHeaders(res: APIResponse) {
	const h = res.headers();
	expect(h['x-content-type-options']).toBe('nosniff');
	expect(h['x-frame-options']).toBe('DENY');
	expect(h['referrer-policy']).toBe('same-origin');
	expect(h['cross-origin-resource-policy']).toBe('same-origin');
	expect(h['cross-origin-opener-policy']).toBe('same-origin');
	const permissions = h['permissions-policy'] ?? '';
	expect(permissions).toContain('camera=(self)');
	for (const off of ['microphone=()', 'geolocation=()', 'payment=()', 'usb=()'])
		expect(permissions).toContain(off);
}

/** The page's policy: scripts only from the app or with this answer's nonce, nothing inline. */
async function expectPagePolicy(res: APIResponse) {
	const csp = res.headers()['content-security-policy'];
	expect(csp, 'the page has a Content-Security-Policy header').toBeTruthy();
	const d = directives(csp);
	const scripts = d.get('script-src') ?? [];
	expect(scripts).toContain("'self'");
	expect(scripts).not.toContain("'unsafe-inline'");
	expect(scripts).not.toContain("'unsafe-eval'");
	// Inline handlers: only Svelte's hashed load/error replay.
	expect(d.get('script-src-attr')).toEqual([
		"'unsafe-hashes'",
		"'sha256-7dQwUgLau1NFCCGjfn9FsYptB6ZtWxJin6VohGIu20I='"
	]);
	expect(d.get('default-src')).toEqual(["'self'"]);
	expect(d.get('object-src')).toEqual(["'none'"]);
	expect(d.get('base-uri')).toEqual(["'self'"]);
	expect(d.get('form-action')).toEqual(["'self'"]);
	expect(d.get('frame-ancestors')).toEqual(["'none'"]);
	expect(d.get('style-src') ?? []).not.toContain("'unsafe-inline'");

	// SvelteKit's inline start-up script carries this answer's nonce, which the header allows.
	const nonce = scripts.find((s) => s.startsWith("'nonce-"))?.slice(7, -1);
	expect(nonce, 'script-src names a nonce').toBeTruthy();
	const html = await res.text();
	const inline = [...html.matchAll(/<script(?![^>]*\bsrc=)([^>]*)>/g)].map((m) => m[1]);
	expect(inline.length).toBeGreaterThan(0);
	for (const attrs of inline) expect(attrs).toContain(`nonce="${nonce}"`);
	return nonce!;
}

test('the sign-in page carries the policy and the other headers', async ({ request }) => {
	const res = await request.get('/signin');
	expect(res.status()).toBe(200);
	expectBaseHeaders(res);
	// Pages are rendered per request (with a fresh nonce): no cache keeps one.
	expect(res.headers()['cache-control']).toBe('private, no-store');
	const first = await expectPagePolicy(res);
	// A fresh nonce on every answer.
	const again = await request.get('/signin');
	expect(await expectPagePolicy(again)).not.toBe(first);
});

test('a signed-in page is private and never stored', async ({ page }) => {
	await signInAs(page, 'supervisor');
	const res = await page.request.get(`/fixtures/${fixture.code}`);
	expect(res.status()).toBe(200);
	expectBaseHeaders(res);
	await expectPagePolicy(res);
	expect(res.headers()['cache-control']).toBe('private, no-store');

	// The data SvelteKit fetches for a page change in the browser is the same page's data.
	const data = await page.request.get(`/fixtures/${fixture.code}/__data.json`);
	expect(data.status()).toBe(200);
	expectBaseHeaders(data);
	expect(data.headers()['cache-control']).toBe('private, no-store');
});

test('a redirect from a page carries the headers too', async ({ page }) => {
	// A signed-in person opening the sign-in page is sent on (the page's load redirects).
	await signInAs(page, 'operator');
	const res = await page.request.get('/signin?next=/scan', { maxRedirects: 0 });
	expect(res.status()).toBe(303);
	expect(res.headers()['location']).toBe('/scan');
	expectBaseHeaders(res);
});

test('API answers carry the headers, and personal data is never stored', async ({
	page,
	request
}) => {
	await signInAs(page, 'supervisor');
	const api = page.request;

	const fixtures = await api.get('/api/fixtures');
	expect(fixtures.status()).toBe(200);
	expectBaseHeaders(fixtures);
	expect(fixtures.headers()['cache-control']).toBe('private, no-store');
	// JSON is never a document: if opened as one, it may run nothing and be framed by no one.
	expect(
		directives(fixtures.headers()['content-security-policy'] ?? '').get('default-src')
	).toEqual(["'none'"]);

	// Refusals are JSON with the same headers.
	const anonymous = await request.get('/api/fixtures');
	expect(anonymous.status()).toBe(401);
	expectBaseHeaders(anonymous);
	expect(anonymous.headers()['cache-control']).toBe('private, no-store');

	// The health check keeps its own no-store.
	const health = await request.get('/api/health');
	expectBaseHeaders(health);
	expect(health.headers()['cache-control']).toBe('no-store');
});

test('the register copy keeps its revalidation: ETag, 304, private no-cache', async ({ page }) => {
	await signInAs(page, 'operator');
	const first = await page.request.get(`/api/register-snapshot?code=${fixture.code}`);
	expect(first.status()).toBe(200);
	expectBaseHeaders(first);
	expect(first.headers()['cache-control']).toBe('private, no-cache');
	const etag = first.headers()['etag'];
	expect(etag).toMatch(/^"[^"]+"$/);

	const again = await page.request.get(`/api/register-snapshot?code=${fixture.code}`, {
		headers: { 'If-None-Match': etag }
	});
	expect(again.status()).toBe(304);
	expect(again.headers()['etag']).toBe(etag);
	expect(again.headers()['cache-control']).toBe('private, no-cache');
	expectBaseHeaders(again);
});

test('stored photos keep their own caching and their sandbox', async ({ page }) => {
	// A demo inspection photo (the seed stores some through the S3 fake).
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	const [[row]] = await conn
		.query<mysql.RowDataPacket[]>('SELECT id FROM attachments ORDER BY id LIMIT 1')
		.finally(() => conn.end());
	expect(row, 'the demo seed stored a photo').toBeTruthy();
	await signInAs(page, 'supervisor');
	const thumb = await page.request.get(`/api/attachments/${row.id}/thumb`);
	expect(thumb.status()).toBe(200);
	expectBaseHeaders(thumb);
	expect(thumb.headers()['cache-control']).toBe('private, max-age=31536000, immutable');
	expect(thumb.headers()['content-security-policy']).toBe("default-src 'none'; sandbox");
});

test('an unknown page gets the policy with the not-found page', async ({ request }) => {
	const res = await request.get('/no-such-page-here');
	expect(res.status()).toBe(404);
	expectBaseHeaders(res);
	await expectPagePolicy(res);
});
