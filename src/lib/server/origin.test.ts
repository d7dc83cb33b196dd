import { afterEach, describe, expect, it } from 'vitest';
import {
	isHttpUrl,
	pinOriginHeaders,
	publicOrigin,
	sameOriginRedirect,
	withoutBadCallbackCookies
} from './origin';

const ORIGIN = 'https://nestmark.larchmere.example';
const saved = { origin: process.env.ORIGIN, env: process.env.NESTMARK_ENV };
afterEach(() => {
	for (const [key, value] of [
		['ORIGIN', saved.origin],
		['NESTMARK_ENV', saved.env]
	] as const) {
		if (value === undefined) delete process.env[key];
		else process.env[key] = value;
	}
});

describe('publicOrigin', () => {
	it('takes ORIGIN, scheme, host and port only', () => {
		process.env.ORIGIN = 'https://nestmark.larchmere.example:8443/some/path';
		expect(publicOrigin('http://evil.example')).toBe('https://nestmark.larchmere.example:8443');
	});

	it('falls back to the request only in development and test', () => {
		delete process.env.ORIGIN;
		process.env.NESTMARK_ENV = 'development';
		expect(publicOrigin('http://127.0.0.1:5173/x')).toBe('http://127.0.0.1:5173');
		process.env.NESTMARK_ENV = 'production';
		expect(() => publicOrigin('http://evil.example')).toThrow(/ORIGIN is not set/);
	});
});

describe('pinOriginHeaders', () => {
	it('replaces forged Host and X-Forwarded-* headers with the origin', () => {
		const headers = new Headers({
			host: 'evil.example',
			'x-forwarded-host': 'evil.example',
			'x-forwarded-proto': 'http'
		});
		pinOriginHeaders(headers, ORIGIN);
		expect(headers.get('x-forwarded-host')).toBe('nestmark.larchmere.example');
		expect(headers.get('host')).toBe('nestmark.larchmere.example');
		expect(headers.get('x-forwarded-proto')).toBe('https');
	});
});

describe('sameOriginRedirect', () => {
	it('keeps paths and absolute URLs on the origin', () => {
		expect(sameOriginRedirect('/fixtures?q=NM#h', ORIGIN)).toBe(`${ORIGIN}/fixtures?q=NM#h`);
		expect(sameOriginRedirect(`${ORIGIN}/admin/users`, ORIGIN)).toBe(`${ORIGIN}/admin/users`);
	});

	it('sends anything else to the start page instead of throwing', () => {
		for (const raw of [
			'https://evil.example/x',
			'//evil.example/x',
			'/\\evil.example/x',
			'x',
			'http://[',
			'%E0%A4%A',
			'javascript:alert(1)',
			'',
			undefined
		]) {
			expect(sameOriginRedirect(raw, ORIGIN)).toBe(`${ORIGIN}/`);
		}
	});
});

describe('withoutBadCallbackCookies', () => {
	it('drops callback-url cookies that name no place on the site, and keeps the rest', () => {
		const session = 'authjs.session-token=abc.def';
		for (const bad of ['x', 'http://[', '%E0%A4%A', 'https%3A%2F%2Fevil.example%2F', '']) {
			const out = withoutBadCallbackCookies(`${session}; authjs.callback-url=${bad}`, ORIGIN);
			expect(out).toEqual({ header: session, dropped: ['authjs.callback-url'] });
		}
		const good = `${session}; __Secure-authjs.callback-url=${encodeURIComponent(`${ORIGIN}/x`)}`;
		expect(withoutBadCallbackCookies(good, ORIGIN)).toEqual({ header: good, dropped: [] });
	});
});

describe('isHttpUrl', () => {
	it('accepts paths and http(s) URLs, whatever their site, and nothing else', () => {
		expect(isHttpUrl('/x', ORIGIN)).toBe(true);
		expect(isHttpUrl('https://evil.example/', ORIGIN)).toBe(true);
		for (const bad of ['x', 'http://[', 'javascript:alert(1)', '']) {
			expect(isHttpUrl(bad, ORIGIN)).toBe(false);
		}
	});
});
