import js from '@eslint/js';
import prettier from 'eslint-config-prettier';
import svelte from 'eslint-plugin-svelte';
import globals from 'globals';
import ts from 'typescript-eslint';
import svelteConfig from './svelte.config.js';

export default ts.config(
	js.configs.recommended,
	...ts.configs.recommended,
	...svelte.configs.recommended,
	prettier,
	...svelte.configs.prettier,
	{
		languageOptions: { globals: { ...globals.browser, ...globals.node } },
		rules: {
			// TypeScript already reports undefined names, with better messages.
			'no-undef': 'off',
			// The app has no base path, so plain hrefs are correct; resolve() would only add noise.
			'svelte/no-navigation-without-resolve': 'off',
			'@typescript-eslint/no-unused-vars': [
				'error',
				{ argsIgnorePattern: '^_', varsIgnorePattern: '^_' }
			]
		}
	},
	{
		files: ['**/*.svelte', '**/*.svelte.ts', '**/*.svelte.js'],
		languageOptions: {
			parserOptions: {
				projectService: true,
				extraFileExtensions: ['.svelte'],
				parser: ts.parser,
				svelteConfig
			}
		},
		rules: {
			// Components never depend on the server layer, not even for a type (lint:layers checks
			// the rest of the layering; it cannot see type-only imports inside .svelte files).
			'no-restricted-imports': [
				'error',
				{
					patterns: [
						{
							group: ['$lib/server', '$lib/server/*'],
							message:
								'Components import types from $lib/domain or $lib/schemas, never from $lib/server.'
						}
					]
				}
			]
		}
	},
	{
		ignores: [
			'build/',
			'.svelte-kit/',
			'.data/',
			'drizzle/',
			'node_modules/',
			'test-results/',
			'playwright-report/',
			'dev-dist/'
		]
	}
);
