import { expect, test, type Request } from '@playwright/test';
import { signInAs } from '../helpers/auth';
import { createFixture, serverEvents, waitingIds } from './support';

// The route handlers below must see the page's own requests, not a service worker's.
test.use({ serviceWorkers: 'block' });

/** The events of a sync request the page sent. */
const sentEvents = (request: Request) =>
	(request.postDataJSON() as { events: { id: string; kind: string }[] }).events;

test('an entry the server fails on (500) is set aside alone; the rest of the outbox syncs', async ({
	page,
	context
}) => {
	test.setTimeout(90_000);
	const code = await createFixture('Server-error test mount', { type: 'three-vee' });
	await signInAs(page, 'operator');
	await page.goto(`/f/${code}`);

	await context.setOffline(true);
	const reseat = page.getByRole('button', { name: 'Reseat', exact: true });
	for (let i = 0; i < 4; i++) await reseat.click();
	await page.getByRole('button', { name: 'Note' }).click();
	await page.getByLabel('Note').fill('Seat 3 shows fretting');
	await page.getByRole('button', { name: 'Log note' }).click();
	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(5);
	const logged = await waitingIds(page);

	// The server fails on every request that carries the note, as it would on a value it chokes on.
	const sizes: number[] = [];
	await page.route('**/api/sync', async (route) => {
		const events = sentEvents(route.request());
		sizes.push(events.length);
		if (events.some((e) => e.kind === 'note')) {
			await route.fulfill({ status: 500, json: { error: 'Internal error.' } });
		} else await route.fallback();
	});

	await context.setOffline(false);
	await page.getByRole('button', { name: 'Sync now' }).click();
	await expect(page.getByText(/^Rejected: The server failed on this entry \(500/)).toHaveCount(1, {
		timeout: 20_000
	});
	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(0);
	await expect(page.getByText('1 rejected')).toBeVisible();
	// The batch of 5 was halved until the note stood alone: 5 → 3 + 2, 3 → 2 + 1, …
	expect(sizes[0]).toBe(5);
	expect(sizes.length).toBeLessThanOrEqual(9);

	const stored = (await serverEvents(page.request, code)).map((e) => e.id);
	expect(stored).toHaveLength(4);
	expect(logged.filter((id) => !stored.includes(id))).toHaveLength(1);
	expect((await serverEvents(page.request, code)).every((e) => e.kind === 'reseat')).toBe(true);
});

test('a busy server (503 with Retry-After) is left alone as long as it asks, and the batch is not split', async ({
	page,
	context
}) => {
	test.setTimeout(90_000);
	const code = await createFixture('Busy-server test plate', { type: 'plate' });
	await signInAs(page, 'operator');
	await page.goto(`/f/${code}`);

	await context.setOffline(true);
	const reseat = page.getByRole('button', { name: 'Reseat', exact: true });
	for (let i = 0; i < 3; i++) await reseat.click();
	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(3);
	const logged = await waitingIds(page);

	const calls: { at: number; size: number }[] = [];
	await page.route('**/api/sync', async (route) => {
		calls.push({ at: Date.now(), size: sentEvents(route.request()).length });
		if (calls.length === 1) {
			await route.fulfill({
				status: 503,
				headers: { 'retry-after': '8' },
				json: { error: 'The server is busy; try again shortly.' }
			});
		} else await route.fallback();
	});

	await context.setOffline(false);
	await page.getByRole('button', { name: 'Sync now' }).click();
	await expect.poll(() => calls.length).toBe(1);
	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(3);

	// No tap: the loop comes back by itself, not before the 8 s the server asked for.
	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(0, {
		timeout: 30_000
	});
	expect(calls.map((c) => c.size)).toEqual([3, 3]);
	expect(calls[1].at - calls[0].at).toBeGreaterThanOrEqual(8_000);
	expect((await serverEvents(page.request, code)).map((e) => e.id).sort()).toEqual(
		[...logged].sort()
	);
});
