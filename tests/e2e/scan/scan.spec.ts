import { expect, test, type Page } from '@playwright/test';
import { FIXTURE_CODE_ALPHABET } from '../../../src/lib/domain/fixture-code';
import { signInAs } from '../helpers/auth';
import { labelPng } from '../helpers/label-images';
import { insertArea, unusedCode, type TestFixture } from '../helpers/register-rows';

// The scanner's fallbacks against the built app: a photo of a label, and a typed code.

// Loading the decoders, reading a photo and opening the card take a few seconds on a busy machine.
const OPEN_CARD_MS = 30_000;

let fixture: TestFixture;

test.beforeAll(async () => {
	const made = await insertArea('Scan test', [{ name: 'Scan test lathe pallet' }]);
	fixture = made.fixtures[0];
});

/** The same code with its check character swapped for the next one in the alphabet. */
function withWrongCheck(code: string): string {
	const last = code.at(-1)!;
	const i = FIXTURE_CODE_ALPHABET.indexOf(last);
	return code.slice(0, -1) + FIXTURE_CODE_ALPHABET[(i + 1) % FIXTURE_CODE_ALPHABET.length];
}

async function openScanner(page: Page) {
	await signInAs(page, 'operator', '/scan');
	await expect(page).toHaveURL(/\/scan$/);
	await expect(page.getByRole('heading', { name: 'Scan a label' })).toBeVisible();
}

const decodedMarks = (page: Page) =>
	page.evaluate(() => performance.getEntriesByName('nm:scan-decoded').length);

test('a picture of a printed label opens the fixture card', async ({ page }) => {
	await openScanner(page);
	const png = await labelPng(`${process.env.ORIGIN}/f/${fixture.code}`);
	await page
		.getByLabel('Scan from a photo')
		.setInputFiles({ name: 'label.png', mimeType: 'image/png', buffer: png });

	await expect(page).toHaveURL(new RegExp(`/f/${fixture.code}$`), { timeout: OPEN_CARD_MS });
	await expect(page.getByRole('heading', { name: fixture.name })).toBeVisible();
	expect(await decodedMarks(page)).toBe(1);
});

test('a tilted, soft phone photo of a label from another server opens the card', async ({
	page
}) => {
	await openScanner(page);
	// Labels printed on another server (a test system, an old address) still name the fixture.
	const png = await labelPng(`https://nestmark.larchmere.example/f/${fixture.code}`);
	// Turn the crisp symbol into something like a phone photo: on a grey bench, rotated 5°,
	// blurred by 1.5 px, saved as JPEG.
	const jpeg = await page.evaluate(async (b64) => {
		const img = new Image();
		img.src = `data:image/png;base64,${b64}`;
		await img.decode();
		const c = document.createElement('canvas');
		c.width = 1200;
		c.height = 900;
		const g = c.getContext('2d')!;
		g.fillStyle = '#7a7a72';
		g.fillRect(0, 0, c.width, c.height);
		g.translate(600, 450);
		g.rotate((5 * Math.PI) / 180);
		g.filter = 'blur(1.5px)';
		g.drawImage(img, -260, -260, 520, 520);
		const blob = await new Promise<Blob>((r) => c.toBlob((b) => r(b!), 'image/jpeg', 0.85));
		const bytes = new Uint8Array(await blob.arrayBuffer());
		let s = '';
		for (const b of bytes) s += String.fromCharCode(b);
		return btoa(s);
	}, png.toString('base64'));

	await page.getByLabel('Scan from a photo').setInputFiles({
		name: 'IMG_2041.jpg',
		mimeType: 'image/jpeg',
		buffer: Buffer.from(jpeg, 'base64')
	});
	await expect(page).toHaveURL(new RegExp(`/f/${fixture.code}$`), { timeout: OPEN_CARD_MS });
	await expect(page.getByRole('heading', { name: fixture.name })).toBeVisible();
});

test('a photo without a QR code says so and stays on the scanner', async ({ page }) => {
	await openScanner(page);
	// A blank 64 × 64 white PNG made by the browser.
	const blank = await page.evaluate(() => {
		const c = document.createElement('canvas');
		c.width = c.height = 64;
		const g = c.getContext('2d')!;
		g.fillStyle = '#fff';
		g.fillRect(0, 0, 64, 64);
		return c.toDataURL('image/png').split(',')[1];
	});
	await page.getByLabel('Scan from a photo').setInputFiles({
		name: 'wall.png',
		mimeType: 'image/png',
		buffer: Buffer.from(blank, 'base64')
	});
	await expect(page.getByText('No QR code found in that photo.')).toBeVisible({
		timeout: OPEN_CARD_MS
	});
	await expect(page).toHaveURL(/\/scan$/);
});

test('a typed code with a wrong last character gets the check-character message', async ({
	page
}) => {
	await openScanner(page);
	const field = page.getByLabel('Type the code');
	await field.fill(withWrongCheck(fixture.code).toLowerCase());
	await field.press('Enter');

	await expect(page.getByText("The last character doesn't match — check the code.")).toBeVisible();
	await expect(field).toHaveAttribute('aria-invalid', 'true');
	await expect(page).toHaveURL(/\/scan$/);
	expect(await decodedMarks(page)).toBe(0);

	// Corrected, without the prefix and in lower case, it opens the card.
	await field.fill(fixture.code.slice(3).toLowerCase());
	await page.getByRole('button', { name: 'Open' }).click();
	await expect(page).toHaveURL(new RegExp(`/f/${fixture.code}$`), { timeout: OPEN_CARD_MS });
	await expect(page.getByRole('heading', { name: fixture.name })).toBeVisible();
});

test('a well-formed code that is not in the register gets a clear message', async ({ page }) => {
	const code = await unusedCode();
	await openScanner(page);
	const field = page.getByLabel('Type the code');
	await field.fill(code);
	await field.press('Enter');
	await expect(page.getByText(`${code} is not in the register.`)).toBeVisible();
	await expect(page).toHaveURL(/\/scan$/);
});
