import { expect, test } from '@playwright/test';
import { ROLES } from '../../../src/lib/schemas/roles';
import { demoAccount, signInAs, signOut, submitPassword } from '../helpers/auth';

// No offline cache needed here; a service worker installing in every fresh context only competes.
test.use({ serviceWorkers: 'block' });

test.describe('signing in with a password', () => {
	for (const role of ROLES) {
		test(`the ${role} demo account signs in and sees what the role allows`, async ({ page }) => {
			await signInAs(page, role);
			await expect(page.getByRole('link', { name: 'Sign in' })).toHaveCount(0);
			const people = page
				.getByRole('navigation', { name: 'Main' })
				.getByRole('link', { name: 'People' });
			await expect(people).toHaveCount(role === 'admin' ? 1 : 0);
		});
	}

	test('a wrong password and an unknown address get the same generic message', async ({ page }) => {
		await page.goto('/signin');
		await submitPassword(page, demoAccount('supervisor').email, 'not-the-password');
		const alert = page.getByRole('alert');
		await expect(alert).toHaveText('⚠ E-mail or password is wrong.');
		await expect(page).toHaveURL(/\/signin/);
		// The address stays filled in; the password does not come back from the server.
		await expect(page.getByLabel('E-mail', { exact: true })).toHaveValue(
			demoAccount('supervisor').email
		);

		await page.goto('/signin');
		await submitPassword(page, 'nobody-here@larchmere.example', 'not-the-password');
		await expect(page.getByRole('alert')).toHaveText('⚠ E-mail or password is wrong.');
	});

	test('the form explains what is missing before asking the server', async ({ page }) => {
		await page.goto('/signin');
		// Bypass the browser's own required-field check to see the server's field messages.
		await page
			.locator('form[action="?/password"]')
			.evaluate((f) => f.setAttribute('novalidate', ''));
		await page.getByLabel('E-mail', { exact: true }).fill('not-an-address');
		await page.getByRole('button', { name: 'Sign in', exact: true }).click();
		await expect(page.getByText('Enter an e-mail address like name@example.com.')).toBeVisible();
		await expect(page.getByText('Enter your password.')).toBeVisible();
	});

	test('a signed-out visit to a page goes to sign-in and comes back after it', async ({ page }) => {
		await page.goto('/admin/users');
		await expect(page).toHaveURL(/\/signin\?next=%2Fadmin%2Fusers$/);
		await signInAs(page, 'admin', '/admin/users');
		await expect(page).toHaveURL(/\/admin\/users$/);
		await expect(page.getByRole('heading', { name: 'People', level: 1 })).toBeVisible();
	});

	test('signing out ends the session', async ({ page }) => {
		await signInAs(page, 'planner');
		await signOut(page);
		await expect(page.getByRole('main').getByRole('status')).toHaveText('You have signed out.');
		await page.goto('/admin/users');
		await expect(page).toHaveURL(/\/signin\?next=/);
	});

	test('works without JavaScript', async ({ browser }) => {
		const context = await browser.newContext({ javaScriptEnabled: false });
		const page = await context.newPage();
		await page.goto('/signin');
		const noScript = { javaScript: false };
		await submitPassword(page, demoAccount('technician').email, 'wrong-password-here', noScript);
		await expect(page.getByRole('alert')).toHaveText('⚠ E-mail or password is wrong.');
		await signInAs(page, 'technician', undefined, noScript);
		await context.close();
	});
});
