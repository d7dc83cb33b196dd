import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { json } from '@sveltejs/kit';
import { describe, expect, it } from 'vitest';
import config, { ANNOUNCER_STYLE_HASH, SVELTE_EVENT_REPLAY_HASH } from '../../../svelte.config.js';
import {
	DEFAULT_CACHE_CONTROL,
	JSON_CSP,
	SECURITY_HEADERS,
	withSecurityHeaders
} from './security-headers';

describe('withSecurityHeaders', () => {
	it('adds every header, private no-store caching, and the JSON policy to a JSON answer', () => {
		const res = withSecurityHeaders(json({ ok: true }));
		for (const [name, value] of Object.entries(SECURITY_HEADERS)) {
			expect(res.headers.get(name)).toBe(value);
		}
		expect(res.headers.get('cache-control')).toBe(DEFAULT_CACHE_CONTROL);
		expect(res.headers.get('content-security-policy')).toBe(JSON_CSP);
	});

	it('keeps the caching and policy an answer set itself', () => {
		const res = withSecurityHeaders(
			new Response('x', {
				headers: {
					'content-type': 'image/png',
					'cache-control': 'private, max-age=31536000, immutable',
					'content-security-policy': "default-src 'none'; sandbox"
				}
			})
		);
		expect(res.headers.get('cache-control')).toBe('private, max-age=31536000, immutable');
		expect(res.headers.get('content-security-policy')).toBe("default-src 'none'; sandbox");
		expect(res.headers.get('x-content-type-options')).toBe('nosniff');
	});

	it('leaves the page policy to SvelteKit: an HTML answer gets no JSON policy', () => {
		const res = withSecurityHeaders(
			new Response('<p>hi</p>', { headers: { 'content-type': 'text/html' } })
		);
		expect(res.headers.get('content-security-policy')).toBeNull();
		expect(res.headers.get('x-frame-options')).toBe('DENY');
	});

	it('copies an answer whose headers cannot change', async () => {
		const redirect = Response.redirect('http://127.0.0.1/signin', 303);
		expect(() => redirect.headers.set('x-test', '1')).toThrow();
		const res = withSecurityHeaders(redirect);
		expect(res.status).toBe(303);
		expect(res.headers.get('location')).toBe('http://127.0.0.1/signin');
		expect(res.headers.get('x-content-type-options')).toBe('nosniff');
	});

	it('asks for the camera on this origin only, and for nothing else', () => {
		const policy = SECURITY_HEADERS['Permissions-Policy'].split(', ');
		expect(policy).toContain('camera=(self)');
		expect(policy.filter((p) => !p.endsWith('=()'))).toEqual(['camera=(self)']);
	});
});

describe('the page policy in svelte.config.js', () => {
	const directives = config.kit?.csp?.directives ?? {};

	it('allows no inline script and no eval', () => {
		expect(directives['script-src']).toEqual(['self']);
		expect(directives['style-src']).toEqual(['self']);
	});

	const require = createRequire(import.meta.url);
	/** A source file of an installed package. */
	const sourceOf = (pkg: string, file: string) =>
		readFileSync(join(dirname(require.resolve(`${pkg}/package.json`)), file), 'utf8');
	const sha256 = (text: string) => `sha256-${createHash('sha256').update(text).digest('base64')}`;

	it('lets exactly the style of SvelteKit’s route announcer through, by hash', () => {
		// The installed SvelteKit's generated root component, where the announcer is written.
		const source = sourceOf('@sveltejs/kit', 'src/core/sync/write_root.js');
		const style = /id="svelte-announcer"[^>]*\sstyle="([^"]+)"/.exec(source)?.[1];
		expect(style, 'SvelteKit still writes a style="" on its announcer').toBeTruthy();
		expect(sha256(style!)).toBe(ANNOUNCER_STYLE_HASH);
		expect(directives['style-src-attr']).toEqual(['unsafe-hashes', ANNOUNCER_STYLE_HASH]);
	});

	it('lets exactly Svelte’s load/error replay handler run, by hash, and no other inline handler', () => {
		// What the installed Svelte compiler writes into server-rendered elements with onload/onerror.
		const source = sourceOf(
			'svelte',
			'src/compiler/phases/3-transform/server/visitors/shared/element.js'
		);
		const handler = /\$\{event\}="([^"]+)"/.exec(source)?.[1];
		expect(handler).toBe('this.__e=event');
		expect(sha256(handler!)).toBe(SVELTE_EVENT_REPLAY_HASH);
		expect(directives['script-src-attr']).toEqual(['unsafe-hashes', SVELTE_EVENT_REPLAY_HASH]);
	});
});
