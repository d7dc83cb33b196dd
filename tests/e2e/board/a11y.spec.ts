import AxeBuilder from '@axe-core/playwright';
import { expect, test, type Page } from '@playwright/test';
import { signInAs, untilHydrated } from '../helpers/auth';

/** axe-core's findings of serious or critical impact on the page as it is now. */
async function seriousViolations(page: Page) {
	const results = await new AxeBuilder({ page }).analyze();
	// It looked at the page: rules passed as well.
	expect(results.passes.length).toBeGreaterThan(0);
	return results.violations
		.filter((v) => v.impact === 'serious' || v.impact === 'critical')
		.map((v) => ({
			id: v.id,
			impact: v.impact,
			help: v.help,
			nodes: v.nodes.slice(0, 5).map((n) => `${n.target.join(' ')} ${n.html.slice(0, 120)}`)
		}));
}

test.describe('accessibility (axe-core: no serious or critical findings)', () => {
	test('the fleet board', async ({ page }) => {
		await signInAs(page, 'supervisor', '/board');
		await expect(page.getByRole('heading', { name: 'Needs attention' })).toBeVisible();
		expect(await seriousViolations(page)).toEqual([]);
	});

	test('the fleet board narrowed to one kind', async ({ page }) => {
		await signInAs(page, 'supervisor', '/board?kind=drift');
		await expect(page.getByRole('heading', { name: 'Needs attention' })).toBeVisible();
		expect(await seriousViolations(page)).toEqual([]);
	});

	test('a fixture page of the demo (the drifting pallet)', async ({ page }) => {
		// Opened as a supervisor would: from its row on the board.
		await signInAs(page, 'supervisor', '/board?kind=drift');
		await page
			.getByRole('region', { name: 'Needs attention' })
			.getByRole('row')
			.filter({ hasText: 'DT-2 kinematic pallet B' })
			.getByRole('link')
			.first()
			.click();
		await expect(page.getByRole('heading', { name: 'DT-2 kinematic pallet B' })).toBeVisible();
		expect(await seriousViolations(page)).toEqual([]);
	});

	test('the planner’s list', async ({ page }) => {
		await signInAs(page, 'planner', '/plan');
		await expect(
			page.getByRole('heading', { name: 'Open flags with no work order yet' })
		).toBeVisible();
		expect(await seriousViolations(page)).toEqual([]);
	});

	test('a new work order, with its field messages showing', async ({ page }) => {
		await signInAs(page, 'planner', '/plan/new');
		await untilHydrated(page);
		await page.getByRole('button', { name: 'Create work order' }).click();
		await expect(page.getByRole('alert')).toBeVisible();
		expect(await seriousViolations(page)).toEqual([]);
	});

	test('the planner’s calendar, month and week, with an order picked up', async ({ page }) => {
		await signInAs(page, 'planner', '/plan/calendar');
		await expect(page.getByRole('heading', { name: 'Calendar', level: 1 })).toBeVisible();
		expect(await seriousViolations(page)).toEqual([]);
		await page.goto('/plan/calendar?view=week');
		await untilHydrated(page);
		await expect(page.getByRole('heading', { name: 'Not on the calendar yet' })).toBeVisible();
		// The demo's inspection under way is due today: pick it up, so the target shows too.
		await page
			.getByRole('list', { name: /^Days of / })
			.getByRole('button')
			.first()
			.focus();
		await page.keyboard.press('Enter');
		await expect(page.getByRole('status', { name: 'Moves' })).toContainText('Picked up');
		expect(await seriousViolations(page)).toEqual([]);
	});

	test('the office settings, with their field messages showing', async ({ page }) => {
		await signInAs(page, 'admin', '/admin/office');
		await untilHydrated(page);
		await page.getByLabel('Time zone (IANA name)').fill('Nowhere/Nothing');
		await page.getByRole('button', { name: 'Save office settings' }).click();
		await expect(page.getByRole('alert')).toBeVisible();
		expect(await seriousViolations(page)).toEqual([]);
	});

	test('the technician’s due work', async ({ page }) => {
		await signInAs(page, 'technician', '/work');
		await expect(page.getByRole('heading', { name: 'My work' })).toBeVisible();
		expect(await seriousViolations(page)).toEqual([]);
	});
});
