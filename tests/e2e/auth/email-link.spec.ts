import { expect as baseExpect, test } from '@playwright/test';
import { demoAccount, signInAs } from '../helpers/auth';
import { mailSince, waitForMail } from '../helpers/mail';

// Several browser contexts and server round trips per step: give a busy machine time.
test.describe.configure({ timeout: 90_000 });
// No offline cache needed here; a service worker installing in every fresh context only competes.
test.use({ serviceWorkers: 'block' });
const expect = baseExpect.configure({ timeout: 15_000 });

test('a sign-in link from the captured mail signs the person in, once', async ({
	page,
	browser
}) => {
	const { email } = demoAccount('technician');
	const since = Date.now();
	await page.goto('/signin');
	await page.getByLabel('E-mail for a sign-in link').fill(email);
	await page.getByRole('button', { name: 'E-mail me a sign-in link' }).click();
	await expect(page).toHaveURL(/\/signin\/check-mail$/);
	await expect(page.getByRole('heading', { name: 'Check your mail' })).toBeVisible();

	const mail = await waitForMail(email, since);
	expect(mail.subject).toBe('Your Nestmark sign-in link');
	const link = mail.links.find((l) => l.includes('/auth/callback/'));
	expect(link).toBeTruthy();

	await page.goto(link!);
	await expect(page.getByRole('link', { name: 'Sign out' })).toBeVisible();
	await expect(page).not.toHaveURL(/\/signin/);

	// A second use of the same link is refused, with a way forward.
	const other = await browser.newContext();
	const again = await other.newPage();
	await again.goto(link!);
	await expect(again).toHaveURL(/\/signin\?error=Verification/);
	await expect(again.getByRole('alert')).toContainText('expired or has already been used');
	await other.close();
});

test('an unknown address gets the same answer and no mail', async ({ page }) => {
	const email = `nobody-${Date.now()}@larchmere.example`;
	const since = Date.now();
	await page.goto('/signin');
	await page.getByLabel('E-mail for a sign-in link').fill(email);
	await page.getByRole('button', { name: 'E-mail me a sign-in link' }).click();
	await expect(page).toHaveURL(/\/signin\/check-mail$/);
	// A known address asked next gets its mail; any mail to the unknown one was sent before it.
	const known = demoAccount('operator').email;
	const knownSince = Date.now();
	await page.goto('/signin');
	await page.getByLabel('E-mail for a sign-in link').fill(known);
	await page.getByRole('button', { name: 'E-mail me a sign-in link' }).click();
	await expect(page).toHaveURL(/\/signin\/check-mail$/);
	await waitForMail(known, knownSince);
	expect(await mailSince(email, since)).toHaveLength(0);
});

test('an admin reads the captured mail, with the link clickable', async ({ page, browser }) => {
	const { email } = demoAccount('supervisor');
	const requester = await browser.newContext();
	const req = await requester.newPage();
	const since = Date.now();
	await req.goto('/signin');
	await req.getByLabel('E-mail for a sign-in link').fill(email);
	await req.getByRole('button', { name: 'E-mail me a sign-in link' }).click();
	await expect(req).toHaveURL(/check-mail/);
	await waitForMail(email, since);

	await signInAs(page, 'admin', '/admin/mail');
	await expect(page.getByRole('heading', { name: 'Captured mail' })).toBeVisible();
	const newest = page.getByRole('main').getByRole('listitem').first();
	await expect(newest).toContainText('Your Nestmark sign-in link');
	await expect(newest).toContainText(`to ${email}`);
	const link = newest.getByRole('link', { name: /\/auth\/callback\/nodemailer/ });
	await expect(link).toBeVisible();

	// Following it from the requester's browser signs the supervisor in there.
	await req.goto((await link.getAttribute('href'))!);
	await expect(req.getByRole('link', { name: 'Sign out' })).toBeVisible();
	await requester.close();
});
