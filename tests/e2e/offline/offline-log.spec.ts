import { expect, test } from '@playwright/test';
import { signInAs } from '../helpers/auth';
import { cacheForOffline, createFixture, serverEvents, waitingIds } from './support';

test('entries logged offline survive a reload and reach the server exactly once', async ({
	page,
	context
}) => {
	// Installing the service worker (about 1 MB of precache) is slow on a busy machine.
	test.setTimeout(180_000);
	const waiting = page.getByText('Waiting to sync', { exact: true });
	const code = await createFixture('Offline test pallet', { mass_kg: 18.5 });
	await signInAs(page, 'operator');
	await page.goto(`/f/${code}`);
	await expect(page.getByRole('heading', { name: 'Offline test pallet' })).toBeVisible();
	// The heavy pallet and the coupling's pinch points carry their cautions.
	await expect(page.getByText('Caution — Heavy item.')).toBeVisible();
	await expect(page.getByText('Caution — Pinch points.')).toBeVisible();
	await cacheForOffline(page);
	expect(await serverEvents(page.request, code)).toHaveLength(0);

	await context.setOffline(true);
	const reseat = page.getByRole('button', { name: 'Reseat', exact: true });
	for (let n = 1; n <= 3; n++) {
		await reseat.click();
		await expect(waiting).toHaveCount(n);
	}
	await page.getByRole('button', { name: 'Cleaning' }).click();
	// Cleaning shows the solvent and compressed-air cautions beside its form.
	await expect(page.getByText('Caution — Compressed air.')).toBeVisible();
	await page.getByRole('button', { name: 'Log cleaning' }).click();
	await expect(page.getByText('Choose how it was cleaned.')).toBeVisible();
	await page.getByLabel('Dry wipe (lint-free cloth)').check();
	await page.getByRole('button', { name: 'Log cleaning' }).click();
	await expect(waiting).toHaveCount(4);
	await expect(page.getByRole('status').filter({ hasText: 'Offline · 4 waiting' })).toBeVisible();
	const logged = await waitingIds(page);
	expect(new Set(logged).size).toBe(4);

	// A reload with no network: the page comes from the service worker, the entries from IndexedDB.
	const reloaded = await page.reload();
	expect(reloaded?.fromServiceWorker()).toBe(true);
	await expect(page.getByRole('heading', { name: 'Offline test pallet' })).toBeVisible();
	await expect(waiting).toHaveCount(4);
	expect((await waitingIds(page)).sort()).toEqual([...logged].sort());

	await context.setOffline(false);
	await expect(waiting).toHaveCount(0, { timeout: 30_000 });
	await expect(page.getByRole('status').filter({ hasText: /Synced/ })).toBeVisible();

	const events = await serverEvents(page.request, code);
	expect(events.map((e) => e.id).sort()).toEqual([...logged].sort());
	expect(events.filter((e) => e.kind === 'reseat')).toHaveLength(3);
	expect(events.filter((e) => e.kind === 'cleaning')).toHaveLength(1);
	expect(events.every((e) => e.user.name.length > 0)).toBe(true);
	// Now listed as the server's, attributed to the operator.
	await expect(page.getByText(/^✓ by /)).toHaveCount(4);
});
