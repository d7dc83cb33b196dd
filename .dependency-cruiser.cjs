/**
 * The layers of src/, checked by `npm run lint:layers` (dependency-cruiser). Each rule names the
 * direction imports may take; type-only imports count too (tsPreCompilationDeps), because a type
 * import is still a dependency on the layer that declares it.
 * @type {import('dependency-cruiser').IConfiguration}
 */
module.exports = {
	forbidden: [
		{
			name: 'no-circular',
			severity: 'error',
			comment: 'No import loop anywhere under src: a loop hides which module is the lower layer.',
			from: { path: '^src/' },
			to: { circular: true }
		},
		{
			name: 'domain-imports-only-domain',
			severity: 'error',
			comment:
				'$lib/domain is the bottom layer: plain computation and constants, importing nothing outside itself.',
			from: { path: '^src/lib/domain/' },
			to: { pathNot: ['^src/lib/domain/'], dependencyTypesNot: ['core'] }
		},
		{
			name: 'database-only-from-server-and-server-routes',
			severity: 'error',
			comment:
				'Only $lib/server and server-side route files (+page.server.ts, +layout.server.ts, +server.ts, hooks.server.ts) reach the database.',
			from: {
				pathNot: [
					'^src/lib/server/',
					'^src/routes/.*[+](page|layout)[.]server[.]ts$',
					'^src/routes/.*[+]server[.]ts$',
					'^src/hooks[.]server[.]ts$',
					'^tests/',
					'^scripts/'
				]
			},
			to: { path: '^src/lib/server/db/' }
		},
		{
			name: 'components-never-import-server',
			severity: 'error',
			comment:
				'Components and browser state (*.svelte, *.svelte.ts, $lib/components, $lib/client) import nothing from $lib/server.',
			from: {
				path: ['[.]svelte$', '[.]svelte[.]ts$', '^src/lib/components/', '^src/lib/client/']
			},
			to: { path: '^src/lib/server/' }
		}
	],
	options: {
		doNotFollow: { path: 'node_modules' },
		exclude: { path: ['^[.]svelte-kit/', '^build/', 'node_modules'] },
		tsPreCompilationDeps: true,
		// $lib and $lib/* as SvelteKit defines them (its generated tsconfig has no baseUrl).
		tsConfig: { fileName: 'tsconfig.depcruise.json' },
		enhancedResolveOptions: {
			exportsFields: ['exports'],
			conditionNames: ['import', 'require', 'node', 'default', 'types', 'svelte'],
			extensions: ['.ts', '.js', '.svelte', '.json']
		},
		reporterOptions: { text: { highlightFocused: true } }
	}
};
