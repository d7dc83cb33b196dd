import { expect, test } from '@playwright/test';
import { signInAs } from '../helpers/auth';

// No offline cache needed here; a service worker installing in every fresh context only competes.
test.use({ serviceWorkers: 'block' });

test('an operator opening the admin pages gets the 403 page', async ({ page }) => {
	await signInAs(page, 'operator');
	const response = await page.goto('/admin/users');
	expect(response?.status()).toBe(403);
	await expect(page.getByRole('heading', { name: 'Not part of your role' })).toBeVisible();
	await expect(page.getByText('ask an admin to add the role')).toBeVisible();
	// The list of people is not in the page.
	await expect(page.getByRole('heading', { name: 'Everyone' })).toHaveCount(0);
});

test('an operator cannot post to an admin action either', async ({ page }) => {
	await signInAs(page, 'operator');
	const response = await page.request.post('/admin/users?/deactivate', {
		form: { userId: 'anyone' },
		headers: { origin: new URL(page.url()).origin }
	});
	expect(response.status()).toBe(403);
});

test('an API call without a session gets 401 JSON', async ({ playwright, baseURL }) => {
	const api = await playwright.request.newContext({ baseURL });
	const response = await api.get('/api/fixtures');
	expect(response.status()).toBe(401);
	expect(response.headers()['content-type']).toContain('application/json');
	expect(await response.json()).toEqual({ error: 'Not signed in.' });
	await api.dispose();
});

test('the health check stays public', async ({ playwright, baseURL }) => {
	const api = await playwright.request.newContext({ baseURL });
	const response = await api.get('/api/health');
	expect(response.status()).toBe(200);
	await api.dispose();
});
