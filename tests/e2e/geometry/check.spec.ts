import { expect, test, type Page } from '@playwright/test';
import { signInAs, signOut } from '../helpers/auth';

// Runs against the seeded demo register (scripts/seed.ts): "DT-1 kinematic pallet A" is a
// three-vee coupling with no saved geometry, so the form starts from the defaults (balls on a
// 50 mm circle, 45° contact angle, radial grooves).

async function openGeometry(page: Page): Promise<string> {
	await signInAs(page, 'supervisor', '/fixtures?q=DT-1%20kinematic%20pallet%20A');
	await page
		.getByRole('row', { name: /DT-1 kinematic pallet A/ })
		.getByRole('link')
		.first()
		.click();
	await page.getByRole('link', { name: 'Geometry check' }).click();
	await expect(page.getByRole('heading', { level: 1, name: 'Geometry check' })).toBeVisible();
	return new URL(page.url()).pathname;
}

test.describe('coupling geometry check', () => {
	// Each test signs in, walks register → fixture → geometry and runs the analysis: slow on a
	// loaded shared machine, so it gets more than the default 30 s.
	test.describe.configure({ timeout: 120_000 });

	test('a supervisor omits a ball and sees two freedoms in words and in the diagram', async ({
		page
	}) => {
		await openGeometry(page);
		// The whole coupling first: exactly constrained, nothing drawn as free.
		await expect(page.getByText('Exactly constrained')).toBeVisible();
		await expect(page.getByText('0 degrees of freedom')).toBeVisible();

		await page.getByLabel('Omit a ball (what-if)').selectOption({ label: 'Ball 1 (at 90°)' });
		await page.getByRole('button', { name: 'Check', exact: true }).click();

		await expect(page.getByText('2 degrees of freedom')).toBeVisible();
		await expect(page.getByText('0 redundant constraints')).toBeVisible();
		await expect(page.getByText(/Under-constrained/)).toBeVisible();
		// REFERENCES §B worked case: the line through the two remaining balls, and a vertical axis
		// where the lines across the two grooves meet.
		const freeList = page.getByRole('listitem').filter({ hasText: /^A\d: rotation about/ });
		await expect(freeList).toHaveCount(2);
		await expect(
			freeList.filter({ hasText: 'a horizontal axis through (0.0, -25.0, 0.0) mm' })
		).toHaveCount(1);
		await expect(
			freeList.filter({ hasText: 'a vertical axis through (0.0, -100.0, 0.0) mm' })
		).toHaveCount(1);

		for (const view of ['Top view', 'Side view']) {
			const drawing = page.getByRole('group', { name: view });
			await expect(drawing.getByRole('img', { name: /^Freedom axis \d: rotation/ })).toHaveCount(2);
			await expect(drawing.getByRole('img', { name: /^Ball \d at/ })).toHaveCount(2);
			await expect(drawing.getByRole('img', { name: /^Constraint line:/ })).toHaveCount(4);
		}
		await expect(page.getByText('Screening check only.')).toBeVisible();
		// Nothing was saved by checking.
		await expect(page.getByText('No geometry saved yet.')).toBeVisible();
	});

	test('a field error is shown beside its field', async ({ page }) => {
		await openGeometry(page);
		await page.getByLabel('Contact angle (°)').fill('95');
		await page.getByRole('button', { name: 'Check', exact: true }).click();
		await expect(page.getByText('Contact angle must be less than 90°.')).toBeVisible();
		await expect(page.getByLabel('Contact angle (°)')).toHaveAttribute('aria-invalid', 'true');
	});

	test('an operator is refused the page', async ({ page }) => {
		const path = await openGeometry(page);
		await signOut(page);
		await signInAs(page, 'operator');
		const response = await page.goto(path);
		expect(response?.status()).toBe(403);
	});
});
