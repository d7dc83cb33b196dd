import adapter from '@sveltejs/adapter-node';
import { vitePreprocess } from '@sveltejs/vite-plugin-svelte';

/** sha256 of the style="" on SvelteKit's route announcer (.svelte-kit/generated/root.svelte). */
export const ANNOUNCER_STYLE_HASH = 'sha256-S8qMpvofolR8Mpjy4kQvEm7m1q8clzU4dfDH0AmvZjo=';

/**
 * sha256 of `this.__e=event`: the onload/onerror attribute Svelte renders on the server for an
 * element with a load or error handler (our photo thumbnails), so an event that fires before
 * hydration is replayed after it.
 */
export const SVELTE_EVENT_REPLAY_HASH = 'sha256-7dQwUgLau1NFCCGjfn9FsYptB6ZtWxJin6VohGIu20I=';

/** @type {import('@sveltejs/kit').Config} */
const config = {
	preprocess: vitePreprocess(),
	compilerOptions: { runes: true },
	kit: {
		adapter: adapter({ out: 'build' }),
		// The service worker is produced by @vite-pwa/sveltekit, not by SvelteKit.
		serviceWorker: { register: false },
		// Content-Security-Policy on every page SvelteKit renders: a fresh nonce per answer for its
		// inline start-up script (hashes for prerendered pages), so no inline script runs without
		// one. What each source is for, and how to add one: DEVELOPERS.md, "Content-Security-Policy".
		csp: {
			mode: 'auto',
			directives: {
				'default-src': ['self'],
				'script-src': ['self'],
				// Inline event handlers: only Svelte's own load/error replay, by hash.
				'script-src-attr': ['unsafe-hashes', SVELTE_EVENT_REPLAY_HASH],
				// No inline styles at all: Svelte 5 animates with the Web Animations API, chart.js and
				// html5-qrcode style their elements through the CSSOM, and our markup has no style="".
				'style-src': ['self'],
				// One exception, by hash: SvelteKit's own route announcer (a visually hidden live region
				// it adds after the first navigation) carries a fixed style="" (sveltejs/kit#11993).
				// 'unsafe-hashes' lets exactly that attribute value through, and no other.
				// security-headers.test.ts checks the hash against the installed SvelteKit.
				'style-src-attr': ['unsafe-hashes', ANNOUNCER_STYLE_HASH],
				// Photo previews on the phone are blob: URLs; data: images are inert (an <img> runs no
				// script) and some libraries draw small icons with them.
				'img-src': ['self', 'blob:', 'data:'],
				// The app's own fonts only (bundled by @fontsource, precached by the worker).
				'font-src': ['self'],
				// fetch: the sync loop, the register copy, photo uploads.
				'connect-src': ['self'],
				// The service worker, at /sw.js.
				'worker-src': ['self'],
				'manifest-src': ['self'],
				'object-src': ['none'],
				'base-uri': ['self'],
				'form-action': ['self'],
				'frame-ancestors': ['none']
			}
		}
	}
};

export default config;
