import { expect, test, type Page } from '@playwright/test';
import { signInAs } from '../helpers/auth';
import { createFixture } from '../offline/support';

test.use({ serviceWorkers: 'block' });

/** Whether the device's register copy (IndexedDB `nestmark`, store `snapshot`) holds `code`. */
function deviceHolds(page: Page, code: string) {
	return page.waitForFunction(
		(c) =>
			new Promise<boolean>((resolve) => {
				const open = indexedDB.open('nestmark');
				open.onerror = () => resolve(false);
				open.onsuccess = () => {
					const db = open.result;
					if (!db.objectStoreNames.contains('snapshot')) {
						db.close();
						resolve(false);
						return;
					}
					const get = db.transaction('snapshot').objectStore('snapshot').get(c);
					get.onsuccess = () => {
						db.close();
						resolve(get.result !== undefined);
					};
					get.onerror = () => {
						db.close();
						resolve(false);
					};
				};
			}),
		code,
		{ timeout: 30_000 }
	);
}

/**
 * Holds the device's `meta` store (a write transaction kept busy) from the first moment of the
 * page at `path`, so the card's "is my register copy newer than this page?" check waits; the
 * test lets it go with `window.__releaseMeta()`, which first records the copy as confirmed now,
 * as a sync pass does when the server answers "unchanged".
 */
function holdMetaOn(path: string) {
	const w = window as unknown as { __releaseMeta?: () => void; __metaHeld?: boolean };
	if (location.pathname !== path) return;
	const open = indexedDB.open('nestmark');
	open.onsuccess = () => {
		const store = open.result.transaction('meta', 'readwrite').objectStore('meta');
		let held = true;
		w.__releaseMeta = () => {
			held = false;
		};
		// A transaction commits once it has no request pending: keep one pending until released.
		const spin = () => {
			if (held) store.get('snapshotCheckedAt').onsuccess = spin;
			else store.put(new Date().toISOString(), 'snapshotCheckedAt');
		};
		spin();
		w.__metaHeld = true;
	};
}

test('switching from one card to another never shows the first fixture under the second code', async ({
	page
}) => {
	test.setTimeout(90_000);
	const firstName = 'Switch test first pallet';
	const secondName = 'Switch test second pallet';
	const first = await createFixture(firstName);

	await signInAs(page, 'operator');
	await page.goto(`/f/${first}`);
	await deviceHolds(page, first);
	// Leave the app (so no sync pass copies the register again), then make the second fixture:
	// the phone has not seen it yet, so its card comes from the server.
	await page.goto('about:blank');
	const second = await createFixture(secondName);

	await page.addInitScript(holdMetaOn, `/f/${first}`);
	await page.goto(`/f/${first}`);
	await page.waitForFunction(() => 'hydrated' in document.documentElement.dataset);
	await page.waitForFunction(() => (window as { __metaHeld?: boolean }).__metaHeld === true);
	await expect(page.getByRole('heading', { level: 1 })).toHaveText(firstName);

	// Follow a link to the second card (same page, another code) while the first card's check of
	// the device copy is still waiting.
	await page.evaluate((code) => {
		const a = document.createElement('a');
		a.href = `/f/${code}`;
		a.textContent = 'next card';
		document.body.append(a);
		a.click();
	}, second);
	await expect(page).toHaveURL(new RegExp(`/f/${second}$`));
	await expect(page.getByRole('heading', { level: 1 })).toHaveText(secondName);

	// Let the waiting checks finish, then wait until the sync pass queued behind them has copied
	// the register (so the second fixture is on the device): every late answer has landed by then.
	await page.evaluate(() => (window as { __releaseMeta?: () => void }).__releaseMeta?.());
	await deviceHolds(page, second);

	await expect(page.getByRole('heading', { level: 1 })).toHaveText(secondName);
	await expect(page).toHaveTitle(`${secondName} · ${second} — Nestmark`);
	await expect(page.getByText(firstName)).toHaveCount(0);
});
