import { expect as baseExpect, test, type Page } from '@playwright/test';
import { demoAccount, signInAs, submitPassword, untilHydrated } from '../helpers/auth';

// Several bcrypt sign-ins and password hashes, and two browser contexts.
test.describe.configure({ timeout: 120_000 });
// No offline cache needed here; a service worker installing in every fresh context only competes.
test.use({ serviceWorkers: 'block' });
const expect = baseExpect.configure({ timeout: 15_000 });

async function savePassword(page: Page, current: string, next: string, confirm = next) {
	await page.goto('/account');
	await untilHydrated(page);
	await page.getByLabel('Current password').fill(current);
	await page.getByLabel('New password', { exact: true }).fill(next);
	await page.getByLabel('New password again').fill(confirm);
	await page.getByRole('button', { name: 'Save password' }).click();
}

test('changing the password signs out the other devices, not this one', async ({
	page,
	browser
}) => {
	const tech = demoAccount('technician');
	const fresh = 'a-fresh-password-42';
	const other = await browser.newContext();
	const phone = await other.newPage();
	await signInAs(phone, 'technician');
	await signInAs(page, 'technician', '/account');
	await expect(page.getByRole('heading', { name: 'Your account' })).toBeVisible();

	await savePassword(page, tech.password, fresh, 'not-the-same-password');
	await expect(page.getByText('The two new passwords differ.')).toBeVisible();
	await savePassword(page, 'not-my-password', fresh);
	await expect(page.getByText('That is not your current password.')).toBeVisible();
	expect((await other.request.get('/api/fixtures')).status()).toBe(200);

	let changed = false;
	try {
		await savePassword(page, tech.password, fresh);
		await expect(page.getByRole('main').getByRole('status')).toContainText('Password saved');
		changed = true;
		// This device carries on; the other one is signed out.
		expect((await page.request.get('/api/fixtures')).status()).toBe(200);
		expect((await other.request.get('/api/fixtures')).status()).toBe(401);
		await phone.goto('/fixtures');
		await expect(phone).toHaveURL(/\/signin\?next=/);
		// Only the new password signs in.
		await submitPassword(phone, tech.email, tech.password);
		await expect(phone.getByRole('alert')).toHaveText('⚠ E-mail or password is wrong.');
		await submitPassword(phone, tech.email, fresh);
		await phone.waitForURL((url) => !url.pathname.startsWith('/signin'));
	} finally {
		// The demo password again, for the other tests.
		if (changed) {
			await savePassword(page, fresh, tech.password);
			await expect(page.getByRole('main').getByRole('status')).toContainText('Password saved');
		}
		await other.close();
	}
});
