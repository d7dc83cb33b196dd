import { expect, test } from '@playwright/test';

test('the home page shows the Nestmark heading', async ({ page }) => {
	await page.goto('/');
	await expect(page.getByRole('heading', { name: 'Nestmark' })).toBeVisible();
});
