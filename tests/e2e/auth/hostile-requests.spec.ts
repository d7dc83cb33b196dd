import http from 'node:http';
import { expect as baseExpect, test } from '@playwright/test';
import { demoAccount, signInAs, signOut } from '../helpers/auth';
import { waitForMail } from '../helpers/mail';

// Several browser contexts and a bcrypt sign-in per test: give a busy machine time.
test.describe.configure({ timeout: 90_000 });
// No offline cache needed here; a service worker installing in every fresh context only competes.
test.use({ serviceWorkers: 'block' });
const expect = baseExpect.configure({ timeout: 15_000 });

const origin = () => process.env.ORIGIN!;

/**
 * A raw HTTP request to the app, so the Host header can be forged too (browsers and Playwright's
 * request context set Host from the URL themselves).
 */
function rawRequest(
	method: string,
	path: string,
	headers: Record<string, string>,
	body?: string
): Promise<{ status: number; headers: http.IncomingHttpHeaders; body: string }> {
	const url = new URL(path, origin());
	return new Promise((resolve, reject) => {
		const req = http.request(
			{ host: url.hostname, port: url.port, path: url.pathname + url.search, method, headers },
			(res) => {
				let text = '';
				res.setEncoding('utf8');
				res.on('data', (c) => (text += c));
				res.on('end', () => resolve({ status: res.statusCode!, headers: res.headers, body: text }));
			}
		);
		req.on('error', reject);
		req.end(body);
	});
}

test.describe('sign-in links use ORIGIN, never the request headers', () => {
	const forged: [string, Record<string, string>][] = [
		['X-Forwarded-Host', { 'x-forwarded-host': 'evil.example', 'x-forwarded-proto': 'https' }],
		['Host', { host: 'evil.example' }]
	];
	for (const [name, headers] of forged) {
		test(`a link asked for with a forged ${name} still points at ORIGIN`, async () => {
			// One account per case, so the link throttle of one address typed is never reached.
			const { email } = demoAccount(name === 'Host' ? 'operator' : 'planner');
			const since = Date.now();
			const res = await rawRequest(
				'POST',
				'/signin?/link',
				{
					...headers,
					origin: origin(),
					accept: 'text/html',
					'content-type': 'application/x-www-form-urlencoded'
				},
				new URLSearchParams({ email }).toString()
			);
			expect(res.status, res.body.slice(0, 300)).toBe(303);
			expect(res.headers.location ?? '').not.toContain('evil.example');

			const mail = await waitForMail(email, since);
			expect(mail.text).not.toContain('evil.example');
			expect(mail.links.length).toBeGreaterThan(0);
			for (const link of mail.links) {
				const url = new URL(link);
				expect(url.origin).toBe(origin());
				const callback = url.searchParams.get('callbackUrl');
				if (callback) expect(new URL(callback).origin).toBe(origin());
			}
		});
	}

	test('a link whose callbackUrl names another site still lands on this one', async ({ page }) => {
		const { email } = demoAccount('supervisor');
		const since = Date.now();
		const res = await rawRequest(
			'POST',
			'/signin?/link',
			{
				origin: origin(),
				accept: 'text/html',
				'content-type': 'application/x-www-form-urlencoded'
			},
			new URLSearchParams({ email }).toString()
		);
		expect(res.status).toBe(303);
		const link = new URL(
			(await waitForMail(email, since)).links.find((l) => l.includes('/auth/callback/'))!
		);
		link.searchParams.set('callbackUrl', 'https://evil.example/phish');
		await page.goto(link.toString());
		await expect(page.getByRole('link', { name: 'Sign out' })).toBeVisible();
		expect(new URL(page.url()).origin).toBe(origin());
	});
});

test.describe('a malformed callback-url cookie', () => {
	for (const value of ['x', 'http://[', '%E0%A4%A', '//evil.example/x']) {
		test(`(${value}) gives no 500 when signed out`, async () => {
			for (const path of [
				'/api/health',
				'/',
				'/signin',
				'/fixtures',
				'/api/fixtures',
				'/auth/session'
			]) {
				const res = await rawRequest('GET', path, {
					cookie: `authjs.callback-url=${value}`
				});
				expect(res.status, `${path}`).toBeLessThan(500);
			}
		});
	}

	test('is ignored for a signed-in person, who stays signed in', async ({ page }) => {
		await signInAs(page, 'technician');
		const cookies = await page.context().cookies();
		const header = [...cookies.map((c) => `${c.name}=${c.value}`), 'authjs.callback-url=x'].join(
			'; '
		);
		const api = await rawRequest('GET', '/api/fixtures', { cookie: header });
		expect(api.status).toBe(200);
		const health = await rawRequest('GET', '/api/health', { cookie: header });
		expect(health.status).toBe(200);
	});
});

test('a malformed callbackUrl on the sign-in routes is a 400, not a 500', async () => {
	for (const path of ['/auth/session', '/auth/signin', '/auth/signout']) {
		const res = await rawRequest('GET', `${path}?callbackUrl=x`, {});
		expect(res.status, path).toBe(400);
	}
});

test.describe('sessions end when they are ended', () => {
	test('a copied cookie is refused after signing out; other devices stay signed in', async ({
		page,
		browser
	}) => {
		// Two devices of the same person.
		const phone = await browser.newContext();
		const phonePage = await phone.newPage();
		await signInAs(phonePage, 'supervisor');
		await signInAs(page, 'supervisor');
		const copied = await page.context().storageState();

		await signOut(page);

		const replay = await browser.newContext({ storageState: copied });
		const api = await replay.request.get('/api/fixtures');
		expect(api.status()).toBe(401);
		expect(await api.json()).toEqual({ error: 'Not signed in.' });
		const again = await replay.newPage();
		await again.goto('/fixtures');
		await expect(again).toHaveURL(/\/signin\?next=%2Ffixtures$/);
		await replay.close();

		// Signing out on one device leaves the person's other devices alone.
		expect((await phone.request.get('/api/fixtures')).status()).toBe(200);
		await phonePage.goto('/fixtures');
		await expect(phonePage).toHaveURL(/\/fixtures$/);
		await phone.close();
	});
});
