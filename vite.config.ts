import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { SvelteKitPWA } from '@vite-pwa/sveltekit';
import { defineConfig } from 'vitest/config';

export default defineConfig({
	plugins: [
		tailwindcss(),
		sveltekit(),
		SvelteKitPWA({
			registerType: 'autoUpdate',
			// The root layout registers the worker (virtual:pwa-register) and links the manifest.
			injectRegister: false,
			// SvelteKit builds with relative paths (base './'), which would register `./sw.js` with
			// scope './' relative to the page: /fixtures/sw.js on a nested page, a 404, and a phone
			// whose first page is nested never gets the offline app. One worker for the whole site.
			base: '/',
			scope: '/',
			manifest: {
				id: '/',
				name: 'Nestmark',
				short_name: 'Nestmark',
				description: 'Scan a fixture’s label and log reseats, cleanings and notes, online or not.',
				start_url: '/scan',
				scope: '/',
				display: 'standalone',
				orientation: 'portrait',
				theme_color: '#14312b',
				background_color: '#f6f4ee',
				icons: [
					{ src: '/icon-192.png', sizes: '192x192', type: 'image/png', purpose: 'any' },
					{ src: '/icon-512.png', sizes: '512x512', type: 'image/png', purpose: 'any' },
					{
						src: '/icon-maskable-192.png',
						sizes: '192x192',
						type: 'image/png',
						purpose: 'maskable'
					},
					{
						src: '/icon-maskable-512.png',
						sizes: '512x512',
						type: 'image/png',
						purpose: 'maskable'
					}
				]
			},
			workbox: {
				// The app shell: client JS/CSS, icons and the fonts (the scanner chunk too, so scanning works offline).
				globPatterns: [
					'client/**/*.{js,css,ico,png,svg,webp,webmanifest,woff,woff2}',
					'prerendered/**/*.{html,json}'
				],
				maximumFileSizeToCacheInBytes: 3 * 1024 * 1024,
				// Pages are server-rendered, so there is no single fallback page to precache; pages are
				// cached as they are visited instead (below).
				navigateFallback: null,
				cleanupOutdatedCaches: true,
				clientsClaim: true,
				runtimeCaching: [
					{
						// The floor pages (start, scanner, my work, fixture cards and their break-in runs, outbox):
						// what must open with no network. Office pages always come from the server. (Functions here are copied
						// into the worker as source text, so they cannot refer to anything outside.)
						urlPattern: ({ request, url }) =>
							request.mode === 'navigate' &&
							/^\/($|scan$|outbox$|work$|f\/[^/]+(\/break-in)?$)/.test(url.pathname),
						handler: 'NetworkFirst',
						options: {
							cacheName: 'nestmark-pages',
							// Short, so a phone on a weak signal falls back to the cached page quickly.
							networkTimeoutSeconds: 3,
							expiration: { maxEntries: 200, maxAgeSeconds: 30 * 24 * 3600 },
							plugins: [
								{
									// Keep only real pages: a redirect (e.g. to sign-in) stored under the
									// page's URL would be refused by the browser on a later navigation.
									cacheWillUpdate: async ({ response }) =>
										response.status === 200 && !response.redirected ? response : null
								}
							]
						}
					}
				]
			},
			devOptions: { enabled: false }
		})
	],
	server: { host: '127.0.0.1' },
	test: {
		environment: 'node',
		testTimeout: 20_000,
		projects: [
			{
				// Pure code and services without I/O: files run in parallel.
				extends: true,
				test: { name: 'unit', include: ['src/**/*.test.ts'] }
			},
			{
				// Real MariaDB, S3 and mail fakes. The files share one test database: one at a time.
				extends: true,
				test: {
					name: 'integration',
					include: ['tests/integration/**/*.test.ts'],
					fileParallelism: false,
					globalSetup: ['tests/integration/setup/mail.ts'],
					setupFiles: ['tests/integration/setup/env.ts']
				}
			}
		]
	}
});
