import { expect, test } from '@playwright/test';
import { signInAs } from '../helpers/auth';
import { watchProblems, describeProblems } from '../helpers/page-problems';

// The audit report on the seeded demo (a year of invented history, counted back from the seed).

test.describe.configure({ timeout: 60_000 });

/** A calendar date (UTC) `days` before today. */
const daysAgo = (days: number) =>
	new Date(Date.now() - days * 86_400_000).toISOString().slice(0, 10);

test('a supervisor sees the last 90 days, with the worn transmission-sphere mount’s inspections and photo', async ({
	page,
	context
}) => {
	const problems = await watchProblems(context);
	await signInAs(page, 'supervisor', '/board/report');
	await expect(page).toHaveURL(/\/board\/report$/);
	await expect(page.getByRole('heading', { name: 'Audit report', level: 1 })).toBeVisible();
	// The default range: the last 90 days, today included, filled into the form.
	await expect(page.getByLabel('From', { exact: true })).toHaveValue(daysAgo(89));
	await expect(page.getByLabel('To', { exact: true })).toHaveValue(daysAgo(0));

	const inspections = page.getByRole('region', { name: 'Inspections' });
	const mount = inspections.getByRole('row').filter({ hasText: 'Transmission-sphere mount TS-A' });
	// The demo inspects it about every two months, with a photo of the worn contact each time.
	await expect(mount.first()).toBeVisible();
	const withPhoto = mount.filter({ has: page.getByRole('img', { name: /^Photo 1/ }) });
	await expect(withPhoto.first()).toContainText('Verdict: watch');
	await expect(withPhoto.first()).toContainText(/grade 2 \(Dulled\), fretting/);
	const thumb = withPhoto.first().getByRole('img', { name: /^Photo 1/ });
	await thumb.scrollIntoViewIfNeeded();
	await expect
		.poll(() => thumb.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth))
		.toBeGreaterThan(0);

	// The other sections are there, each with its count.
	for (const name of [
		'Break-in runs',
		'Part swaps',
		'Holds and releases',
		'Flags raised',
		'Flags cleared',
		'Overdue at the end of the range'
	]) {
		await expect(page.getByRole('region', { name })).toBeVisible();
	}
	await expect(page.getByRole('region', { name: 'Overdue at the end of the range' })).toContainText(
		/Inspection due/
	);
	expect(problems, describeProblems(problems)).toEqual([]);
});

test('the range can be changed without JavaScript, and a range that does not hold says why', async ({
	browser
}) => {
	const context = await browser.newContext({ javaScriptEnabled: false });
	const page = await context.newPage();
	await signInAs(page, 'supervisor', '/board/report', { javaScript: false });
	await page.getByLabel('From', { exact: true }).fill(daysAgo(30));
	await page.getByLabel('To', { exact: true }).fill(daysAgo(40));
	await page.getByRole('button', { name: 'Show report' }).click();
	await expect(page).toHaveURL(new RegExp(`from=${daysAgo(30)}&to=${daysAgo(40)}`));
	await expect(page.getByText(/The start date \(.*\) is after the end date/)).toBeVisible();
	await expect(page.getByRole('region', { name: 'Inspections' })).toHaveCount(0);

	await page.getByLabel('From', { exact: true }).fill(daysAgo(40));
	await page.getByLabel('To', { exact: true }).fill(daysAgo(30));
	await page.getByRole('button', { name: 'Show report' }).click();
	await expect(page.getByRole('region', { name: 'Inspections' })).toBeVisible();
	await expect(page.getByText(/\(11 days\)/).first()).toBeVisible();
	await context.close();
});

test('the PDF download answers a PDF named after its range', async ({ page }) => {
	await signInAs(page, 'supervisor', '/board/report');
	const link = page.getByRole('link', { name: 'Download PDF' });
	const href = await link.getAttribute('href');
	expect(href).toBe(`/board/report.pdf?from=${daysAgo(89)}&to=${daysAgo(0)}`);
	const res = await page.request.get(href!);
	expect(res.status()).toBe(200);
	expect(res.headers()['content-type']).toBe('application/pdf');
	expect(res.headers()['content-disposition']).toBe(
		`attachment; filename="nestmark-audit-${daysAgo(89)}-${daysAgo(0)}.pdf"`
	);
	const body = await res.body();
	expect(body.subarray(0, 5).toString('latin1')).toBe('%PDF-');

	const bad = await page.request.get('/board/report.pdf?from=2026-02-30');
	expect(bad.status()).toBe(400);
	expect(await bad.text()).toMatch(/YYYY-MM-DD/);
});

test('printed, the report has no site header and carries its range on every page', async ({
	page
}) => {
	await signInAs(page, 'supervisor', '/board/report');
	const running = page.getByText(
		new RegExp(`^Audit report · ${daysAgo(89)} to ${daysAgo(0)} · All areas · Generated `)
	);
	await expect(page.getByRole('navigation', { name: 'Main' })).toBeVisible();
	await expect(running).toBeHidden();

	await page.emulateMedia({ media: 'print' });
	await expect(page.getByRole('navigation', { name: 'Main' })).toBeHidden();
	await expect(page.getByRole('link', { name: 'Sign out' })).toBeHidden();
	await expect(page.getByRole('button', { name: 'Print' })).toBeHidden();
	await expect(running).toBeVisible();
	// Fixed in print, so Chromium repeats it at the top of every printed page.
	expect(await running.evaluate((el) => getComputedStyle(el).position)).toBe('fixed');
	// Each section starts a new printed page.
	const section = page.getByRole('region', { name: 'Flags cleared' });
	expect(await section.evaluate((el) => getComputedStyle(el).breakBefore)).toBe('page');
	await page.emulateMedia({ media: 'screen' });
});

test('an operator gets the 403 page for the report and its PDF', async ({ page }) => {
	await signInAs(page, 'operator');
	const res = await page.goto('/board/report');
	expect(res?.status()).toBe(403);
	await expect(page.getByRole('heading', { name: 'Not part of your role' })).toBeVisible();
	const pdf = await page.request.get('/board/report.pdf');
	expect(pdf.status()).toBe(403);
});
