import { sveltekit } from '@sveltejs/kit/vite';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vitest/config';

export default defineConfig({
	plugins: [tailwindcss(), sveltekit()],
	server: { host: '127.0.0.1' },
	test: {
		include: ['src/**/*.test.ts', 'tests/integration/**/*.test.ts'],
		environment: 'node',
		// Integration files share one test database; run files one at a time.
		fileParallelism: false,
		testTimeout: 20_000
	}
});
