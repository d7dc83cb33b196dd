import { expect, test, type Page } from '@playwright/test';
import { demoAccount } from '../helpers/auth';
import { describeProblems, watchProblems } from '../helpers/page-problems';
import { insertArea, type TestFixture } from '../helpers/register-rows';

// Issue 9 row 12: a phone whose first page is nested (a scanned label opens /f/NM-…; a link in
// mail opens /fixtures/NM-…) installs the offline app, with the worker at /sw.js for the whole
// site, and no page asks for a sw.js of its own folder.

let fixture: TestFixture;

test.beforeAll(async () => {
	const made = await insertArea('Worker test', [{ name: 'Worker test spindle pallet' }]);
	fixture = made.fixtures[0];
});

/** The page's worker registrations: scope and script of each. */
function registrations(page: Page) {
	return page.evaluate(async () =>
		(await navigator.serviceWorker.getRegistrations()).map((r) => ({
			scope: r.scope,
			script: (r.active ?? r.waiting ?? r.installing)?.scriptURL ?? null,
			active: r.active !== null
		}))
	);
}

for (const first of ['/f/', '/fixtures/']) {
	test(`a device whose first page is ${first}NM-… installs the worker for the whole site`, async ({
		context,
		baseURL
	}) => {
		// Installing the worker (about 1 MB of precache) is slow on a busy machine.
		test.setTimeout(180_000);
		const origin = new URL(baseURL!).origin;
		const problems = await watchProblems(context);
		const workerScripts: string[] = [];
		context.on('request', (r) => {
			if (/\/sw\.js(\?|$)/.test(new URL(r.url()).pathname)) workerScripts.push(r.url());
		});

		// Signed in without opening a page (as a phone that signed in earlier, on another tab).
		const account = demoAccount('technician');
		const signIn = await context.request.post('/signin?/password', {
			form: { email: account.email, password: account.password, next: '/' },
			headers: { Origin: origin, Accept: 'text/html' },
			maxRedirects: 0
		});
		expect(signIn.status()).toBe(303);

		const page = await context.newPage();
		await page.goto(`${first}${fixture.code}`);
		await expect(page.getByRole('heading', { name: fixture.name })).toBeVisible();
		// The manifest link is absolute too, so a nested page links the site's one manifest.
		await expect(page.locator('link[rel="manifest"]')).toHaveAttribute(
			'href',
			'/manifest.webmanifest'
		);

		// Registered at once (a refused registration never appears), then installed and active.
		const whole = { scope: `${origin}/`, script: `${origin}/sw.js` };
		await expect
			.poll(() => registrations(page), { timeout: 30_000, intervals: [250] })
			.toEqual([expect.objectContaining(whole)]);
		await expect
			.poll(() => registrations(page), { timeout: 150_000, intervals: [500] })
			.toEqual([{ ...whole, active: true }]);
		await page.waitForFunction(() => navigator.serviceWorker.controller !== null, null, {
			timeout: 30_000
		});

		// Another nested page under the same worker asks for no other worker script.
		await page.goto(`/f/${fixture.code}/break-in`);
		await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
		expect(await registrations(page)).toHaveLength(1);
		expect(workerScripts.filter((u) => new URL(u).pathname !== '/sw.js')).toEqual([]);
		expect(problems, describeProblems(problems)).toEqual([]);
	});
}

test('the manifest names absolute icons, start page and scope', async ({ request }) => {
	const manifest = await (await request.get('/manifest.webmanifest')).json();
	expect(manifest.scope).toBe('/');
	expect(manifest.start_url).toBe('/scan');
	for (const icon of manifest.icons as { src: string }[]) expect(icon.src).toMatch(/^\/[^/]/);
});
