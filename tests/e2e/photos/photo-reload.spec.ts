import { expect, test } from '@playwright/test';
import { signInAs } from '../helpers/auth';
import { cacheForOffline, createFixture, serverEvents } from '../offline/support';
import { png } from './png';

test('a photo taken offline survives a reload and waits on the outbox page until it uploads', async ({
	page,
	context
}) => {
	// Installing the service worker (about 1 MB of precache) is slow on a busy machine.
	test.setTimeout(180_000);
	const code = await createFixture('Photo reload test plate', { type: 'plate' });
	await signInAs(page, 'technician');
	await page.goto(`/f/${code}`);
	await cacheForOffline(page);
	// Visit the outbox once online, so the service worker has it for later.
	await page.goto('/outbox');
	await page.goto(`/f/${code}`);
	await expect(page.getByRole('heading', { name: 'Photo reload test plate' })).toBeVisible();

	await context.setOffline(true);
	await page
		.getByRole('group', { name: 'Log something else' })
		.getByRole('button', { name: 'Inspection' })
		.click();
	const form = page.getByRole('form', { name: 'Inspection' });
	// A plate has no coupling geometry: one generic contact, renamed here.
	await form.getByLabel('Contact name').fill('Locating pin A');
	await form
		.getByRole('radiogroup', { name: 'Wear grade of Locating pin A' })
		.getByRole('radio', { name: /^0 Bright/ })
		.check();
	await form.getByLabel('Serviceable: keep it in use').check();
	await form
		.getByLabel('Choose photo files')
		.setInputFiles({ name: 'pin-a.png', mimeType: 'image/png', buffer: png(200, 150) });
	await expect(form.getByRole('img', { name: 'Inspection photo 1' })).toBeVisible();
	await form.getByRole('button', { name: 'Log inspection' }).click();
	await expect(page.getByText(/1 photo on this device/)).toBeVisible();

	// The app closes and opens again with no network: the entry and its photo are still here.
	const reloaded = await page.reload();
	expect(reloaded?.fromServiceWorker()).toBe(true);
	await expect(page.getByText(/1 photo on this device/)).toBeVisible();
	await page.goto('/outbox');
	await expect(page.getByRole('heading', { name: 'Photos waiting to upload (1)' })).toBeVisible();
	await expect(page.getByText('↑ Waits for its inspection to sync')).toBeVisible();

	await context.setOffline(false);
	await page.getByRole('button', { name: 'Sync now' }).first().click();
	await expect(page.getByRole('heading', { name: /Photos waiting to upload/ })).toHaveCount(0, {
		timeout: 30_000
	});
	await expect(page.getByText(/Nothing waiting: everything logged/)).toBeVisible();

	const [event] = await serverEvents(page.request, code);
	expect(event.payload).toMatchObject({
		contacts: [{ contact: 'Locating pin A', grade: 0, marks: [] }],
		verdict: 'serviceable'
	});
	const [photoId] = event.payload.photoIds as string[];
	const full = await page.request.get(`/api/attachments/${photoId}`);
	expect(full.status()).toBe(200);
	expect(Buffer.compare(await full.body(), png(200, 150))).toBe(0);
});
