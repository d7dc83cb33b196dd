/**
 * Reads the route tree from src/routes the way SvelteKit builds it: every page (+page.svelte or
 * +page.server.ts) with its form actions, and every endpoint (+server.ts) with its methods. The
 * access test (tests/e2e/auth/access.spec.ts) and the route table's unit test use it to find
 * routes that the table (src/lib/server/route-access.ts) does not cover.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join, relative, resolve, sep } from 'node:path';

export const HTTP_METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;
export type HttpMethod = (typeof HTTP_METHODS)[number];

export type DiscoveredRoute =
	| { kind: 'page'; routeId: string; actions: string[] }
	| { kind: 'endpoint'; routeId: string; methods: HttpMethod[] };

/** The source without comments (a handler commented out is not a handler). */
const code = (source: string) =>
	source.replace(/\/\*[\s\S]*?\*\//g, '').replace(/^\s*\/\/.*$/gm, '');

/** The exported request handlers of a +server.ts. */
export function endpointMethods(text: string): HttpMethod[] {
	const source = code(text);
	const found = new Set<string>();
	const declared =
		/export\s+(?:const|let|async\s+function|function)\s+(GET|POST|PUT|PATCH|DELETE|HEAD|OPTIONS|fallback)\b/g;
	for (const m of source.matchAll(declared)) found.add(m[1]);
	for (const m of source.matchAll(/export\s*\{([^}]*)\}/g)) {
		for (const part of m[1].split(',')) {
			const name = part
				.trim()
				.split(/\s+as\s+/)
				.pop();
			if (name) found.add(name);
		}
	}
	const unknown = [...found].filter(
		(m) => /^[A-Z]+$|^fallback$/.test(m) && !(HTTP_METHODS as readonly string[]).includes(m)
	);
	// HEAD, OPTIONS and fallback handlers are not in the table's vocabulary yet: say so loudly.
	if (unknown.length) throw new Error(`unsupported handler(s) ${unknown.join(', ')}`);
	return HTTP_METHODS.filter((m) => found.has(m));
}

/** The names of the form actions a +page.server.ts exports (its `actions` object's keys). */
export function formActions(text: string): string[] {
	const source = code(text);
	const start = source.search(/export\s+const\s+actions\b/);
	if (start < 0) return [];
	const body = source.slice(start);
	const end = body.search(/^\};?\s*$/m);
	const block = end < 0 ? body : body.slice(0, end);
	// Prettier's layout: each action is a key at one tab's depth inside the object.
	return [...block.matchAll(/^\t(?:async\s+)?([A-Za-z_$][\w$]*)\s*[:(]/gm)].map((m) => m[1]);
}

/** Every route under `root` (default: the project's src/routes). */
export function discoverRoutes(root = resolve('src/routes')): DiscoveredRoute[] {
	const routes: DiscoveredRoute[] = [];
	const walk = (dir: string) => {
		const rel = relative(root, dir).split(sep).join('/');
		const routeId = rel ? `/${rel}` : '/';
		const has = (name: string) => existsSync(join(dir, name));
		if (has('+page.svelte') || has('+page.server.ts')) {
			const server = join(dir, '+page.server.ts');
			routes.push({
				kind: 'page',
				routeId,
				actions: existsSync(server) ? formActions(readFileSync(server, 'utf8')) : []
			});
		}
		if (has('+server.ts')) {
			routes.push({
				kind: 'endpoint',
				routeId,
				methods: endpointMethods(readFileSync(join(dir, '+server.ts'), 'utf8'))
			});
		}
		for (const entry of readdirSync(dir, { withFileTypes: true })) {
			if (entry.isDirectory()) walk(join(dir, entry.name));
		}
	};
	walk(root);
	return routes.sort((a, b) => a.routeId.localeCompare(b.routeId));
}

/** The address of a route: groups dropped, each `[param]` / `[param=matcher]` filled from `params`. */
export function routePath(routeId: string, params: Record<string, string>): string {
	const segments = routeId
		.split('/')
		.filter((s) => s && !/^\(.*\)$/.test(s))
		.map((s) =>
			s.replace(/\[([A-Za-z_]\w*)(?:=\w+)?\]/g, (_, name: string) => {
				const value = params[name];
				if (value === undefined) throw new Error(`no value for the route parameter ${name}`);
				return encodeURIComponent(value);
			})
		);
	return `/${segments.join('/')}`;
}
