import { randomUUID } from 'node:crypto';
import { expect, test } from '@playwright/test';
import mysql from 'mysql2/promise';
import { generateFixtureCode } from '../../../src/lib/domain/fixture-code';
import { signInAs } from '../helpers/auth';

// The fixture page's history and charts, on the seeded demo (a year of invented history).

async function query<T extends mysql.RowDataPacket>(sql: string, params: unknown[] = []) {
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		const [rows] = await conn.query<T[]>(sql, params);
		return rows;
	} finally {
		await conn.end();
	}
}

/** The code of a demo fixture by its name. */
async function demoCode(name: string): Promise<string> {
	const [row] = await query('SELECT code FROM fixtures WHERE name = ?', [name]);
	if (!row) throw new Error(`the demo seed has no fixture named ${name}`);
	return row.code as string;
}

test.describe.configure({ timeout: 60_000 });

test('the drifting demo pallet shows its history by kind, page by page, with who and when', async ({
	page
}) => {
	const code = await demoCode('DT-2 kinematic pallet B');
	await signInAs(page, 'supervisor', `/fixtures/${code}`);
	const history = page.getByRole('region', { name: 'History' });
	const entries = history.getByRole('list', { name: 'Entries, newest first' });
	await expect(entries.getByText('Olga Brennan').first()).toBeVisible();

	// Inspections only: the verdict and every graded contact in words.
	await history.getByLabel('Show').selectOption('inspection');
	await expect(page).toHaveURL(/kind=inspection/);
	await expect(
		entries.getByText(/^Verdict: (serviceable|watch) — worst grade \d/).first()
	).toBeVisible();
	await expect(entries.getByText(/^Ball 1: grade \d \(\w+\)/).first()).toBeVisible();
	await expect(entries.getByText(/^Vee 3: grade \d/).first()).toBeVisible();
	await expect(entries.getByText('Tomas Okafor').first()).toBeVisible();
	await expect(entries.getByText('Reseat', { exact: true })).toHaveCount(0);

	// All kinds again, then the next older page: its newest entry is older than the first page's last.
	await history.getByLabel('Show').selectOption('');
	await expect(page).not.toHaveURL(/kind=[a-z]/);
	const times = entries.locator('time');
	const lastOnFirst = await times.last().getAttribute('datetime');
	await history.getByRole('link', { name: 'Show older entries' }).click();
	await expect(page).toHaveURL(/before=/);
	await expect(history.getByRole('link', { name: 'Newest entries' })).toBeVisible();
	const firstOnSecond = await times.first().getAttribute('datetime');
	expect(Date.parse(firstOnSecond!)).toBeLessThanOrEqual(Date.parse(lastOnFirst!));
	await expect(
		entries.getByText(/^\d+ cycles?, (last seating read dx|no readings)/).first()
	).toBeVisible();

	// The charts: trend lines named with their convention, run-rule hits, past break-in runs.
	const charts = page.getByRole('region', { name: 'Charts' });
	await expect(
		charts.getByText(/Theil–Sen trend \(intercept: separate medians\): slope/)
	).toBeVisible();
	await expect(charts.getByText(/OLS trend \(least squares\): slope/)).toBeVisible();
	await expect(charts.getByText(/[1-9]\d* run-rule hits?\./).first()).toBeVisible();
	await expect(charts.getByRole('heading', { name: 'Break-in runs' })).toBeVisible();
	await expect(
		charts.getByRole('listitem').filter({ hasText: /40 cycles,\s+40 readings —\s+rolling R/ })
	).toBeVisible();
	await expect(
		charts.getByLabel(/Rolling repeatability R of each past break-in run/)
	).toBeVisible();
});

test('a bad page link shows the newest entries with the reason', async ({ page }) => {
	const code = await demoCode('Quick-change vise V1');
	await signInAs(page, 'operator', `/fixtures/${code}?before=yesterday`);
	const history = page.getByRole('region', { name: 'History' });
	await expect(history.getByRole('alert')).toHaveText(/page link is not valid/);
	await expect(history.getByText(/^(Dry|Solvent) wipe; not relubricated$/).first()).toBeVisible();
});

test('inspection photos show as thumbnails that open the full picture', async ({ page }) => {
	const [loc] = await query('SELECT id FROM locations ORDER BY id LIMIT 1');
	let code = generateFixtureCode();
	while ((await query('SELECT 1 FROM fixtures WHERE code = ?', [code])).length) {
		code = generateFixtureCode();
	}
	await query(
		`INSERT INTO fixtures (code, name, type, status, location_id, created_at, updated_at)
		 VALUES (?, 'History photo test nest', 'three-vee', 'in-service', ?, NOW(3), NOW(3))`,
		[code, loc.id]
	);
	await signInAs(page, 'technician', `/fixtures/${code}`);
	const photos = [randomUUID(), randomUUID()];
	const response = await page.request.post('/api/sync', {
		headers: { 'content-type': 'application/json' },
		data: Buffer.from(
			JSON.stringify({
				deviceId: `e2e-${randomUUID()}`,
				events: [
					{
						id: randomUUID(),
						fixtureCode: code,
						kind: 'inspection',
						occurredAt: new Date(Date.now() - 60_000).toISOString(),
						payload: {
							contacts: [{ contact: 'Vee 2', grade: 2, marks: ['fretting'] }],
							verdict: 'watch',
							photoIds: photos
						}
					}
				]
			})
		)
	});
	expect((await response.json()).results[0].status).toBe('accepted');

	await page.reload();
	const history = page.getByRole('region', { name: 'History' });
	await expect(history.getByText('Vee 2: grade 2 (Dulled), fretting')).toBeVisible();
	const gallery = history.getByRole('list', { name: 'Photos of this inspection' });
	const second = gallery.getByRole('img', { name: /^Inspection photo 2 of 2, / });
	await expect(second).toHaveAttribute('src', `/api/attachments/${photos[1]}/thumb`);
	await expect(gallery.getByRole('link').nth(1)).toHaveAttribute(
		'href',
		`/api/attachments/${photos[1]}`
	);
});
