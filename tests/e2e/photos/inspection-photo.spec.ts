import { expect, test } from '@playwright/test';
import { signInAs } from '../helpers/auth';
import { createFixture, serverEvents } from '../offline/support';
import { png } from './png';

// The page is loaded online and the network then dropped: the service worker is not needed here
// (offline reloads are covered by the offline specs).
test.use({ serviceWorkers: 'block' });

test('a technician records an inspection with a photo offline, and it appears after sync', async ({
	page,
	context
}) => {
	test.setTimeout(120_000);
	const code = await createFixture('Photo test three-vee pallet');
	await signInAs(page, 'technician');
	await page.goto(`/f/${code}`);
	await expect(page.getByRole('heading', { name: 'Photo test three-vee pallet' })).toBeVisible();

	await context.setOffline(true);
	await page
		.getByRole('group', { name: 'Log something else' })
		.getByRole('button', { name: 'Inspection' })
		.click();
	const form = page.getByRole('form', { name: 'Inspection' });
	// The coupling's own contacts are listed, with the cleaning cautions beside the form.
	await expect(form.getByRole('radiogroup', { name: /^Wear grade of / })).toHaveCount(6);
	await expect(form.getByText('Caution — Compressed air.')).toBeVisible();

	await form.getByRole('button', { name: 'Log inspection' }).click();
	await expect(form.getByText('Grade at least one contact you looked at.')).toBeVisible();
	await expect(form.getByText('Choose a verdict.')).toBeVisible();

	const vee2 = form.getByRole('radiogroup', { name: 'Wear grade of Vee 2' });
	await vee2.getByRole('radio', { name: /^2 Dulled/ }).check();
	await form.getByRole('group', { name: 'Marks on Vee 2' }).getByLabel('fretting').check();
	await form
		.getByRole('radiogroup', { name: 'Wear grade of Ball 1' })
		.getByRole('radio', { name: /^1 Tracked/ })
		.check();
	await form.getByLabel('Watch: inspect again sooner').check();
	await form.getByLabel('Note').fill('Grey band on vee 2');

	// A text file renamed to .png is refused on the phone already.
	await form.getByLabel('Choose photo files').setInputFiles({
		name: 'not-a-photo.png',
		mimeType: 'image/png',
		buffer: Buffer.from('just words')
	});
	await expect(form.getByText('“not-a-photo.png” is not a JPEG, PNG or WebP photo.')).toBeVisible();
	await form.getByLabel('Choose photo files').setInputFiles({
		name: 'vee-2.png',
		mimeType: 'image/png',
		buffer: png(640, 480)
	});
	await expect(form.getByRole('img', { name: 'Inspection photo 1' })).toBeVisible();
	await form.getByRole('button', { name: 'Log inspection' }).click();

	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(1);
	await expect(page.getByText(/1 photo on this device/)).toBeVisible();
	await expect(page.getByText('1 photo to upload')).toBeVisible();
	expect(await serverEvents(page.request, code)).toHaveLength(0);

	await context.setOffline(false);
	await page.getByRole('button', { name: 'Sync now' }).click();
	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(0, {
		timeout: 30_000
	});

	// The server's inspection lists the photo, and the card shows its thumbnail, loaded.
	const thumb = page.getByRole('img', { name: 'Photo 1 (opens the full photo)' });
	await expect(thumb).toBeVisible({ timeout: 30_000 });
	await expect
		.poll(() => thumb.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth), {
			timeout: 30_000
		})
		.toBeGreaterThan(0);
	await expect(page.getByText('1 photo to upload')).toHaveCount(0);

	const [event] = await serverEvents(page.request, code);
	expect(event).toMatchObject({
		kind: 'inspection',
		payload: {
			verdict: 'watch',
			contacts: [
				{ contact: 'Ball 1', grade: 1, marks: [] },
				{ contact: 'Vee 2', grade: 2, marks: ['fretting'] }
			]
		}
	});
	const photoIds = event.payload.photoIds as string[];
	expect(photoIds).toHaveLength(1);
	// The original is kept as sent; the thumbnail is the phone's small JPEG.
	const full = await page.request.get(`/api/attachments/${photoIds[0]}`);
	expect(full.headers()['content-type']).toBe('image/png');
	expect(Buffer.compare(await full.body(), png(640, 480))).toBe(0);
	const small = await page.request.get(`/api/attachments/${photoIds[0]}/thumb`);
	expect(small.headers()['content-type']).toBe('image/jpeg');
	expect((await small.body()).byteLength).toBeLessThan((await full.body()).byteLength);
	// Signed out, the photo is refused. (Off the card first, so no sync request in flight can bring
	// the session cookie back.)
	await page.goto('about:blank');
	await context.clearCookies();
	const refused = await page.request.get(`/api/attachments/${photoIds[0]}/thumb`);
	expect(refused.status()).toBe(401);
});
