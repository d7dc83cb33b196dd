import { expect, test, type Page } from '@playwright/test';
import { signInAs } from '../helpers/auth';

// The demo's fleet (scripts/demo-scenario.ts): the drifting pallet is "DT-2 kinematic pallet B"
// in the diamond-turning bay.
const DRIFTING = 'DT-2 kinematic pallet B';

// The filter form; the charts below it have titles with the same words ("By area", "Flags …").
const filters = (page: Page) => page.getByRole('search', { name: 'Filter the board' });

test.describe('the fleet board', () => {
	test('a supervisor who signs in lands on the board and sees the drifting pallet under drift', async ({
		page
	}) => {
		await signInAs(page, 'supervisor');
		await expect(page).toHaveURL(/\/board$/);
		await expect(page.getByRole('heading', { name: 'Fleet board', level: 1 })).toBeVisible();
		await expect(page.getByRole('link', { name: 'Board', exact: true })).toHaveAttribute(
			'aria-current',
			'page'
		);

		// The drift tile counts it; following the tile narrows the list to drift.
		const today = page.getByRole('region', { name: 'Today' });
		const driftTile = today.getByRole('link', { name: /Drifting/ });
		await expect(driftTile).toContainText(/[1-9]/);
		await driftTile.click();
		await expect(page).toHaveURL(/[?&]kind=drift\b/);
		const attention = page.getByRole('region', { name: 'Needs attention' });
		const row = attention.getByRole('row').filter({ hasText: DRIFTING });
		await expect(row).toHaveCount(1);
		await expect(row).toContainText('Drifting');
		await expect(row).toContainText(/Drift on the x axis: .*rule WE1/);
		await expect(row).toContainText('Diamond-turning bay');
		await expect(attention.getByRole('row')).toHaveCount(2); // the header and the pallet

		// The row opens the fixture page.
		await row.getByRole('link').first().click();
		await expect(page).toHaveURL(/\/fixtures\/NM-[A-Z0-9]{5}$/);
		await expect(page.getByRole('heading', { name: DRIFTING })).toBeVisible();
	});

	test('the area filter lives in the URL and survives a reload', async ({ page }) => {
		await signInAs(page, 'supervisor', '/board');
		await filters(page).getByLabel('Area').selectOption({ label: 'Interferometry room' });
		await expect(page).toHaveURL(/[?&]area=\d+/);
		const attention = page.getByRole('region', { name: 'Needs attention' });
		await expect(
			attention.getByRole('row').filter({ hasText: 'Transmission-sphere mount TS-A' })
		).toHaveCount(1);
		await expect(attention.getByRole('row').filter({ hasText: DRIFTING })).toHaveCount(0);

		await page.reload();
		await expect(filters(page).getByLabel('Area')).toHaveValue(/\d+/);
		await expect(filters(page).getByLabel('Area').locator('option:checked')).toHaveText(
			'Interferometry room'
		);
		await expect(attention.getByRole('row').filter({ hasText: DRIFTING })).toHaveCount(0);
		await expect(
			attention.getByRole('row').filter({ hasText: 'Transmission-sphere mount TS-A' })
		).toHaveCount(1);
		// The audit report keeps the area.
		await expect(page.getByRole('link', { name: 'Audit report' })).toHaveAttribute(
			'href',
			/^\/board\/report\?area=\d+$/
		);
	});

	test('works with JavaScript off: filters by a GET form', async ({ browser }) => {
		const context = await browser.newContext({ javaScriptEnabled: false });
		const page = await context.newPage();
		try {
			await signInAs(page, 'planner', '/board', { javaScript: false });
			await expect(page).toHaveURL(/\/board$/);
			await filters(page).getByLabel('Flag').selectOption('replace-now');
			await page.getByRole('button', { name: 'Show' }).click();
			await expect(page).toHaveURL(/kind=replace-now/);
			const rows = page.getByRole('region', { name: 'Needs attention' }).getByRole('row');
			await expect(rows.filter({ hasText: 'Transmission-sphere mount TS-A' })).toContainText(
				/Replace now: .*rated life/
			);
			await expect(rows.filter({ hasText: DRIFTING })).toHaveCount(0);
		} finally {
			await context.close();
		}
	});

	test('refreshes from the API on focus', async ({ page }) => {
		await signInAs(page, 'admin', '/board');
		const asked = page.waitForRequest((r) => r.url().includes('/api/fleet/summary'));
		await page.evaluate(() => window.dispatchEvent(new Event('focus')));
		const res = await (await asked).response();
		expect(res?.status()).toBe(200);
		expect(await res?.json()).toMatchObject({ today: expect.any(Array) });
	});

	test('an operator gets the 403 page on /board, and JSON 403 from the API', async ({ page }) => {
		await signInAs(page, 'operator');
		await expect(page).toHaveURL(/\/scan$/);
		await expect(page.getByRole('link', { name: 'Board', exact: true })).toHaveCount(0);
		const response = await page.goto('/board');
		expect(response?.status()).toBe(403);
		await expect(page.getByRole('heading', { name: 'Not part of your role' })).toBeVisible();
		const api = await page.request.get('/api/fleet/summary');
		expect(api.status()).toBe(403);
		expect(api.headers()['content-type']).toMatch(/^application\/json/);
		expect(await api.json()).toEqual({ error: expect.stringMatching(/fleet board/) });
	});

	test('a technician lands on their due work', async ({ page }) => {
		await signInAs(page, 'technician');
		await expect(page).toHaveURL(/\/work$/);
		await expect(page.getByRole('heading', { name: 'My work', level: 1 })).toBeVisible();
		// Their work orders first (the demo gives them the drifting pallet's inspection, under way)…
		const orders = page.getByRole('region', { name: 'Work orders' });
		await expect(orders.getByRole('listitem').filter({ hasText: DRIFTING })).not.toHaveCount(0);
		// …then routine work that no order answers; drift is not routine work.
		const due = page.getByRole('region', { name: 'Also due, not yet planned' });
		// (the demo's two cleanings are planned; the breadboard's inspection is not)
		await expect(
			due.getByRole('listitem').filter({ hasText: 'Inspection due' }).first()
		).toBeVisible();
		await expect(due.getByText(DRIFTING)).toHaveCount(0);
		await expect(page.getByRole('link', { name: 'Board', exact: true })).toHaveCount(0);
	});

	test('an explicit next on sign-in still wins', async ({ page }) => {
		await signInAs(page, 'supervisor', '/fixtures');
		await expect(page).toHaveURL(/\/fixtures$/);
	});
});
