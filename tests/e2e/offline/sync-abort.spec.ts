import { expect, test } from '@playwright/test';
import { signInAs } from '../helpers/auth';
import { createFixture, serverEvents, waitingIds } from './support';

// The route handler below must see the page's own requests, not a service worker's.
test.use({ serviceWorkers: 'block' });

test('a sync the network cut after the server stored it is retried without doubling anything', async ({
	page
}) => {
	// Room for one back-off delay of the sync loop on a busy machine.
	test.setTimeout(90_000);
	const waiting = page.getByText('Waiting to sync', { exact: true });
	const code = await createFixture('Abort test probe mount', { type: 'trihedral-vee-flat' });
	await signInAs(page, 'operator');
	await page.goto(`/f/${code}`);

	const answers: { status: string }[][] = [];
	let calls = 0;
	await page.route('**/api/sync', async (route) => {
		calls += 1;
		// The request reaches the server and is answered; the phone never sees the answer.
		const response = await route.fetch();
		answers.push(((await response.json()) as { results: { status: string }[] }).results);
		if (calls === 1) await route.abort('connectionreset');
		else await route.fulfill({ response });
	});

	const reseat = page.getByRole('button', { name: 'Reseat', exact: true });
	await reseat.click();
	await expect(waiting).toHaveCount(1);
	await reseat.click();
	await expect(waiting).toHaveCount(2);
	const logged = await waitingIds(page);

	await page.getByRole('button', { name: 'Sync now' }).click();
	await expect.poll(() => answers.length).toBeGreaterThanOrEqual(1);
	expect(answers[0].map((a) => a.status)).toEqual(['accepted', 'accepted']);
	// The entries stay: the device cannot know the server has them.
	await expect(waiting).toHaveCount(2);

	await page.getByRole('button', { name: 'Sync now' }).click();
	await expect(waiting).toHaveCount(0, { timeout: 20_000 });
	expect(answers).toHaveLength(2);
	expect(answers[1].map((a) => a.status)).toEqual(['duplicate', 'duplicate']);

	const events = await serverEvents(page.request, code);
	expect(events.map((e) => e.id).sort()).toEqual([...logged].sort());
});
