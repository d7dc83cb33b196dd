import { expect, test } from '@playwright/test';
import { demoAccount, signInAs, untilHydrated } from '../helpers/auth';
import { cacheForOffline } from '../offline/support';

// The whole round of a work order, as the demo's people would do it: the planner plans the worn
// mount's "replace now" flag from the board and assigns the technician; the technician, offline,
// completes it with a part swap; once the phone syncs, the planner sees it done and the fixture
// waiting for its break-in. Runs after tests/e2e/plan (which expects the flag still unplanned):
// the part swap clears that flag.
const WORN = 'Transmission-sphere mount TS-A';

test('planned from the board, done offline on the phone, seen done by the planner', async ({
	browser
}) => {
	// Installing the service worker (about 1 MB of precache) is slow on a busy machine.
	test.setTimeout(240_000);
	const plannerContext = await browser.newContext();
	const phoneContext = await browser.newContext();
	try {
		const planner = await plannerContext.newPage();
		await signInAs(planner, 'planner', '/board');
		await planner
			.getByRole('region', { name: 'Needs attention' })
			.getByRole('row')
			.filter({ hasText: WORN })
			.getByRole('link', { name: /^Plan .*Replace now/ })
			.click();
		await expect(planner).toHaveURL(/\/plan\/new\?flag=\d+$/);
		await untilHydrated(planner);
		const code = await planner.getByLabel('Fixture code').inputValue();
		expect(code).toMatch(/^NM-[A-Z0-9]{5}$/);
		await planner.getByLabel('Assignee').selectOption(demoAccount('technician').email);
		await planner.getByRole('button', { name: 'Create work order' }).click();
		await expect(planner).toHaveURL(/\/plan\/\d+\?created=1$/);
		const id = Number(/\/plan\/(\d+)/.exec(planner.url())![1]);

		// The technician's phone: the order is in My work, and stays there offline.
		const phone = await phoneContext.newPage();
		await signInAs(phone, 'technician');
		await expect(phone).toHaveURL(/\/work$/);
		const item = phone.getByRole('listitem', {
			name: `Work order #${id}: replace balls on ${code}`
		});
		await expect(item).toBeVisible();
		await cacheForOffline(phone);
		await phoneContext.setOffline(true);
		await phone.reload();
		await item.getByRole('link', { name: 'Complete' }).click();
		await expect(phone).toHaveURL(new RegExp(`/f/${code}\\?wo=${id}&do=part-swap`));
		await expect(phone.getByLabel('Balls', { exact: true })).toBeChecked();
		await phone.getByRole('button', { name: 'Log part swap' }).click();
		await expect(phone.getByText(`Work order #${id} is done on this phone`)).toBeVisible();
		await phone.getByRole('link', { name: 'Back to My work' }).click();
		await expect(item.getByText('Done, waiting to sync')).toBeVisible();

		// Online again: the phone syncs and the order leaves its list.
		await phoneContext.setOffline(false);
		await expect(item).toHaveCount(0, { timeout: 60_000 });

		// The planner's list of done orders has it; the fixture now waits for its break-in.
		await planner.goto('/plan?status=done');
		const row = planner
			.getByRole('region', { name: 'Work orders' })
			.getByRole('row')
			.filter({ hasText: code });
		await expect(row).toHaveCount(1);
		await expect(row).toContainText('Done');
		await planner.goto(`/plan/${id}`);
		const history = planner.getByRole('list', { name: 'History of this work order' });
		await expect(history.getByRole('listitem').filter({ hasText: /^Marked done/ })).toHaveCount(1);
		await planner.goto(`/fixtures/${code}`);
		await expect(planner.getByText('Break-in due').first()).toBeVisible();
	} finally {
		await plannerContext.close();
		await phoneContext.close();
	}
});
