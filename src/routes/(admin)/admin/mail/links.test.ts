import { describe, expect, it } from 'vitest';
import { splitLinks } from './links';

describe('splitLinks', () => {
	it('keeps text without links as one part', () => {
		expect(splitLinks('No links here.')).toEqual([{ text: 'No links here.' }]);
	});

	it('turns a sign-in link with a query string into one link part', () => {
		const url =
			'http://127.0.0.1:3100/auth/callback/nodemailer?callbackUrl=%2F&token=ab12&email=a%40b.example';
		expect(splitLinks(`Sign in: ${url}\n`)).toEqual([
			{ text: 'Sign in: ' },
			{ text: url, href: url },
			{ text: '\n' }
		]);
	});

	it('leaves sentence punctuation after a link outside it', () => {
		expect(splitLinks('See https://example.org/a. Then (https://example.org/b).')).toEqual([
			{ text: 'See ' },
			{ text: 'https://example.org/a', href: 'https://example.org/a' },
			{ text: '. Then (' },
			{ text: 'https://example.org/b', href: 'https://example.org/b' },
			{ text: ').' }
		]);
	});

	it('does not link other schemes', () => {
		expect(splitLinks('javascript:alert(1) ftp://x')).toEqual([
			{ text: 'javascript:alert(1) ftp://x' }
		]);
	});
});
