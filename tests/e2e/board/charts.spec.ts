import { expect, test, type Page, type Response } from '@playwright/test';
import mysql from 'mysql2/promise';
import { signInAs } from '../helpers/auth';
import { describeProblems, watchProblems } from '../helpers/page-problems';

// Runs against the seeded demo (scripts/seed.ts): the fleet charts on the board, drawn with
// chart.js in the browser and as tables without JavaScript.

test.describe.configure({ timeout: 90_000 });

const CHARTS = [
	'Repeatability against spec',
	'Forecast to reach spec',
	'Flags raised and cleared per week',
	'By area'
];

/** The demo's drifting pallet, its area and R ÷ its effective spec, read from the database. */
async function driftingPallet() {
	const conn = await mysql.createConnection({ uri: process.env.DATABASE_URL! });
	try {
		const [rows] = await conn.query<mysql.RowDataPacket[]>(
			`SELECT f.code, a.id AS area_id, a.name AS area,
			        s.repeatability_um / COALESCE(f.repeatability_spec_um, p.repeatability_spec_um) AS ratio
			   FROM fixtures f
			   JOIN locations l ON l.id = f.location_id JOIN areas a ON a.id = l.area_id
			   JOIN fixture_state s ON s.fixture_id = f.id
			   LEFT JOIN policies p ON p.fixture_type = f.type
			  WHERE f.name = 'DT-2 kinematic pallet B'`
		);
		expect(rows, 'the demo has its drifting pallet').toHaveLength(1);
		return rows[0] as { code: string; area_id: number; area: string; ratio: number };
	} finally {
		await conn.end();
	}
}

const fleetCharts = (page: Page) => page.getByRole('region', { name: 'Fleet charts' });

test.describe('fleet charts on the board', () => {
	test('a supervisor sees the four charts drawn, their tables, and the watch list', async ({
		page,
		context
	}) => {
		const problems = await watchProblems(context);
		await page.setViewportSize({ width: 390, height: 844 });
		await signInAs(page, 'supervisor', '/board');
		const section = fleetCharts(page);
		await expect(section).toBeVisible();

		for (const name of CHARTS) {
			const chart = section.getByRole('region', { name });
			await expect(chart.getByRole('heading', { name })).toBeVisible();
			// chart.js is loaded on demand: the canvas is there and the placeholder goes.
			await expect(chart.locator('canvas')).toHaveCount(1);
			await expect(chart.getByText('Loading chart…')).toHaveCount(0);
			// The table stays in the page for screen readers, shown on request.
			await expect(chart.getByRole('table')).toHaveCount(1);
			await chart.getByRole('button', { name: 'Show as table' }).click();
			await expect(chart.getByRole('table')).toBeVisible();
		}
		const histogram = section.getByRole('region', { name: CHARTS[0] });
		await expect(histogram.getByRole('row')).toHaveCount(17);
		await expect(histogram.getByRole('row', { name: '≥ 1.5' })).toBeVisible();

		// The drifting pallet is listed past 0.8 × spec exactly when its figures put it there.
		const pallet = await driftingPallet();
		const watch = histogram.getByRole('list', { name: 'Past 0.8 × spec' });
		if (pallet.ratio > 0.8) {
			await expect(watch.getByRole('link', { name: pallet.code })).toBeVisible();
		} else {
			await expect(histogram.getByRole('link', { name: pallet.code })).toHaveCount(0);
		}

		const areas = section.getByRole('region', { name: 'By area' });
		await expect(areas.getByRole('rowheader', { name: pallet.area })).toBeVisible();
		await expect(section.getByText(/Theil–Sen trend of windowed R against cycles/)).toBeVisible();

		// Readable on a 390 px phone: nothing wider than the screen.
		const overflow = await page.evaluate(
			() => document.documentElement.scrollWidth - document.documentElement.clientWidth
		);
		expect(overflow).toBeLessThanOrEqual(0);
		expect(problems, describeProblems(problems)).toEqual([]);
	});

	test('the charts refresh from the API on focus, with the board’s area', async ({ page }) => {
		const pallet = await driftingPallet();
		await signInAs(page, 'supervisor', `/board?area=${pallet.area_id}`);
		const section = fleetCharts(page);
		await expect(section.getByText(`for ${pallet.area}.`)).toBeVisible();
		await expect(section.locator('canvas')).toHaveCount(4);
		// Focus refreshes at most every few seconds (focus and visibility come together), so focus
		// is given until a refresh has been asked for.
		const answers: Response[] = [];
		page.on('response', (r) => {
			if (r.url().includes('/api/fleet/trends')) answers.push(r);
		});
		await expect
			.poll(
				async () => {
					await page.evaluate(() => window.dispatchEvent(new Event('focus')));
					return answers.length;
				},
				{ timeout: 20_000, intervals: [1_000] }
			)
			.toBeGreaterThan(0);
		expect(new URL(answers[0].url()).searchParams.get('area')).toBe(String(pallet.area_id));
		expect(answers[0].status()).toBe(200);
		const areas = section.getByRole('region', { name: 'By area' });
		await expect(areas.getByRole('rowheader')).toHaveCount(1);
	});

	test('charts the server could not give are asked for in the browser, and the reason shown', async ({
		page
	}) => {
		await signInAs(page, 'supervisor', '/board?area=999999');
		await expect(fleetCharts(page).getByRole('alert')).toHaveText(
			'■ The fleet charts could not be loaded: There is no area with id 999999. They are tried again every minute.'
		);
		await expect(fleetCharts(page).locator('canvas')).toHaveCount(0);
	});

	test('without JavaScript each chart is its heading, its sentence and its table', async ({
		browser
	}) => {
		const context = await browser.newContext({ javaScriptEnabled: false });
		const page = await context.newPage();
		await signInAs(page, 'supervisor', '/board', { javaScript: false });
		const section = fleetCharts(page);
		for (const name of CHARTS) {
			const chart = section.getByRole('region', { name });
			await expect(chart.getByRole('heading', { name })).toBeVisible();
			await expect(chart.getByRole('table')).toBeVisible();
			await expect(chart.locator('canvas')).toHaveCount(0);
		}
		await expect(
			section.getByText(/How many fixtures have their current repeatability/)
		).toBeVisible();
		await context.close();
	});

	test('the API refuses an operator with JSON 403 and a bad date with JSON 400', async ({
		page,
		browser
	}) => {
		await signInAs(page, 'operator', '/scan');
		const refused = await page.request.get('/api/fleet/trends');
		expect(refused.status()).toBe(403);
		expect(refused.headers()['content-type']).toMatch(/^application\/json/);
		expect((await refused.json()).error).toMatch(/fleet board/);

		// A context of its own: clearing cookies races the operator page's own requests, whose
		// answers may set the session cookie again.
		const context = await browser.newContext();
		try {
			const boss = await context.newPage();
			await signInAs(boss, 'supervisor', '/board');
			const bad = await boss.request.get('/api/fleet/trends?from=2026-13-01');
			expect(bad.status()).toBe(400);
			expect(bad.headers()['content-type']).toMatch(/^application\/json/);
			const body = await bad.json();
			expect(body.error).toBe('Invalid query.');
			expect(body.fields.from[0]).toMatch(/from must be a date as YYYY-MM-DD/);
		} finally {
			await context.close();
		}
	});
});
