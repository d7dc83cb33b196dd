import { expect, test, type Page } from '@playwright/test';
import { demoAccount, signInAs, untilHydrated } from '../helpers/auth';

// The demo's worn mount (scripts/demo-scenario.ts) has an open "replace now" flag; the demo's
// technician is Tomas Okafor.
const WORN = 'Transmission-sphere mount TS-A';
const TECHNICIAN = 'Tomas Okafor';

const today = () => new Date().toISOString().slice(0, 10);

/** A link of the site's main navigation. */
const nav = (page: Page, name: string) =>
	page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name, exact: true });

/** The row of the worn mount in the board's "Needs attention". */
const boardRow = (page: Page) =>
	page.getByRole('region', { name: 'Needs attention' }).getByRole('row').filter({ hasText: WORN });

test.describe('the planner’s pages', () => {
	test('the planner plans the worn mount from the board, assigns the technician, and a stale page is refused', async ({
		page,
		context
	}) => {
		await signInAs(page, 'planner');
		await expect(page).toHaveURL(/\/plan$/);
		await expect(page.getByRole('heading', { name: 'Plan', level: 1 })).toBeVisible();
		await expect(nav(page, 'Plan')).toHaveAttribute('aria-current', 'page');
		// The flag is not planned yet: it waits in the list of flags without a work order.
		const unplanned = page.getByRole('region', { name: 'Open flags with no work order yet' });
		await expect(unplanned.getByRole('listitem').filter({ hasText: 'TS-A' })).not.toHaveCount(0);

		// From the board: the flag's own "Plan" link opens the form filled in from the flag.
		await nav(page, 'Board').click();
		await expect(page).toHaveURL(/\/board$/);
		await boardRow(page)
			.getByRole('link', { name: /^Plan .*Replace now/ })
			.click();
		await expect(page).toHaveURL(/\/plan\/new\?flag=\d+$/);
		await expect(page.getByRole('heading', { name: 'New work order' })).toBeVisible();
		await untilHydrated(page);
		await expect(page.getByLabel('Fixture code')).toHaveValue(/^NM-[A-Z0-9]{5}$/);
		await expect(page.getByLabel('Action')).toHaveValue('replace-balls');
		await expect(page.getByLabel('Due')).toHaveValue(today());
		await expect(page.getByLabel('Notes')).not.toHaveValue('');
		await page.getByLabel('Assignee').selectOption(demoAccount('technician').email);
		await page.getByRole('button', { name: 'Create work order' }).click();

		// The order: scheduled (a date and an assignee), with its history row.
		await expect(page).toHaveURL(/\/plan\/\d+\?created=1$/);
		const orderUrl = page.url().replace(/\?created=1$/, '');
		await expect(page.getByRole('main').getByRole('status')).toContainText('Work order created.');
		await expect(page.getByRole('heading', { name: 'Replace balls and seats' })).toBeVisible();
		await expect(page.getByText('Scheduled', { exact: true }).first()).toBeVisible();
		const history = page.getByRole('list', { name: 'History of this work order' });
		await expect(history.getByRole('listitem').first()).toContainText('Created');
		await expect(history).toContainText('Piet Hallam');

		// On the list: scheduled, due today, assigned, answering the replace-now flag.
		await nav(page, 'Plan').click();
		const row = page
			.getByRole('region', { name: 'Work orders' })
			.getByRole('row')
			.filter({ hasText: 'TS-A' })
			.filter({ hasText: 'Replace now' });
		await expect(row).toHaveCount(1);
		await expect(row).toContainText('Scheduled');
		await expect(row).toContainText(TECHNICIAN);
		await expect(row).toContainText(today());

		// The board says so next to the flag.
		await nav(page, 'Board').click();
		await expect(boardRow(page)).toContainText(`planned for ${today()} · ${TECHNICIAN}`);

		// Two pages on the same order: the second cancels it; the first, stale, is refused.
		await page.goto(orderUrl);
		const other = await context.newPage();
		await other.goto(orderUrl);
		await untilHydrated(other);
		await other.getByLabel('Reason for cancelling').fill('Spare set not in stock this week.');
		await other.getByRole('button', { name: 'Cancel work order' }).click();
		await expect(other.getByRole('main').getByRole('status')).toContainText('Status changed.');
		await expect(other.getByText('Cancelled', { exact: true }).first()).toBeVisible();
		await other.close();

		await untilHydrated(page);
		await page.getByRole('button', { name: 'Mark done' }).click();
		await expect(page.getByRole('main').getByRole('alert')).toHaveText(
			'⚠ This work order is cancelled: it cannot become done. Make a new work order instead.'
		);
		await page.reload();
		await expect(page.getByText('Cancelled', { exact: true }).first()).toBeVisible();
		await expect(history.getByRole('listitem').filter({ hasText: /^Cancelled/ })).toHaveCount(1);
		await expect(history).toContainText('Spare set not in stock this week.');
	});

	test('the filters live in the URL and survive a reload', async ({ page }) => {
		await signInAs(page, 'planner', '/plan');
		await untilHydrated(page);
		await page.getByRole('combobox', { name: 'Action', exact: true }).selectOption('inspect');
		await expect(page).toHaveURL(/[?&]action=inspect\b/);
		await page.getByRole('combobox', { name: 'Status', exact: true }).selectOption('cancelled');
		await expect(page).toHaveURL(/[?&]status=cancelled\b/);
		await page.reload();
		await expect(page.getByRole('combobox', { name: 'Action', exact: true })).toHaveValue(
			'inspect'
		);
		await expect(page.getByRole('combobox', { name: 'Status', exact: true })).toHaveValue(
			'cancelled'
		);
		// Every row shown is a cancelled inspection (or the list says none matches).
		const rows = page.getByRole('region', { name: 'Work orders' }).getByRole('row');
		const count = await rows.count();
		for (let i = 1; i < count; i++) {
			await expect(rows.nth(i)).toContainText('Wear inspection');
			await expect(rows.nth(i)).toContainText('Cancelled');
		}
		if (count === 0)
			await expect(page.getByText('No work order matches these filters.')).toBeVisible();
		await page.getByRole('link', { name: 'Clear' }).click();
		await expect(page).toHaveURL(/\/plan$/);
	});

	test('a bad filter in a shared link is dropped and named', async ({ page }) => {
		await signInAs(page, 'planner', '/plan?action=juggle&from=2026-02-31');
		await expect(page.getByRole('alert')).toContainText('Part of this link was not understood');
		await expect(page.getByRole('alert')).toContainText('action');
		await expect(page.getByRole('alert')).toContainText('from');
	});

	test('a new work order by hand shows the field messages', async ({ page }) => {
		await signInAs(page, 'planner', '/plan/new');
		await untilHydrated(page);
		await page.getByLabel('Action').selectOption('other');
		await page.getByLabel('Quantity').first().fill('0');
		await page.getByLabel('Description').first().fill('Shim');
		await page.getByRole('button', { name: 'Create work order' }).click();
		await expect(page.getByRole('alert')).toContainText('Some fields need attention');
		await expect(page.getByText('fixtureCode is required.')).toBeVisible();
		await expect(page.getByText(/Say what the work is/)).toBeVisible();
		await expect(page.getByText('Quantity must be at least 1.')).toBeVisible();
		// What was typed is kept.
		await expect(page.getByLabel('Description').first()).toHaveValue('Shim');
	});

	test('people who do not plan see no Plan link and may not open /plan', async ({ page }) => {
		await signInAs(page, 'operator', '/fixtures');
		await expect(nav(page, 'Plan')).toHaveCount(0);
		const res = await page.goto('/plan');
		expect(res?.status()).toBe(403);
	});
});
