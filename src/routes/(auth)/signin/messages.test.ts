import { describe, expect, it } from 'vitest';
import { noticeFor, refusalMessage, safeNext } from './messages';

const ORIGIN = 'http://127.0.0.1:3000';

describe('safeNext', () => {
	it('keeps a path on this site, with its query and hash', () => {
		expect(safeNext('/fixtures?q=NM-4K7Q#history', ORIGIN)).toBe('/fixtures?q=NM-4K7Q#history');
		expect(safeNext(`${ORIGIN}/admin/users`, ORIGIN)).toBe('/admin/users');
	});

	it('never leads to another host', () => {
		for (const evil of [
			'https://evil.example/x',
			'//evil.example/x',
			'/\\evil.example/x',
			'http://127.0.0.1:3001/x',
			'javascript:alert(1)'
		]) {
			expect(safeNext(evil, ORIGIN)).toBe('/');
		}
	});

	it('never leads back into the sign-in pages', () => {
		expect(safeNext('/signin?next=/x', ORIGIN)).toBe('/');
		expect(safeNext('/signout', ORIGIN)).toBe('/');
		expect(safeNext('/auth/signin', ORIGIN)).toBe('/');
		expect(safeNext('/signing-sheet', ORIGIN)).toBe('/signing-sheet');
	});

	it('falls back to the start page for nothing or non-text', () => {
		expect(safeNext(null, ORIGIN)).toBe('/');
		expect(safeNext('', ORIGIN)).toBe('/');
		expect(safeNext(42, ORIGIN)).toBe('/');
	});
});

describe('refusalMessage', () => {
	it('says the same for every wrong e-mail or password', () => {
		expect(refusalMessage('wrong')).toBe('E-mail or password is wrong.');
		expect(refusalMessage('credentials')).toBe('E-mail or password is wrong.');
		expect(refusalMessage(undefined)).toBe('E-mail or password is wrong.');
	});

	it('gives the minutes to wait when locked', () => {
		expect(refusalMessage('locked-15')).toMatch(/^Too many failed attempts\. Wait 15 minutes /);
		expect(refusalMessage('locked-1')).toMatch(/Wait 1 minute and/);
	});

	it('gives the seconds to wait when the account is delayed', () => {
		expect(refusalMessage('wait-30')).toMatch(/Wait 30 seconds and try again/);
		expect(refusalMessage('wait-1')).toMatch(/Wait 1 second and/);
	});

	it('names deactivation', () => {
		expect(refusalMessage('inactive')).toMatch(/deactivated/);
	});
});

describe('noticeFor', () => {
	it('reads Auth.js error codes from the address', () => {
		expect(noticeFor(new URLSearchParams('error=Verification'))?.text).toMatch(/expired/);
		expect(noticeFor(new URLSearchParams('error=CredentialsSignin&code=locked-3'))?.text).toMatch(
			/Wait 3 minutes/
		);
		expect(noticeFor(new URLSearchParams('error=Configuration'))?.tone).toBe('error');
		expect(noticeFor(new URLSearchParams('signedout=1'))).toEqual({
			tone: 'info',
			text: 'You have signed out.'
		});
		expect(noticeFor(new URLSearchParams(''))).toBeNull();
	});
});
