import { expect, test } from '@playwright/test';
import { signInAs } from '../helpers/auth';
import { createFixture, serverEvents } from './support';

test.use({ serviceWorkers: 'block' });

test('an operator gets reseat, cleaning and note; a technician also the bench work', async ({
	page
}) => {
	// Two sign-ins and a sync: room for a busy machine.
	test.setTimeout(90_000);
	const code = await createFixture('Role test three-vee pallet');
	const actions = page.getByRole('group', { name: 'Log something else' });

	await signInAs(page, 'operator');
	await page.goto(`/f/${code}`);
	await expect(page.getByRole('button', { name: 'Reseat', exact: true })).toBeVisible();
	await expect(actions.getByRole('button')).toHaveText(['Cleaning', 'Note']);

	// Leave the card first: its sync loop's request in flight could otherwise bring the operator's
	// refreshed session cookie back after the clear.
	await page.goto('about:blank');
	await page.context().clearCookies();
	await signInAs(page, 'technician');
	await page.goto(`/f/${code}`);
	await expect(actions.getByRole('button')).toHaveText([
		'Cleaning',
		'Note',
		'Inspection',
		'Break-in run',
		'Part swap',
		'Hold'
	]);

	await actions.getByRole('button', { name: 'Hold' }).click();
	await page.getByRole('button', { name: 'Put on hold' }).click();
	await expect(page.getByText('Say why it is held.')).toBeVisible();
	await page.getByLabel('Reason').fill('Dent on ball 3 seen at reseat');
	await page.getByRole('button', { name: 'Put on hold' }).click();
	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(1);

	await page.getByRole('button', { name: 'Sync now' }).click();
	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(0);
	const events = await serverEvents(page.request, code);
	expect(events).toHaveLength(1);
	expect(events[0]).toMatchObject({
		kind: 'hold',
		payload: { reason: 'Dent on ball 3 seen at reseat' }
	});
});
