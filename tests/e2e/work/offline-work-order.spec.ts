import { expect, test } from '@playwright/test';
import mysql from 'mysql2/promise';
import { demoAccount, signInAs } from '../helpers/auth';
import { cacheForOffline, createFixture } from '../offline/support';

/** A replace-balls order for `code`, assigned to the demo technician, due yesterday (overdue). */
async function createOrder(code: string): Promise<number> {
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		const [[tech]] = await conn.query<mysql.RowDataPacket[]>(
			'SELECT id FROM users WHERE email = ?',
			[demoAccount('technician').email]
		);
		const [r] = await conn.query<mysql.ResultSetHeader>(
			`INSERT INTO work_orders (fixture_id, action, status, due_on, assignee_id, parts, notes,
			   created_at, updated_at)
			 SELECT id, 'replace-balls', 'scheduled', CURRENT_DATE - INTERVAL 1 DAY, ?, ?, ?, NOW(3), NOW(3)
			 FROM fixtures WHERE code = ?`,
			[
				tech.id,
				JSON.stringify([{ description: 'Ball, 10 mm', quantity: 3, material: 'Si3N4' }]),
				'Worn contact marks on all three balls',
				code
			]
		);
		return r.insertId;
	} finally {
		await conn.end();
	}
}

async function orderState(id: number) {
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		const [[o]] = await conn.query<mysql.RowDataPacket[]>(
			'SELECT status, completed_by_event_id FROM work_orders WHERE id = ?',
			[id]
		);
		const [history] = await conn.query<mysql.RowDataPacket[]>(
			'SELECT what FROM work_order_history WHERE work_order_id = ? ORDER BY id',
			[id]
		);
		return {
			status: o.status as string,
			eventId: o.completed_by_event_id as string | null,
			history: history.map((h) => h.what as string)
		};
	} finally {
		await conn.end();
	}
}

test('a technician starts and completes a work order offline; it is done once synced', async ({
	page,
	context
}) => {
	// Installing the service worker (about 1 MB of precache) is slow on a busy machine.
	test.setTimeout(180_000);
	const code = await createFixture('Work order test mount');
	const id = await createOrder(code);
	await signInAs(page, 'technician');
	await expect(page).toHaveURL(/\/work$/);
	const item = page.getByRole('listitem', { name: `Work order #${id}: replace balls on ${code}` });
	await expect(item).toBeVisible();
	await expect(item.getByText(/Overdue by 1 day/)).toBeVisible();
	await expect(item.getByText('3 × Ball, 10 mm, Si3N4')).toBeVisible();
	await cacheForOffline(page);

	await context.setOffline(true);
	const reloaded = await page.reload();
	expect(reloaded?.fromServiceWorker()).toBe(true);
	await expect(item).toBeVisible();
	await item.getByRole('button', { name: 'Start' }).click();
	await expect(item.getByText('Started, waiting to sync')).toBeVisible();

	await item.getByRole('link', { name: 'Complete' }).click();
	await expect(page).toHaveURL(new RegExp(`/f/${code}\\?wo=${id}&do=part-swap`));
	await expect(page.getByText(`Carrying out work order #${id}`)).toBeVisible();
	await expect(page.getByLabel('Balls', { exact: true })).toBeChecked();
	await page.getByRole('button', { name: 'Log part swap' }).click();
	await expect(page.getByText(`Work order #${id} is done on this phone`)).toBeVisible();
	await page.getByRole('link', { name: 'Back to My work' }).click();
	await expect(page).toHaveURL(/\/work$/);
	await expect(item.getByText('Done, waiting to sync')).toBeVisible();
	expect((await orderState(id)).status).toBe('scheduled');

	await context.setOffline(false);
	await expect.poll(async () => (await orderState(id)).status, { timeout: 30_000 }).toBe('done');
	const done = await orderState(id);
	expect(done.history).toEqual(['started', 'done']);
	expect(done.eventId).toMatch(/^[0-9a-f-]{36}$/);
	// Synced and the copy refreshed: the order has left the list.
	await expect(item).toHaveCount(0, { timeout: 30_000 });
});
