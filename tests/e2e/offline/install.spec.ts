import { expect, test } from '@playwright/test';
import { signInAs } from '../helpers/auth';
import { cacheForOffline, createFixture } from './support';

test('the web manifest names Nestmark and its icons are served', async ({ request }) => {
	const res = await request.get('/manifest.webmanifest');
	expect(res.status()).toBe(200);
	const manifest = await res.json();
	expect(manifest).toMatchObject({
		name: 'Nestmark',
		short_name: 'Nestmark',
		display: 'standalone',
		theme_color: '#14312b',
		background_color: '#f6f4ee'
	});
	const sizes = manifest.icons.map(
		(i: { sizes: string; purpose: string }) => `${i.sizes} ${i.purpose}`
	);
	expect(sizes).toEqual(
		expect.arrayContaining(['192x192 any', '512x512 any', '192x192 maskable', '512x512 maskable'])
	);
	for (const icon of manifest.icons as { src: string }[]) {
		const img = await request.get(icon.src);
		expect(img.status()).toBe(200);
		expect(img.headers()['content-type']).toBe('image/png');
	}
});

test('the service worker is served and precaches the app shell and fonts', async ({ request }) => {
	const res = await request.get('/sw.js');
	expect(res.status()).toBe(200);
	const body = await res.text();
	expect(body).toContain('precacheAndRoute');
	expect(body).toMatch(/\.woff2/);
	expect(body).toContain('nestmark-pages');
});

test('the scanner and a fixture card open again after an offline reload', async ({
	page,
	context
}) => {
	// Installing the service worker (about 1 MB of precache) is slow on a busy machine.
	test.setTimeout(180_000);
	const code = await createFixture('Install test fixture plate', { type: 'plate' });
	await signInAs(page, 'operator');
	await expect(page.locator('link[rel="manifest"]')).toHaveAttribute(
		'href',
		/manifest\.webmanifest$/
	);

	await page.goto('/scan');
	await cacheForOffline(page);
	await page.goto(`/f/${code}`);
	await cacheForOffline(page);

	await context.setOffline(true);
	const card = await page.reload();
	expect(card?.fromServiceWorker()).toBe(true);
	await expect(page.getByRole('heading', { name: 'Install test fixture plate' })).toBeVisible();
	await expect(page.getByRole('button', { name: 'Reseat', exact: true })).toBeEnabled();

	const scan = await page.goto('/scan');
	expect(scan?.fromServiceWorker()).toBe(true);
	await expect(page.getByRole('heading', { name: 'Scan a label' })).toBeVisible();
});

test('a card never opened on this device still opens offline from the register copy', async ({
	page,
	context
}) => {
	// Installing the service worker (about 1 MB of precache) is slow on a busy machine.
	test.setTimeout(180_000);
	const code = await createFixture('Never-opened reference flat mount', {
		type: 'trihedral-vee-flat'
	});
	await signInAs(page, 'operator');
	await page.goto('/scan');
	await cacheForOffline(page);
	// The register copy is fetched by the sync loop on start.
	await expect
		.poll(() =>
			page.evaluate(
				(c) =>
					new Promise<boolean>((resolve) => {
						const open = indexedDB.open('nestmark');
						open.onsuccess = () => {
							const get = open.result.transaction('snapshot').objectStore('snapshot').get(c);
							get.onsuccess = () => resolve(get.result !== undefined);
							get.onerror = () => resolve(false);
						};
						open.onerror = () => resolve(false);
					}),
				code
			)
		)
		.toBe(true);

	await context.setOffline(true);
	await page.getByLabel('Type the code').fill(code);
	await page.getByRole('button', { name: 'Open', exact: true }).click();
	await page.waitForURL(`**/f/${code}`);
	await expect(
		page.getByRole('heading', { name: 'Never-opened reference flat mount' })
	).toBeVisible();
	await expect(page.getByText('shown from this device’s copy of the register')).toBeVisible();
});
