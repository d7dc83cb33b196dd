import { expect as baseExpect, test, type Page } from '@playwright/test';
import { demoAccount, signInAs, submitPassword, untilHydrated } from '../helpers/auth';
import { waitForMail } from '../helpers/mail';

// Several browser contexts and server round trips per step: give a busy machine time.
test.describe.configure({ timeout: 120_000 });
// These tests need no offline cache; installing the service worker in every fresh context
// would only compete with them for the machine.
test.use({ serviceWorkers: 'block' });
const expect = baseExpect.configure({ timeout: 15_000 });

const unique = (what: string) => `${what}-${Date.now().toString(36)}@larchmere.example`;

/** The card of one person on /admin/users. */
const card = (page: Page, name: string) =>
	page.getByRole('listitem').filter({ has: page.getByRole('heading', { name, exact: true }) });

/** Invites someone through the form and waits for the notice. */
async function invite(page: Page, name: string, email: string, roles: string[]) {
	const form = page.getByRole('form', { name: 'Invite someone' });
	await form.getByLabel('Name').fill(name);
	await form.getByLabel('E-mail').fill(email);
	for (const r of roles) await form.getByLabel(r, { exact: true }).check();
	await form.getByRole('button', { name: 'Send invitation' }).click();
	await expect(page.getByRole('main').getByRole('status')).toHaveText(
		`✓ Invitation sent to ${name}.`
	);
	// Ready for the next person.
	await expect(form.getByLabel('Name')).toHaveValue('');
}

test('an invited person receives mail, signs in with it and gets the roles given', async ({
	page,
	browser
}) => {
	await signInAs(page, 'admin', '/admin/users');
	const email = unique('invitee');
	const since = Date.now();
	await invite(page, 'Maren Ostby', email, ['technician', 'planner']);
	await expect(card(page, 'Maren Ostby')).toContainText('not signed in yet');

	const mail = await waitForMail(email, since);
	expect(mail.subject).toBe('You have been invited to Nestmark');
	expect(mail.text).toContain('Your roles: technician, planner.');
	const link = mail.links.find((l) => l.includes('/auth/callback/nodemailer'))!;

	const theirs = await browser.newContext();
	const invitee = await theirs.newPage();
	await invitee.goto(link);
	await expect(invitee.getByRole('link', { name: 'Sign out' })).toBeVisible();
	// The header names them (their landing page may list people too: planners choose assignees).
	await expect(
		invitee.getByRole('banner').getByRole('link', { name: 'Maren Ostby' })
	).toBeVisible();
	await theirs.close();

	await page.reload();
	await expect(card(page, 'Maren Ostby')).not.toContainText('not signed in yet');
});

test('the invite form shows field messages and adds nobody', async ({ page }) => {
	await signInAs(page, 'admin', '/admin/users');
	const form = page.getByRole('form', { name: 'Invite someone' });
	await form.evaluate((f) => f.setAttribute('novalidate', ''));
	await form.getByLabel('E-mail').fill('not an address');
	await form.getByRole('button', { name: 'Send invitation' }).click();
	await expect(form.getByText('Enter the person’s name.')).toBeVisible();
	await expect(form.getByText('Enter an e-mail address like name@example.com.')).toBeVisible();
	await expect(form.getByText('Choose at least one role.')).toBeVisible();

	// An address that already has an account.
	await form.getByLabel('Name').fill('Someone Again');
	await form.getByLabel('E-mail').fill(demoAccount('operator').email);
	await form.getByLabel('operator', { exact: true }).check();
	await form.getByRole('button', { name: 'Send invitation' }).click();
	await expect(
		form.getByText('Someone with this e-mail address already has an account.')
	).toBeVisible();
	await expect(card(page, 'Someone Again')).toHaveCount(0);
});

test('a role change signs the person out everywhere; signing in again brings the new roles', async ({
	page,
	browser
}) => {
	await signInAs(page, 'admin', '/admin/users');
	const email = unique('roles');
	const since = Date.now();
	await invite(page, 'Jonas Aberg', email, ['operator']);
	const link = (await waitForMail(email, since)).links.find((l) => l.includes('/auth/callback/'))!;

	const theirs = await browser.newContext();
	const them = await theirs.newPage();
	await them.goto(link);
	await expect(them.getByRole('link', { name: 'Sign out' })).toBeVisible();
	expect((await them.goto('/admin/users'))?.status()).toBe(403);

	const person = card(page, 'Jonas Aberg');
	const admin = person.getByLabel('admin', { exact: true });
	await admin.check();
	await person.getByRole('button', { name: 'Save roles' }).click();
	try {
		await expect(page.getByRole('main').getByRole('status')).toHaveText(
			'✓ Roles of Jonas Aberg saved.'
		);
		// The session from before the change has ended ...
		await them.goto('/admin/users');
		await expect(them).toHaveURL(/\/signin\?next=%2Fadmin%2Fusers$/);
		// ... and a fresh sign-in carries the new role.
		const again = Date.now();
		await untilHydrated(them);
		await them.getByLabel('E-mail for a sign-in link').fill(email);
		await them.getByRole('button', { name: 'E-mail me a sign-in link' }).click();
		await expect(them).toHaveURL(/\/signin\/check-mail$/);
		const fresh = (await waitForMail(email, again)).links.find((l) =>
			l.includes('/auth/callback/')
		)!;
		await them.goto(fresh);
		await expect(them.getByRole('link', { name: 'Sign out' })).toBeVisible();
		expect((await them.goto('/admin/users'))?.status()).toBe(200);
		await expect(them.getByRole('heading', { name: 'People', level: 1 })).toBeVisible();
	} finally {
		// And back (also when the test fails, so no second admin is left for the tests below).
		await page.goto('/admin/users');
		await admin.uncheck();
		await person.getByRole('button', { name: 'Save roles' }).click();
		await expect(page.getByRole('main').getByRole('status')).toHaveText(
			'✓ Roles of Jonas Aberg saved.'
		);
	}
	await them.goto('/admin/users');
	await expect(them).toHaveURL(/\/signin\?next=/);
	await theirs.close();
});

test('the last admin cannot drop their own admin role', async ({ page }) => {
	const admin = await signInAs(page, 'admin', '/admin/users');
	// An interrupted earlier run may have left another admin; take the role back first, so the
	// rule under test is the one that answers.
	const otherAdmins = page
		.getByRole('main')
		.getByRole('listitem')
		.filter({ hasNotText: '(you)' })
		.filter({ has: page.getByRole('checkbox', { name: 'admin', exact: true, checked: true }) });
	while ((await otherAdmins.count()) > 0) {
		const other = otherAdmins.first();
		await other.getByLabel('operator', { exact: true }).check();
		await other.getByLabel('admin', { exact: true }).uncheck();
		await other.getByRole('button', { name: 'Save roles' }).click();
		await expect(page.getByRole('main').getByRole('status')).toContainText('saved');
		await page.goto('/admin/users');
	}
	const me = page.getByRole('listitem').filter({ hasText: '(you)' });
	await expect(me).toContainText(admin.email);
	// Keep a role, so the rule tested is the admin one, not "at least one role".
	await me.getByLabel('supervisor', { exact: true }).check();
	await me.getByLabel('admin', { exact: true }).uncheck();
	await me.getByRole('button', { name: 'Save roles' }).click();
	await expect(me.getByText(/needs at least one active admin/)).toBeVisible();
	await page.reload();
	await expect(me.getByLabel('admin', { exact: true })).toBeChecked();
	await expect(me.getByLabel('supervisor', { exact: true })).not.toBeChecked();
	await expect(me.getByRole('button', { name: /^Deactivate/ })).toHaveCount(0);
});

test('a deactivated person is signed out at once and cannot sign in until reactivated', async ({
	page,
	browser
}) => {
	// Three sign-ins (bcrypt on purpose slow) and two browser contexts.
	test.setTimeout(180_000);
	const planner = demoAccount('planner');
	const theirs = await browser.newContext();
	const them = await theirs.newPage();
	await signInAs(them, 'planner');

	await signInAs(page, 'admin', '/admin/users');
	const person = page.getByRole('listitem').filter({ hasText: planner.email });
	try {
		await person.getByRole('button', { name: /^Deactivate/ }).click();
		await expect(page.getByRole('main').getByRole('status')).toContainText(
			'is deactivated and can no longer sign in'
		);
		await expect(person).toContainText('Deactivated');

		await them.goto('/admin/users');
		await expect(them).toHaveURL(/\/signin\?next=/);
		await submitPassword(them, planner.email, planner.password);
		await expect(them.getByRole('alert')).toContainText('This account has been deactivated');
	} finally {
		await page.goto('/admin/users');
		const reactivate = person.getByRole('button', { name: /^Reactivate/ });
		if (await reactivate.count()) await reactivate.click();
	}
	await expect(page.getByRole('main').getByRole('status')).toContainText('can sign in again');
	// The session from before stays ended; signing in afresh works.
	await them.goto('/admin/users');
	await expect(them).toHaveURL(/\/signin\?next=/);
	await signInAs(them, 'planner');
	await theirs.close();
});

test('repeated wrong passwords lock the account for a while', async ({ page }) => {
	// A fresh invited account (no password): every password attempt fails.
	await signInAs(page, 'admin', '/admin/users');
	const email = unique('locked');
	await invite(page, 'Lotte Kram', email, ['operator']);

	const context = await page.context().browser()!.newContext();
	const guesser = await context.newPage();
	await guesser.goto('/signin');
	// Each guess waits for its own answer: the alert of the one before says the same words, and
	// a guess typed while the last one is still answered is cleared by that answer.
	const guess = async (password: string) => {
		const answered = guesser.waitForResponse(
			(r) => r.url().endsWith('/signin?/password') && r.request().method() === 'POST'
		);
		await submitPassword(guesser, email, password);
		expect((await answered).ok()).toBe(true);
	};
	for (let i = 1; i <= 4; i++) {
		await guess(`guess-number-${i}`);
		await expect(guesser.getByRole('alert')).toHaveText('⚠ E-mail or password is wrong.');
	}
	await guess('guess-number-5');
	await expect(guesser.getByRole('alert')).toContainText(
		'Too many failed attempts. Wait 15 minutes'
	);
	await context.close();
});
