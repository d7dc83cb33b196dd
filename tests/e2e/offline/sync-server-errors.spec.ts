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
	const withNote: number[] = [];
	let requests = 0;
	await page.route('**/api/sync', async (route) => {
		const events = sentEvents(route.request());
		requests += 1;
		if (events.some((e) => e.kind === 'note')) {
			withNote.push(events.length);
			await route.fulfill({ status: 500, json: { error: 'Internal error.' } });
		} else await route.fallback();
	});

	await context.setOffline(false);
	await page.getByRole('button', { name: 'Sync now' }).click();
	await expect(page.getByText(/Rejected: The server failed on this entry \(500/)).toHaveCount(1, {
		timeout: 20_000
	});
	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(0);
	await expect(page.getByText('1 rejected')).toBeVisible();
	// The note went out in a batch with others, which was halved until the note stood alone
	// (the loop may have sent an entry past its undo window on its own before "Sync now").
	expect(withNote[0]).toBeGreaterThan(1);
	expect(withNote.at(-1)).toBe(1);
	expect(withNote).toEqual([...withNote].sort((a, b) => b - a));
	expect(requests).toBeLessThanOrEqual(10);

	const stored = (await serverEvents(page.request, code)).map((e) => e.id);
	expect(stored).toHaveLength(4);
	expect(logged.filter((id) => !stored.includes(id))).toHaveLength(1);
	expect((await serverEvents(page.request, code)).every((e) => e.kind === 'reseat')).toBe(true);
});

test('a busy server (503 with Retry-After) is left alone as long as it asks, and the batch is not split', async ({
	page
}) => {
	test.setTimeout(90_000);
	const code = await createFixture('Busy-server test plate', { type: 'plate' });
	await signInAs(page, 'operator');
	await page.goto(`/f/${code}`);

	const calls: { at: number; ids: string[] }[] = [];
	await page.route('**/api/sync', async (route) => {
		calls.push({ at: Date.now(), ids: sentEvents(route.request()).map((e) => e.id) });
		if (calls.length === 1) {
			await route.fulfill({
				status: 503,
				headers: { 'retry-after': '8' },
				json: { error: 'The server is busy; try again shortly.' }
			});
		} else await route.fallback();
	});

	// No tap on "Sync now": the loop sends by itself after the undo window, and retries by itself.
	const reseat = page.getByRole('button', { name: 'Reseat', exact: true });
	for (let i = 0; i < 3; i++) await reseat.click();
	const logged = await waitingIds(page);
	await expect.poll(() => calls.length, { timeout: 20_000 }).toBe(1);
	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(3);

	await expect(page.getByText('Waiting to sync', { exact: true })).toHaveCount(0, {
		timeout: 40_000
	});
	// Not before the 8 s the server asked for, and what it refused went again in one request.
	expect(calls[1].at - calls[0].at).toBeGreaterThanOrEqual(8_000);
	expect(calls[1].ids).toEqual(expect.arrayContaining(calls[0].ids));
	expect((await serverEvents(page.request, code)).map((e) => e.id).sort()).toEqual(
		[...logged].sort()
	);
});
