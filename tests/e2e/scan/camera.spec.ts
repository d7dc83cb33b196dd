import { writeFileSync } from 'node:fs';
import { chromium, expect, test } from '@playwright/test';
import { signInAs } from '../helpers/auth';
import { labelY4m } from '../helpers/label-images';
import { insertArea, type TestFixture } from '../helpers/register-rows';

// The camera path in Chromium's fake camera, which plays a video file of a label.

// Decoding a photo and opening the card can take a few seconds on a busy machine.
const OPEN_CARD_MS = 30_000;

let fixture: TestFixture;

test.beforeAll(async () => {
	const made = await insertArea('Camera test', [{ name: 'Camera test probe rack' }]);
	fixture = made.fixtures[0];
});

// A string from html5-qrcode's own code (its constructor's error message), present in whatever
// chunk carries the decoder, minified or not.
const DECODER_MARK = 'HTML Element with id=';

test('the camera reads a label and opens its card; the decoder loads only on "Start camera"', async ({
	baseURL
}, testInfo) => {
	// Signs in, then starts a second browser with the fake camera.
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
		const page = await context.newPage();
		const scripts: string[] = [];
		page.on('response', async (r) => {
			if (r.request().resourceType() === 'script') scripts.push(await r.text().catch(() => ''));
		});

		await signInAs(page, 'operator', '/scan');
		await expect(page.getByRole('button', { name: 'Start camera' })).toBeVisible();
		await page.waitForLoadState('networkidle');
		expect(scripts.length).toBeGreaterThan(0);
		expect(scripts.some((s) => s.includes(DECODER_MARK))).toBe(false);

		await page.getByRole('button', { name: 'Start camera' }).click();
		await expect(page).toHaveURL(new RegExp(`/f/${fixture.code}$`), { timeout: OPEN_CARD_MS });
		await expect(page.getByRole('heading', { name: fixture.name })).toBeVisible();
		expect(scripts.some((s) => s.includes(DECODER_MARK))).toBe(true);
		expect(await page.evaluate(() => performance.getEntriesByName('nm:scan-decoded').length)).toBe(
			1
		);
	} finally {
		await browser.close();
	}
});
