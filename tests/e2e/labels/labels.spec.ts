import { expect, test, type APIResponse } from '@playwright/test';
import { PDFDict, PDFDocument, PDFName, PDFNumber, type PDFPage } from 'pdf-lib';
import { signInAs } from '../helpers/auth';
import { insertArea, unusedCode, type TestFixture } from '../helpers/register-rows';

// Label sheets against the built app: who may print, what the PDF holds, and the Labels page.

let areaId: number;
let inService: TestFixture[];
let retired: TestFixture;

test.beforeAll(async () => {
	const made = await insertArea('Labels test', [
		{ name: 'Labels test pallet A' },
		{ name: 'Labels test pallet B' },
		{ name: 'Labels test probe rack' },
		{ name: 'Labels test old vise', status: 'retired' }
	]);
	areaId = made.areaId;
	inService = made.fixtures.slice(0, 3);
	retired = made.fixtures[3];
});

/** QR symbols placed on a page: each label's symbol is one form XObject named QR…. */
function qrCount(page: PDFPage): number {
	const xobjects = page.node.Resources()?.lookup(PDFName.of('XObject'), PDFDict);
	return xobjects ? xobjects.keys().filter((k) => k.asString().startsWith('/QR')).length : 0;
}

async function readPdf(res: APIResponse) {
	expect(res.status()).toBe(200);
	expect(res.headers()['content-type']).toBe('application/pdf');
	return PDFDocument.load(await res.body());
}

test('the labels API answers 401 JSON without a session', async ({ playwright, baseURL }) => {
	const anonymous = await playwright.request.newContext({ baseURL });
	const res = await anonymous.get(`/api/labels.pdf?area=${areaId}`);
	expect(res.status()).toBe(401);
	expect(await res.json()).toEqual({ error: expect.any(String) });
	await anonymous.dispose();
});

test('an operator may not print labels: 403 JSON', async ({ page }) => {
	await signInAs(page, 'operator');
	const res = await page.request.get(`/api/labels.pdf?area=${areaId}`);
	expect(res.status()).toBe(403);
	expect((await res.json()).error).toMatch(/supervisor or admin/);
});

test('a supervisor gets the area as a US Letter PDF, one label per fixture in service', async ({
	page
}) => {
	await signInAs(page, 'supervisor');
	const res = await page.request.get(`/api/labels.pdf?area=${areaId}&layout=pin&paper=letter`);
	const pdf = await readPdf(res);
	expect(res.headers()['content-disposition']).toMatch(
		/^attachment; filename="nestmark-labels-Labels-test-[\w-]+-pin-letter\.pdf"$/
	);
	expect(res.headers()['x-label-count']).toBe('3');

	expect(pdf.getPageCount()).toBe(1);
	const sheet = pdf.getPage(0);
	// 8.5 × 11 in = 612 × 792 pt
	expect(sheet.getWidth()).toBeCloseTo(612, 2);
	expect(sheet.getHeight()).toBeCloseTo(792, 2);
	expect(qrCount(sheet)).toBe(3);
	const info = pdf.context.lookup(pdf.context.trailerInfo.Info, PDFDict);
	expect(info.lookup(PDFName.of('NestmarkLabelCount'), PDFNumber).asNumber()).toBe(3);
	// The retired fixture is left out of a whole-area sheet.
	const subject = pdf.getSubject() ?? '';
	for (const f of inService) expect(subject).toContain(f.code);
	expect(subject).not.toContain(retired.code);
});

test('one-off labels: one label-sized page per code, the retired fixture too when named', async ({
	page
}) => {
	await signInAs(page, 'supervisor');
	const codes = [inService[0].code, retired.code].join(',');
	const pdf = await readPdf(
		await page.request.get(`/api/labels.pdf?codes=${codes}&layout=block&paper=label`)
	);
	expect(pdf.getPageCount()).toBe(2);
	for (const p of pdf.getPages()) {
		// 70 × 37 mm at 72/25.4 pt per mm
		expect(p.getWidth()).toBeCloseTo((70 * 72) / 25.4, 2);
		expect(p.getHeight()).toBeCloseTo((37 * 72) / 25.4, 2);
		expect(qrCount(p)).toBe(1);
	}
});

test('bad settings get 400 with field messages; unknown codes get 404 listing them', async ({
	page
}) => {
	await signInAs(page, 'supervisor');
	const bad = await page.request.get(
		`/api/labels.pdf?codes=${inService[0].code}&layout=huge&margin=-3&startAt=0`
	);
	expect(bad.status()).toBe(400);
	const body = await bad.json();
	expect(body.error).toBe('Check the label settings.');
	expect(Object.keys(body.fields).sort()).toEqual(['layout', 'margin', 'startAt']);

	// Shim on A4 with the default margins holds 30 labels, so position 31 does not exist.
	const tooFar = await page.request.get(`/api/labels.pdf?area=${areaId}&startAt=31`);
	expect(tooFar.status()).toBe(400);
	expect((await tooFar.json()).fields.startAt[0]).toMatch(/30 labels/);

	const nowhere = await unusedCode();
	const missing = await page.request.get(`/api/labels.pdf?codes=${inService[1].code},${nowhere}`);
	expect(missing.status()).toBe(404);
	expect(await missing.json()).toEqual({
		error: `No fixture with code ${nowhere} in the register.`,
		fields: { codes: [`${nowhere} is not in the register.`] }
	});
});

test('the Labels page previews the first page and downloads the PDF', async ({ page }) => {
	await signInAs(page, 'supervisor');
	const codes = inService.map((f) => f.code).join(',');
	await page.goto(`/labels?codes=${codes}`);
	await expect(page.getByRole('heading', { name: 'Labels', exact: true })).toBeVisible();

	const preview = page.getByRole('img', { name: /Preview of the first page/ });
	await expect(preview).toHaveAccessibleName(/3 by 10 Shim 50 × 25 mm labels, 3 printed\./);
	await page.getByRole('radio', { name: /Pin 38 × 19/ }).check();
	await expect(preview).toHaveAccessibleName(/5 by 14 Pin 38 × 19 mm labels, 3 printed/);
	await page.getByLabel('First free label').fill('69');
	await expect(preview).toHaveAccessibleName(/2 printed, the first 68 positions already used/);
	await expect(page.getByText('3 labels on 2 pages')).toBeVisible();

	const download = page.waitForEvent('download');
	await page.getByRole('button', { name: 'Download PDF' }).click();
	const file = await download;
	expect(file.suggestedFilename()).toBe('nestmark-labels-3-fixtures-pin-a4.pdf');
	await expect(page.getByText(/^Ready: 3 labels on 2 pages/)).toBeVisible();
	const pdf = await PDFDocument.load(
		await (await import('node:fs/promises')).readFile((await file.path())!)
	);
	expect(pdf.getPages().map(qrCount)).toEqual([2, 1]);
});
