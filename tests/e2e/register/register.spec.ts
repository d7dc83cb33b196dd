import { expect, test } from '@playwright/test';
import { signInAs } from '../helpers/auth';

// Runs against the seeded demo register (scripts/seed.ts): site "Larchmere Precision Optics",
// area "Diamond-turning bay" with location "Lathe DT-1". Names made here carry a run id, so a
// rerun against the same database never finds the previous run's fixtures.
const run = Date.now().toString(36);

// Each test signs in (bcrypt at cost 12) and walks several pages; on a busy two-core machine that
// can pass the default 30 s without anything being wrong.
test.describe.configure({ timeout: 90_000 });

test.describe('fixture register', () => {
	test('a supervisor adds a fixture and finds it by search', async ({ page }) => {
		await signInAs(page, 'supervisor', '/fixtures');
		await page.getByRole('link', { name: 'Add fixture' }).click();
		await expect(page.getByRole('heading', { name: 'Add a fixture' })).toBeVisible();

		const name = `Trial pallet ${run}`;
		await page.getByLabel('Name').fill(name);
		await page.getByLabel('Type').selectOption({ label: 'Three-vee kinematic coupling' });
		await page.getByLabel('Location').selectOption({ label: 'Lathe DT-1' });
		await page.getByLabel('Repeatability spec (µm)').fill('0.8');
		await page.getByLabel('Mass (kg)').fill('18');
		await page.getByLabel('Ball material').fill('Si3N4');
		await page.getByRole('button', { name: 'Add fixture' }).click();

		await expect(page).toHaveURL(/\/fixtures\/NM-[2-9A-HJKMNP-TV-Z]{5}\?added/);
		const code = new URL(page.url()).pathname.split('/').pop()!;
		await expect(page.getByRole('heading', { level: 1, name })).toBeVisible();
		await expect(page.getByText('Fixture added.')).toBeVisible();
		await expect(
			page.getByText('Larchmere Precision Optics / Diamond-turning bay / Lathe DT-1').first()
		).toBeVisible();
		// 18 kg is over the heavy-lift threshold, and a three-vee coupling has pinch points.
		await expect(page.getByText('Caution — Heavy item.')).toBeVisible();
		await expect(page.getByText('Caution — Pinch points.')).toBeVisible();
		await expect(page.getByText('No entries yet.')).toBeVisible();

		await page.getByRole('link', { name: 'Register' }).first().click();
		const search = page.getByRole('searchbox', { name: 'Search code or name' });
		await search.fill(`trial PALLET ${run}`);
		await search.press('Enter');
		await expect(page).toHaveURL(new RegExp(`[?&]q=trial`));
		await expect(page.getByText('1 fixture matches.')).toBeVisible();
		await expect(page.getByRole('link', { name: code })).toBeVisible();

		// The code finds it too, typed the lazy way.
		await search.fill(code.replace('-', '').toLowerCase());
		await search.press('Enter');
		await expect(page.getByRole('cell', { name })).toBeVisible();
		await page.getByRole('link', { name: code }).click();
		await expect(page).toHaveURL(`/fixtures/${code}`);
	});

	test('the add form shows field messages and saves nothing until they are fixed', async ({
		page
	}) => {
		await signInAs(page, 'supervisor', '/fixtures/new');
		await page.getByLabel('Type').selectOption({ label: 'Fixture plate' });
		await page.getByLabel('Location').selectOption({ label: 'CMM 1' });
		await page.getByLabel('Repeatability spec (µm)').fill('2 µm');
		await page.getByRole('button', { name: 'Add fixture' }).click();

		await expect(page.getByText('Give the fixture a name.')).toBeVisible();
		await expect(
			page.getByText('Enter the number only: the unit is already µm (got "2 µm").')
		).toBeVisible();
		await expect(page).toHaveURL('/fixtures/new');
		// What was typed is kept, and the first bad field has the keyboard.
		await expect(page.getByLabel('Repeatability spec (µm)')).toHaveValue('2 µm');
		await expect(page.getByLabel('Name')).toBeFocused();

		await page.getByLabel('Name').fill(`Trial plate ${run}`);
		await page.getByLabel('Repeatability spec (µm)').fill('2');
		await page.getByRole('button', { name: 'Add fixture' }).click();
		await expect(page.getByRole('heading', { level: 1, name: `Trial plate ${run}` })).toBeVisible();
	});

	test('moving a fixture is recorded in its history with who did it', async ({ page }) => {
		await signInAs(page, 'admin', '/fixtures/new');
		await page.getByLabel('Name').fill(`Trial mount ${run}`);
		await page.getByLabel('Type').selectOption({ label: 'Trihedral–vee–flat coupling' });
		await page.getByLabel('Location').selectOption({ label: 'Interferometer bench A' });
		await page.getByRole('button', { name: 'Add fixture' }).click();
		await expect(page).toHaveURL(/\/fixtures\/NM-/);

		await page.getByRole('link', { name: 'Edit' }).click();
		await page.getByLabel('Location').selectOption({ label: 'Interferometer bench B' });
		await page.getByRole('button', { name: 'Save changes' }).click();
		await expect(page.getByText('the move is recorded')).toBeVisible();
		const entries = page.getByRole('region', { name: 'History' });
		await expect(
			entries.getByText(
				'From Larchmere Precision Optics / Interferometry room / Interferometer bench A to Larchmere Precision Optics / Interferometry room / Interferometer bench B'
			)
		).toBeVisible();
		await expect(entries.getByText('Ada Marwick')).toBeVisible();
	});

	test('an operator reads the register but cannot add to it', async ({ page }) => {
		await signInAs(page, 'operator', '/fixtures');
		await expect(page.getByRole('heading', { name: 'Fixture register' })).toBeVisible();
		await expect(page.getByRole('link', { name: 'Add fixture' })).toHaveCount(0);
		await page
			.getByLabel('Type', { exact: true })
			.selectOption({ label: 'Trihedral–vee–flat coupling' });
		await expect(page).toHaveURL(/type=trihedral-vee-flat/);
		await expect(
			page.getByRole('cell', { name: 'Calibration-sphere kinematic mount' })
		).toBeVisible();

		const res = await page.goto('/fixtures/new');
		expect(res?.status()).toBe(403);
		await expect(page.getByRole('heading', { name: 'Not part of your role' })).toBeVisible();
	});

	test('on a phone the register is a list of cards', async ({ page }) => {
		await page.setViewportSize({ width: 390, height: 844 });
		await signInAs(page, 'operator', '/fixtures?q=probe-change&sort=name');
		const cards = page.getByRole('list', { name: 'Fixtures' }).getByRole('link');
		await expect(cards).toHaveCount(6);
		await expect(cards.first()).toContainText('CMM 1 probe-change rack, port 1');
		await expect(page.getByRole('table')).toBeHidden();
	});
});

test.describe('CSV import', () => {
	const header = 'code,name,type,site,area,location,status,repeatability_spec_um,mass_kg';
	const row = (name: string, location = 'Lathe DT-2') =>
		`,${name},three-vee,Larchmere Precision Optics,Diamond-turning bay,${location},,1,12`;

	test('one bad row shows its error and nothing is imported', async ({ page }) => {
		await signInAs(page, 'supervisor', '/fixtures/import');
		const csv = [
			header,
			row(`Import A ${run}`),
			row(`Import B ${run}`, 'Lathe DT-9'),
			row(`Import C ${run}`)
		].join('\n');
		await page.getByLabel('CSV file').setInputFiles({
			name: 'pallets.csv',
			mimeType: 'text/csv',
			buffer: Buffer.from(csv)
		});
		await page.getByRole('button', { name: 'Check file' }).click();

		await expect(page.getByText('1 row needs fixing (3 in the file).')).toBeVisible();
		await expect(
			page.getByText(
				'location: Larchmere Precision Optics / Diamond-turning bay has no location named "Lathe DT-9".'
			)
		).toBeVisible();
		await expect(page.getByRole('button', { name: /^Import/ })).toHaveCount(0);

		await page.goto(`/fixtures?q=${encodeURIComponent(`Import A ${run}`)}`);
		await expect(page.getByRole('heading', { name: 'No fixtures match' })).toBeVisible();
	});

	test('a fixed file imports all rows after confirmation', async ({ page }) => {
		await signInAs(page, 'supervisor', '/fixtures/import');
		const bad = [header, row(`Batch A ${run}`), row(`Batch B ${run}`, 'Lathe DT-9')].join('\n');
		await page.getByLabel('…or paste the CSV text').fill(bad);
		await page.getByRole('button', { name: 'Check file' }).click();
		await expect(page.getByText('1 row needs fixing (2 in the file).')).toBeVisible();

		// The file is still there to fix; nothing was lost between the steps.
		const fix = page.getByLabel('CSV text');
		await expect(fix).toHaveValue(bad);
		await fix.fill(bad.replace('Lathe DT-9', 'Lathe DT-2'));
		await page.getByRole('button', { name: 'Check again' }).click();
		await expect(page.getByText('All 2 rows are ready.')).toBeVisible();

		await page.getByRole('button', { name: 'Import 2 fixtures' }).click();
		await expect(page.getByText('Imported 2 fixtures.')).toBeVisible();
		await page.getByRole('searchbox', { name: 'Search code or name' }).fill(`Batch`);
		await page.getByRole('searchbox', { name: 'Search code or name' }).press('Enter');
		await expect(page.getByRole('cell', { name: `Batch A ${run}` })).toBeVisible();
		await expect(page.getByRole('cell', { name: `Batch B ${run}` })).toBeVisible();
	});

	test('the export downloads as CSV with the list filters', async ({ page }) => {
		await signInAs(page, 'planner', '/fixtures?area=');
		const res = await page.request.get('/fixtures/export.csv?q=Reference%20flat%20mount');
		expect(res.status()).toBe(200);
		expect(res.headers()['content-type']).toContain('text/csv');
		const lines = (await res.text())
			.replace(/^\uFEFF/, '')
			.trim()
			.split('\r\n');
		expect(lines[0]).toBe(
			'code,name,type,site,area,location,status,repeatability_spec_um,rated_life_cycles,ball_material,seat_material,ball_diameter_mm,preload_n,mass_kg,commissioned_on,notes'
		);
		// Search ignores case, and other specs may add fixtures with the phrase in lower case.
		expect(lines.slice(1).every((l) => /reference flat mount/i.test(l))).toBe(true);
		expect(lines.length).toBeGreaterThanOrEqual(7);
	});
});

test.describe('fixtures API', () => {
	test('answers JSON 401 without a session, and health is public', async ({ request }) => {
		const res = await request.get('/api/fixtures');
		expect(res.status()).toBe(401);
		expect(await res.json()).toEqual({ error: 'Not signed in.' });
		const health = await request.get('/api/health');
		expect(health.status()).toBe(200);
		expect(await health.json()).toMatchObject({ app: 'ok', database: 'ok' });
	});

	test('lists, creates, changes and refuses with field messages', async ({ page }) => {
		await signInAs(page, 'supervisor');
		const api = page.request;
		const list = await api.get('/api/fixtures?type=trihedral-vee-flat&pageSize=5&sort=name');
		expect(list.status()).toBe(200);
		const body = await list.json();
		expect(body).toMatchObject({ page: 1, pageSize: 5 });
		expect(body.total).toBeGreaterThanOrEqual(8);
		expect(body.items).toHaveLength(5);

		expect((await api.get('/api/fixtures?pageSize=500')).status()).toBe(400);

		const locationId = body.items[0].place.locationId;
		const bad = await api.post('/api/fixtures', {
			data: { name: '', type: 'three-vee', locationId, mass_kg: '3 kg' }
		});
		expect(bad.status()).toBe(400);
		expect((await bad.json()).fields).toMatchObject({
			name: ['Give the fixture a name.'],
			mass_kg: ['Enter the number only: the unit is already kg (got "3 kg").']
		});

		const made = await api.post('/api/fixtures', {
			data: { name: `API nest ${run}`, type: 'three-vee', locationId, repeatabilitySpec_um: 0.5 }
		});
		expect(made.status()).toBe(201);
		const fixture = await made.json();
		expect(fixture.code).toMatch(/^NM-/);

		const patched = await api.patch(`/api/fixtures/${fixture.code.toLowerCase()}`, {
			data: { status: 'on-hold', repeatabilitySpec_um: null }
		});
		expect(patched.status()).toBe(200);
		expect(await patched.json()).toMatchObject({ status: 'on-hold', repeatabilitySpec_um: null });
		expect((await api.get(`/api/fixtures/${fixture.code}`)).status()).toBe(200);
		expect((await api.get('/api/fixtures/NM-22222')).status()).toBe(404);
	});

	test('refuses changes from an operator with 403', async ({ page }) => {
		await signInAs(page, 'operator');
		const res = await page.request.post('/api/fixtures', {
			data: { name: 'Nope', type: 'other', locationId: 1 }
		});
		expect(res.status()).toBe(403);
		expect((await res.json()).error).toMatch(/supervisor or admin/);
	});
});
