import { expect, test, type Page } from '@playwright/test';
import mysql from 'mysql2/promise';
import { calendarGrid, weekStart } from '../../../src/lib/domain/calendar';
import { addDays } from '../../../src/lib/domain/work-orders';
import { dayLong } from '../../../src/routes/(app)/plan/calendar/day-words';
import { demoAccount, signInAs, untilHydrated } from '../helpers/auth';

// The planner's calendar on the demo: orders are made for the demo technician (Tomas Okafor) on
// demo fixtures that have no order yet, so the demo's own orders stay as other specs expect them.

const today = () => new Date().toISOString().slice(0, 10);
let taken = 0;

/**
 * A healthy demo fixture (in service, no open flag, no work order), a different one on every
 * call, so no other spec's flags or orders see the orders made here.
 */
async function freeFixture(): Promise<string> {
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		const [rows] = await conn.query<mysql.RowDataPacket[]>(
			`SELECT code FROM fixtures WHERE status = 'in-service'
			   AND id NOT IN (SELECT fixture_id FROM work_orders)
			   AND id NOT IN (SELECT fixture_id FROM flags WHERE cleared_at IS NULL)
			 ORDER BY id LIMIT 1 OFFSET ?`,
			[taken++]
		);
		if (!rows.length) throw new Error('no demo fixture without a work order left');
		return rows[0].code as string;
	} finally {
		await conn.end();
	}
}

/** A cleaning order for the demo technician through the API (the planner's session). */
async function createOrder(page: Page, dueOn: string, code?: string) {
	const fixtureCode = code ?? (await freeFixture());
	const res = await page.request.post('/api/work-orders', {
		data: {
			fixtureCode,
			action: 'clean',
			dueOn,
			assigneeEmail: demoAccount('technician').email
		}
	});
	expect(res.status()).toBe(201);
	const { id } = (await res.json()) as { id: number };
	return { id, code: fixtureCode };
}

/** The day of the calendar, named by its heading ("Monday 7 December 2026"). */
const day = (page: Page, date: string) =>
	page.getByRole('list', { name: /^Days of / }).getByRole('listitem', { name: dayLong(date) });

const chip = (page: Page, code: string) => page.getByRole('button', { name: new RegExp(code) });

/** The order's own item in a day's list of orders (its details and date field). */
const chipItem = (page: Page, date: string, code: string) =>
	day(page, date)
		.getByRole('list', { name: /^Work orders due/ })
		.getByRole('listitem')
		.filter({ has: chip(page, code) });

async function expectMoved(page: Page, id: number, to: string) {
	await page.goto(`/plan/${id}`);
	await expect(page.getByText(to, { exact: true }).first()).toBeVisible();
	const history = page.getByRole('list', { name: 'History of this work order' });
	const changed = history
		.getByRole('listitem')
		.filter({ hasText: /^Changed/ })
		.last();
	await expect(changed).toContainText('Due');
	await expect(changed).toContainText(to);
}

test.describe('the planner’s calendar', () => {
	test('the planner drags an order to a day next week', async ({ page }) => {
		await signInAs(page, 'planner', '/plan');
		// Wednesday next week; the order starts a week earlier, or on the first day shown.
		const target = addDays(weekStart(today()), 9);
		const grid = calendarGrid('month', target);
		const from = addDays(target, -7) < grid.from ? grid.from : addDays(target, -7);
		const o = await createOrder(page, from);

		await page.getByRole('link', { name: 'Calendar', exact: true }).first().click();
		await expect(page.getByRole('heading', { name: 'Calendar', level: 1 })).toBeVisible();
		// Tall enough that both days are in view: scrolling in the middle of a native drag can
		// drop it.
		await page.setViewportSize({ width: 1280, height: 1800 });
		await page.goto(`/plan/calendar?date=${target}`);
		await untilHydrated(page);
		await expect(day(page, from).getByRole('button', { name: new RegExp(o.code) })).toBeVisible();
		await chip(page, o.code).dragTo(day(page, target));
		await expect(day(page, target).getByRole('button', { name: new RegExp(o.code) })).toBeVisible();
		await expect(page.getByRole('status').filter({ hasText: `#${o.id} moved` })).toBeVisible();
		await expectMoved(page, o.id, target);
	});

	test('keyboard: pick up with Enter, arrows move the target, Enter drops, Escape cancels', async ({
		page
	}) => {
		await signInAs(page, 'planner', '/plan');
		const start = addDays(weekStart(today()), 14); // Monday in two weeks
		const o = await createOrder(page, addDays(start, 1)); // Tuesday
		await page.goto(`/plan/calendar?view=week&date=${start}`);
		await untilHydrated(page);
		const live = page.getByRole('status', { name: 'Moves' });

		await chip(page, o.code).focus();
		await page.keyboard.press('Enter');
		await expect(chip(page, o.code)).toHaveAttribute('aria-pressed', 'true');
		await expect(live).toContainText(`Picked up Clean ${o.code}`);
		await page.keyboard.press('ArrowRight');
		await expect(live).toContainText(`Target: ${dayLong(addDays(start, 2))}`);
		await page.keyboard.press('Escape');
		await expect(live).toContainText('put back; nothing moved');
		await expect(chip(page, o.code)).toHaveAttribute('aria-pressed', 'false');

		// Space picks up too; right twice, then a week up is refused (not shown), left once.
		await page.keyboard.press(' ');
		await page.keyboard.press('ArrowRight');
		await page.keyboard.press('ArrowRight');
		await page.keyboard.press('ArrowUp');
		await expect(live).toContainText('the edge of what is shown');
		await page.keyboard.press('ArrowLeft');
		const to = addDays(start, 2); // Wednesday
		await expect(live).toContainText(`Target: ${dayLong(to)}`);
		await expect(day(page, to)).toContainText('Move here');
		await page.keyboard.press('Enter');
		await expect(day(page, to).getByRole('button', { name: new RegExp(o.code) })).toBeVisible();
		await expect(live).toContainText(`Moved Clean ${o.code} to ${dayLong(to)}`);
		await expect(chip(page, o.code)).toBeFocused();
		await expectMoved(page, o.id, to);
	});

	test('the date field moves an order without JavaScript; a stale or finished one says why', async ({
		browser
	}) => {
		const context = await browser.newContext({ javaScriptEnabled: false });
		const page = await context.newPage();
		await signInAs(page, 'planner', '/plan', { javaScript: false });
		const start = addDays(weekStart(today()), 21);
		const o = await createOrder(page, start);
		await page.goto(`/plan/calendar?view=week&date=${start}`);
		const item = chipItem(page, start, o.code);
		await item.getByText('Details').click();
		const to = addDays(start, 4);
		await item.getByLabel('New due date').fill(to);
		await item.getByRole('button', { name: 'Move' }).click();
		await expect(page.getByRole('status').filter({ hasText: `#${o.id} moved` })).toBeVisible();
		await expect(day(page, to).getByRole('button', { name: new RegExp(o.code) })).toBeVisible();

		// A second tab opened now shows the order on `to`; the first then moves it again.
		const stale = await context.newPage();
		await stale.goto(`/plan/calendar?view=week&date=${start}`);
		const later = addDays(start, 5);
		await page.reload();
		const again = chipItem(page, to, o.code);
		await again.getByText('Details').click();
		await again.getByLabel('New due date').fill(later);
		await again.getByRole('button', { name: 'Move' }).click();
		await expect(day(page, later).getByRole('button', { name: new RegExp(o.code) })).toBeVisible();

		// The stale tab's move is refused with the service's reason, and nothing moves.
		const old = chipItem(stale, to, o.code);
		await old.getByText('Details').click();
		await old.getByLabel('New due date').fill(addDays(start, 6));
		await old.getByRole('button', { name: 'Move' }).click();
		await expect(stale.getByRole('alert').filter({ hasText: 'changed meanwhile' })).toContainText(
			`now due on ${later}`
		);
		await context.close();
		await expectMovedInFreshPage(browser, o.id, later);
	});

	test('done and cancelled orders are shown but say why they cannot move', async ({ page }) => {
		await signInAs(page, 'planner', '/plan');
		const date = addDays(weekStart(today()), 28);
		const o = await createOrder(page, date);
		const res = await page.request.patch(`/api/work-orders/${o.id}`, {
			data: { status: 'cancelled', cancelReason: 'Not needed after all.' }
		});
		expect(res.status()).toBe(200);
		await page.goto(`/plan/calendar?view=week&date=${date}`);
		await untilHydrated(page);
		const item = chipItem(page, date, o.code);
		await expect(item).toContainText('Cancelled');
		await chip(page, o.code).focus();
		await page.keyboard.press('Enter');
		await expect(page.getByRole('status', { name: 'Moves' })).toContainText(
			'cannot move. Cancelled: a cancelled work order keeps its date.'
		);
		await item.getByText('Details').click();
		await expect(item.getByLabel('New due date')).toHaveCount(0);
	});

	test('the admin sets capacity 2; a day with 3 orders is marked over capacity', async ({
		page,
		browser
	}) => {
		const date = addDays(weekStart(today()), 30); // a Wednesday five weeks on
		await signInAs(page, 'admin', '/admin/office');
		await untilHydrated(page);
		await page.getByLabel('Work orders per technician per day').fill('2');
		await page.getByRole('button', { name: 'Save office settings' }).click();
		await expect(page.getByRole('status').filter({ hasText: 'saved' })).toContainText(
			'Office settings saved.'
		);

		const planner = await (await browser.newContext()).newPage();
		await signInAs(planner, 'planner', '/plan');
		for (let i = 0; i < 3; i++) await createOrder(planner, date);
		await planner.goto(`/plan/calendar?view=week&date=${date}`);
		const load = day(planner, date).getByRole('list', { name: `Load on ${dayLong(date)}` });
		await expect(load).toContainText('Tomas Okafor');
		await expect(load).toContainText('3 / 2');
		await expect(load).toContainText('over capacity');
		// The day before has no load line at all.
		await expect(
			day(planner, addDays(date, -1)).getByRole('list', { name: /^Load on/ })
		).toHaveCount(0);

		// Back to the default, so other specs see the demo as it was.
		await page.getByLabel('Work orders per technician per day').fill('4');
		await page.getByRole('button', { name: 'Save office settings' }).click();
		await expect(page.getByRole('status').filter({ hasText: 'saved' })).toContainText(
			'Office settings saved.'
		);
		await planner.reload();
		await expect(day(planner, date).getByRole('list', { name: /^Load on/ })).toContainText('3 / 4');
		await expect(day(planner, date).getByRole('list', { name: /^Load on/ })).not.toContainText(
			'over capacity'
		);
	});

	test('office settings refuse an unknown time zone with a field message', async ({ page }) => {
		// Capacity out of 1–50 is stopped by the browser (min/max) and by the schema (unit tests).
		await signInAs(page, 'admin', '/admin/office');
		await untilHydrated(page);
		await expect(page.getByText(/Leave it empty to use the first site's zone, now /)).toBeVisible();
		await page.getByLabel('Time zone (IANA name)').fill('Mars/Olympus_Mons');
		await page.getByRole('button', { name: 'Save office settings' }).click();
		await expect(page.getByRole('alert')).toContainText('Nothing was saved');
		await expect(page.getByText(/"Mars\/Olympus_Mons" is not a time zone/)).toBeVisible();
		await expect(page.getByLabel('Time zone (IANA name)')).toHaveValue('Mars/Olympus_Mons');
	});

	test('the week view stacks its days at 390 px', async ({ page }) => {
		await page.setViewportSize({ width: 390, height: 844 });
		await signInAs(page, 'planner', '/plan/calendar?view=week');
		const days = page
			.getByRole('list', { name: /^Days of / })
			.getByRole('listitem')
			.filter({
				has: page.getByRole('heading', { level: 3 })
			});
		await expect(days).toHaveCount(7);
		const first = await days.nth(0).boundingBox();
		const second = await days.nth(1).boundingBox();
		expect(second!.y).toBeGreaterThan(first!.y + first!.height - 1);
		const width = await page.evaluate(() => document.documentElement.scrollWidth);
		expect(width).toBeLessThanOrEqual(390);
	});

	test('technicians and operators may not open the calendar or the office settings', async ({
		page
	}) => {
		await signInAs(page, 'technician', '/work');
		expect((await page.goto('/plan/calendar'))?.status()).toBe(403);
		expect((await page.goto('/admin/office'))?.status()).toBe(403);
	});
});

/** Opens the order in a fresh signed-in page and checks its due date and last history row. */
async function expectMovedInFreshPage(
	browser: import('@playwright/test').Browser,
	id: number,
	to: string
) {
	const context = await browser.newContext();
	const page = await context.newPage();
	await signInAs(page, 'planner', '/plan');
	await expectMoved(page, id, to);
	await context.close();
}
