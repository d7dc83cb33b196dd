import { writeFileSync } from 'node:fs';
import { chromium, expect, test, type Page } from '@playwright/test';
import mysql from 'mysql2/promise';
import { signInAs, signOut } from '../helpers/auth';
import { labelPng, labelY4m } from '../helpers/label-images';
import { describeProblems, watchProblems, type PageProblem } from '../helpers/page-problems';
import { insertArea, type TestFixture } from '../helpers/register-rows';
import { cacheForOffline } from '../offline/support';
import { png } from '../photos/png';

// The main flows under the Content-Security-Policy: every page, chart, diagram, camera, photo and
// offline reload works, and not one CSP violation (or any other console error) is reported.

let fixture: TestFixture;

test.beforeAll(async () => {
	const made = await insertArea('CSP test', [{ name: 'CSP test grinding pallet' }]);
	fixture = made.fixtures[0];
});

/** The demo fixture with a year of history (charts, break-in runs, photos). */
async function demoCode(name: string): Promise<string> {
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		const [[row]] = await conn.query<mysql.RowDataPacket[]>(
			'SELECT code FROM fixtures WHERE name = ?',
			[name]
		);
		return row.code as string;
	} finally {
		await conn.end();
	}
}

/** The chart canvases of the region have been drawn on (not blank). */
async function expectDrawnCanvas(page: Page, region: string) {
	const canvases = page.getByRole('region', { name: region }).locator('canvas');
	await expect(canvases.first()).toBeVisible();
	await expect
		.poll(() =>
			canvases.first().evaluate((c: HTMLCanvasElement) => {
				const data = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
				return data.some((v, i) => i % 4 === 3 && v > 0);
			})
		)
		.toBe(true);
}

const noProblems = (problems: PageProblem[]) =>
	expect(problems, describeProblems(problems)).toEqual([]);

test('office pages: register, charts, geometry, labels, policies, people, sign-out', async ({
	page,
	context
}) => {
	test.setTimeout(180_000);
	const problems = await watchProblems(context);
	const drifting = await demoCode('DT-2 kinematic pallet B');
	const photographed = await demoCode('Transmission-sphere mount TS-A');

	await page.goto('/');
	await signInAs(page, 'supervisor');
	// Client-side navigation from here on (SvelteKit's route announcer appears).
	await page.getByRole('link', { name: 'Register', exact: true }).click();
	await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
	await page.goto(`/fixtures/${drifting}`);
	await expectDrawnCanvas(page, 'Charts');
	// Stored photos as thumbnails in the history (the demo's photographed inspections).
	await page.goto(`/fixtures/${photographed}?kind=inspection`);
	const stored = page
		.getByRole('region', { name: 'History' })
		.getByRole('img', { name: /^Inspection photo / })
		.first();
	await expect(stored).toBeVisible();
	await expect
		.poll(() => stored.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth))
		.toBeGreaterThan(0);
	await page.goto(`/fixtures/${drifting}`);

	await page.getByRole('link', { name: 'Geometry check' }).click();
	await expect(page.getByRole('heading', { level: 1, name: 'Geometry check' })).toBeVisible();
	await expect(page.getByRole('group', { name: 'Top view' })).toBeVisible();

	await page.getByRole('link', { name: 'Labels', exact: true }).click();
	await expect(page.getByRole('heading', { name: 'Labels', exact: true })).toBeVisible();
	await page.goto(`/labels?codes=${fixture.code}`);
	await expect(page.getByRole('img', { name: /Preview of the first page/ })).toBeVisible();

	await page.getByRole('link', { name: 'Policies', exact: true }).click();
	await expect(page.getByRole('heading', { level: 1 })).toBeVisible();

	await signOut(page);
	await signInAs(page, 'admin', '/admin/users');
	await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
	noProblems(problems);
});

test('floor: photo scan, card, inspection photo, break-in chart, outbox, offline reload', async ({
	page,
	context
}) => {
	// Installing the service worker (about 1 MB of precache) is slow on a busy machine.
	test.setTimeout(240_000);
	const problems = await watchProblems(context);

	await signInAs(page, 'technician', '/scan');
	await expect(page.getByRole('heading', { name: 'Scan a label' })).toBeVisible();
	// jsQR reads a photo of the label and the card opens.
	await page.getByLabel('Scan from a photo').setInputFiles({
		name: 'label.png',
		mimeType: 'image/png',
		buffer: await labelPng(`${process.env.ORIGIN}/f/${fixture.code}`)
	});
	await expect(page).toHaveURL(new RegExp(`/f/${fixture.code}$`), { timeout: 30_000 });
	await expect(page.getByRole('heading', { name: fixture.name })).toBeVisible();

	await page.getByRole('button', { name: 'Reseat', exact: true }).click();
	// An inspection with a photo: its preview on the phone is a blob: URL.
	await page
		.getByRole('group', { name: 'Log something else' })
		.getByRole('button', { name: 'Inspection' })
		.click();
	const form = page.getByRole('form', { name: 'Inspection' });
	await form
		.getByRole('radiogroup', { name: 'Wear grade of Ball 1' })
		.getByRole('radio', { name: /^1 Tracked/ })
		.check();
	await form.getByRole('radio', { name: /^Serviceable/ }).check();
	await form
		.getByLabel('Choose photo files')
		.setInputFiles({ name: 'ball-1.png', mimeType: 'image/png', buffer: png(320, 240) });
	const preview = form.getByRole('img', { name: 'Inspection photo 1' });
	await expect(preview).toHaveAttribute('src', /^blob:/);
	await expect
		.poll(() => preview.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth))
		.toBeGreaterThan(0);
	await form.getByRole('button', { name: 'Log inspection' }).click();
	// Synced, and the server's thumbnail shows.
	const thumb = page.getByRole('img', { name: 'Photo 1 (opens the full photo)' });
	await expect(thumb).toBeVisible({ timeout: 60_000 });
	await expect
		.poll(() => thumb.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth), {
			timeout: 30_000
		})
		.toBeGreaterThan(0);

	await page.goto(`/f/${fixture.code}/break-in`);
	await expect(page.getByRole('heading', { name: /^Break-in run/ })).toBeVisible();
	await page.getByRole('link', { name: 'Outbox', exact: true }).click();
	await expect(page.getByRole('heading', { level: 1 })).toBeVisible();

	// The worker's copy of a floor page, with the nonce it was served with, opens offline.
	await page.goto(`/f/${fixture.code}`);
	await cacheForOffline(page);
	await context.setOffline(true);
	const offline = await page.reload();
	expect(offline?.fromServiceWorker()).toBe(true);
	await expect(page.getByRole('heading', { name: fixture.name })).toBeVisible();
	await page.getByRole('button', { name: 'Reseat', exact: true }).click();
	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(1);
	await context.setOffline(false);
	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(0, {
		timeout: 30_000
	});

	// Expected console errors, not problems: while offline the browser reports each refused
	// request, and the synced inspection's thumbnail is asked for before its photo has been
	// uploaded (404; the card shows "not available yet" and retries after the upload).
	const expected = [
		/ERR_INTERNET_DISCONNECTED/,
		/status of 404 .*\/api\/attachments\/[\w-]+\/thumb\)$/
	];
	noProblems(problems.filter((p) => !expected.some((e) => e.test(p.text))));
});

test('the camera scanner starts and reads a label under the policy', async ({
	baseURL
}, testInfo) => {
	test.slow();
	const video = testInfo.outputPath('label.y4m');
	writeFileSync(video, labelY4m(`${process.env.ORIGIN}/f/${fixture.code}`));
	const launch = testInfo.project.use.launchOptions ?? {};
	const browser = await chromium.launch({
		...launch,
		args: [
			...(launch.args ?? []),
			'--use-fake-ui-for-media-stream',
			'--use-fake-device-for-media-stream',
			`--use-file-for-fake-video-capture=${video}`
		]
	});
	try {
		const context = await browser.newContext({ baseURL, permissions: ['camera'] });
		const problems = await watchProblems(context);
		const page = await context.newPage();
		await signInAs(page, 'operator', '/scan');
		await page.getByRole('button', { name: 'Start camera' }).click();
		await expect(page).toHaveURL(new RegExp(`/f/${fixture.code}$`), { timeout: 30_000 });
		await expect(page.getByRole('heading', { name: fixture.name })).toBeVisible();
		noProblems(problems);
	} finally {
		await browser.close();
	}
});
