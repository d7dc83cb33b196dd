import { describe, expect, it } from 'vitest';
import { FIXTURE_CODE_ALPHABET, checkCharacter } from '$lib/domain/fixture-code';
import { CHECK_MESSAGE, readScannedText } from './scan-text';

// A valid code built with the register's own check character, and the same code with its last
// character changed to the next one in the alphabet (a typo the check must catch).
const body = '4K7Q';
const good = `NM-${body}${checkCharacter(body)}`;
const check = checkCharacter(body);
const wrongCheck =
	FIXTURE_CODE_ALPHABET[(FIXTURE_CODE_ALPHABET.indexOf(check) + 1) % FIXTURE_CODE_ALPHABET.length];
const typo = `NM-${body}${wrongCheck}`;

describe('readScannedText: label URLs', () => {
	it('reads the code from a Nestmark URL on any origin', () => {
		for (const url of [
			`http://127.0.0.1:3000/f/${good}`,
			`https://nestmark.larchmere.example/f/${good}`,
			`https://tools.example.com/nestmark/f/${good}/`,
			`HTTPS://NESTMARK.EXAMPLE/f/${good}?from=label#top`
		]) {
			expect(readScannedText(url, 'camera')).toEqual({ ok: true, code: good, from: 'url' });
		}
	});

	it('accepts a lower-case or percent-encoded code in the path', () => {
		expect(readScannedText(`https://x.example/f/${good.toLowerCase()}`, 'photo')).toMatchObject({
			ok: true,
			code: good
		});
		expect(
			readScannedText(`https://x.example/f/${encodeURIComponent(good)}`, 'camera')
		).toMatchObject({ ok: true, code: good });
	});

	it('flags a URL whose code fails the check character', () => {
		expect(readScannedText(`https://x.example/f/${typo}`, 'camera')).toEqual({
			ok: false,
			problem: 'check',
			message: CHECK_MESSAGE
		});
	});

	it('says so when a QR code holds some other web address', () => {
		expect(readScannedText('https://www.example.org/catalogue/item/42', 'camera')).toEqual({
			ok: false,
			problem: 'not-nestmark',
			message: 'This QR code is not a Nestmark label: it opens a page on www.example.org.'
		});
		expect(readScannedText('https://x.example/f/', 'camera')).toMatchObject({
			problem: 'not-nestmark'
		});
		expect(readScannedText('https://x.example/f/%E0%A4%A', 'camera')).toMatchObject({
			problem: 'not-nestmark'
		});
	});
});

describe('readScannedText: bare codes', () => {
	it('accepts the code typed any way a person might', () => {
		const compact = good.slice(3);
		for (const typed of [
			good,
			good.toLowerCase(),
			` ${good} `,
			compact,
			`nm ${compact.slice(0, 2)} ${compact.slice(2)}`,
			`NM–${compact}`
		]) {
			expect(readScannedText(typed, 'typed')).toEqual({ ok: true, code: good, from: 'code' });
		}
	});

	it('gives the check-character message for a single mistyped character', () => {
		expect(readScannedText(typo, 'typed')).toEqual({
			ok: false,
			problem: 'check',
			message: CHECK_MESSAGE
		});
		expect(CHECK_MESSAGE).toBe("The last character doesn't match — check the code.");
		// A transposition of two neighbours is caught as well (Luhn mod N detects adjacent swaps).
		const swapped = `NM-${body[1]}${body[0]}${body.slice(2)}${check}`;
		expect(readScannedText(swapped, 'typed')).toMatchObject({ ok: false, problem: 'check' });
	});

	it('passes on the register’s own messages for other mistakes', () => {
		expect(readScannedText('', 'typed')).toMatchObject({ ok: false, problem: 'empty' });
		const short = readScannedText('NM-4K7', 'typed');
		expect(short).toMatchObject({ ok: false, problem: 'format' });
		if (!short.ok) expect(short.message).toMatch(/5 characters/);
		const zero = readScannedText('NM-4K0QX', 'typed');
		expect(zero).toMatchObject({ ok: false, problem: 'format' });
		if (!zero.ok) expect(zero.message).toMatch(/zero/);
	});

	it('treats arbitrary text from a decoder as someone else’s QR code', () => {
		for (const text of ['WIFI:S:Shop;T:WPA;P:secret;;', 'Hello, world', 'Order 1234567890']) {
			expect(readScannedText(text, 'camera')).toMatchObject({
				ok: false,
				problem: 'not-nestmark'
			});
		}
		// but a code-shaped misread is still reported as a code problem
		expect(readScannedText(typo, 'photo')).toMatchObject({ ok: false, problem: 'check' });
	});
});
