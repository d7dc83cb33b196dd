import { expect, test } from '@playwright/test';
import { demoAccount, signInAs, submitPassword } from '../helpers/auth';
import { createFixture, freeCode, serverEvents, setFixtureCode, waitingIds } from './support';

// These flows are about the outbox and the session, not the service worker.
test.use({ serviceWorkers: 'block' });

test('an expired session keeps the outbox; the entries go out under whoever signs in next', async ({
	page,
	context
}) => {
	test.setTimeout(90_000);
	const code = await createFixture('Session test pallet', { type: 'pallet' });
	await signInAs(page, 'operator');
	await page.goto(`/f/${code}`);
	const waiting = page.getByText('Waiting to sync', { exact: true });

	await context.setOffline(true);
	await page.getByRole('button', { name: 'Reseat', exact: true }).click();
	await page.getByRole('button', { name: 'Reseat', exact: true }).click();
	await expect(waiting).toHaveCount(2);
	const logged = await waitingIds(page);

	// The session is gone when the network comes back; the loop finds out on its own.
	await context.clearCookies();
	await context.setOffline(false);
	const status = page.getByRole('status').filter({ hasText: 'Signed out · 2 waiting' });
	await expect(status).toBeVisible({ timeout: 20_000 });
	await expect(waiting).toHaveCount(2);

	await page.getByRole('link', { name: 'Sign in', exact: true }).click();
	await page.waitForURL(/\/signin/);
	const technician = demoAccount('technician');
	await submitPassword(page, technician.email, technician.password);
	await page.waitForURL(`**/f/${code}`);
	await expect(waiting).toHaveCount(0, { timeout: 30_000 });

	// "Waiting" also goes while an entry is being sent (or before the card has drawn its list), so
	// the server is asked until both entries are there, rather than once.
	await expect
		.poll(async () => (await serverEvents(page.request, code)).map((e) => e.id).sort(), {
			timeout: 30_000
		})
		.toEqual([...logged].sort());
	const events = await serverEvents(page.request, code);
	expect(events.every((e) => (e.user as { email?: string }).email === technician.email)).toBe(true);
});

test('rejected entries stay with the reason until they are fixed or discarded', async ({
	page,
	context
}) => {
	test.setTimeout(90_000);
	const code = await createFixture('Rejection test plate', { type: 'plate' });
	await signInAs(page, 'operator');
	await page.goto(`/f/${code}`);

	await context.setOffline(true);
	await page.getByRole('button', { name: 'Reseat', exact: true }).click();
	await page.getByRole('button', { name: 'Note' }).click();
	await page.getByLabel('Note').fill('Chip under ball 2');
	await page.getByRole('button', { name: 'Log note' }).click();
	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(2);

	// Meanwhile the fixture was relabelled: the server no longer knows the code on these entries.
	const relabelled = await freeCode();
	await setFixtureCode(code, relabelled);
	await context.setOffline(false);
	await page.getByRole('button', { name: 'Sync now' }).click();
	await expect(page.getByText(`Rejected: No fixture with code ${code}`)).toHaveCount(2);
	await expect(page.getByText('2 rejected')).toBeVisible();

	await page.goto('/outbox');
	await expect(page.getByRole('heading', { name: 'Rejected (2)' })).toBeVisible();
	// The label is put back, so a corrected entry can go through.
	await setFixtureCode(relabelled, code);

	const note = page.getByRole('listitem', { name: `Note for ${code}` });
	await expect(
		note.getByText(`Rejected by the server: No fixture with code ${code}`)
	).toBeVisible();
	await note.getByRole('button', { name: 'Fix' }).click();
	await note.getByLabel('Note').fill('Chip under ball 2, wiped off');
	await note.getByRole('button', { name: 'Save and send again' }).click();
	await expect(note).toHaveCount(0, { timeout: 20_000 });

	const reseat = page.getByRole('listitem', { name: `Reseat for ${code}` });
	await reseat.getByRole('button', { name: 'Discard' }).click();
	await reseat.getByRole('button', { name: 'Yes, discard' }).click();
	await expect(page.getByText('Nothing waiting')).toBeVisible();

	const events = await serverEvents(page.request, code);
	expect(events).toHaveLength(1);
	expect(events[0]).toMatchObject({
		kind: 'note',
		payload: { text: 'Chip under ball 2, wiped off' }
	});
});
