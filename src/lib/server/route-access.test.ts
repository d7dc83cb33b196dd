import { describe, expect, it } from 'vitest';
import {
	discoverRoutes,
	formActions,
	endpointMethods
} from '../../../tests/e2e/helpers/route-tree';
import { ROUTE_ACCESS, accessFor, actionName, isAccess } from './route-access';

const url = (path: string) => new URL(path, 'http://127.0.0.1');

describe('the route table', () => {
	const routes = discoverRoutes();

	it('finds the route tree (pages, actions and endpoints)', () => {
		expect(routes.find((r) => r.routeId === '/api/sync')).toEqual({
			kind: 'endpoint',
			routeId: '/api/sync',
			methods: ['POST']
		});
		expect(routes.find((r) => r.routeId === '/(app)/fixtures/import')).toEqual({
			kind: 'page',
			routeId: '/(app)/fixtures/import',
			actions: ['preview', 'commit']
		});
		expect(routes.find((r) => r.routeId === '/')).toEqual({
			kind: 'page',
			routeId: '/',
			actions: []
		});
	});

	it('has an entry for every page, form action and endpoint method in src/routes', () => {
		const missing: string[] = [];
		for (const route of routes) {
			const rule = ROUTE_ACCESS[route.routeId];
			if (route.kind === 'page') {
				if (!rule?.page) missing.push(`page ${route.routeId}`);
				for (const a of route.actions) {
					if (!rule?.actions?.[a]) missing.push(`action ${route.routeId} ?/${a}`);
				}
			} else {
				for (const m of route.methods) {
					if (!rule?.methods?.[m]) missing.push(`${m} ${route.routeId}`);
				}
			}
		}
		expect(missing).toEqual([]);
	});

	it('has no entry for a route, action or method that does not exist', () => {
		const stale: string[] = [];
		for (const [routeId, rule] of Object.entries(ROUTE_ACCESS)) {
			const page = routes.find((r) => r.kind === 'page' && r.routeId === routeId);
			const endpoint = routes.find((r) => r.kind === 'endpoint' && r.routeId === routeId);
			if (rule.page && !page) stale.push(`page ${routeId}`);
			for (const a of Object.keys(rule.actions ?? {})) {
				if (page?.kind !== 'page' || !page.actions.includes(a))
					stale.push(`action ${routeId} ${a}`);
			}
			for (const m of Object.keys(rule.methods ?? {})) {
				if (endpoint?.kind !== 'endpoint' || !(endpoint.methods as string[]).includes(m)) {
					stale.push(`${m} ${routeId}`);
				}
			}
		}
		expect(stale).toEqual([]);
	});

	it('uses only known access levels', () => {
		for (const rule of Object.values(ROUTE_ACCESS)) {
			const levels = [
				rule.page,
				...Object.values(rule.actions ?? {}),
				...Object.values(rule.methods ?? {})
			].filter((x) => x !== undefined);
			for (const level of levels) expect(isAccess(level), level).toBe(true);
		}
		expect(isAccess('fixture.edit')).toBe(true);
		expect(isAccess('fixture.delete')).toBe(false);
	});
});

describe('accessFor', () => {
	it('reads a page, its named and default actions, and HEAD as GET', () => {
		expect(accessFor('/(app)/fixtures/import', 'GET', url('/fixtures/import'))).toBe(
			'fixture.edit'
		);
		expect(accessFor('/(app)/policies', 'POST', url('/policies?/saveType'))).toBe('policy.edit');
		expect(accessFor('/(auth)/signout', 'POST', url('/signout'))).toBe('public');
		expect(accessFor('/(admin)/admin/users', 'HEAD', url('/admin/users'))).toBe('user.admin');
		expect(accessFor('/(app)/account', 'POST', url('/account?/password'))).toBe('signed-in');
	});

	it('judges an action the page lacks like the page itself', () => {
		expect(accessFor('/(admin)/admin/users', 'POST', url('/admin/users?/nothing'))).toBe(
			'user.admin'
		);
		expect(accessFor('/(admin)/admin/users', 'PUT', url('/admin/users'))).toBe('user.admin');
		expect(accessFor('/(auth)/signin', 'POST', url('/signin?/nothing'))).toBe('public');
	});

	it('reads an endpoint by method; a method it lacks needs a session unless its GET is public', () => {
		expect(accessFor('/api/fixtures', 'GET', url('/api/fixtures'))).toBe('fixture.view');
		expect(accessFor('/api/fixtures', 'POST', url('/api/fixtures'))).toBe('fixture.edit');
		expect(accessFor('/api/fixtures', 'DELETE', url('/api/fixtures'))).toBe('signed-in');
		expect(accessFor('/api/sync', 'DELETE', url('/api/sync'))).toBe('signed-in');
		expect(accessFor('/api/health', 'HEAD', url('/api/health'))).toBe('public');
		expect(accessFor('/api/health', 'POST', url('/api/health'))).toBe('public');
		expect(accessFor('/api/labels.pdf', 'GET', url('/api/labels.pdf'))).toBe('label.print');
	});

	it('has nothing for a route missing from the table', () => {
		expect(accessFor('/(app)/nowhere', 'GET', url('/nowhere'))).toBeNull();
	});

	it('reads the action name as SvelteKit does', () => {
		expect(actionName(url('/x'))).toBe('default');
		expect(actionName(url('/x?/save'))).toBe('save');
		expect(actionName(url('/x?fixture=A&/saveOverrides'))).toBe('saveOverrides');
	});
});

describe('reading the route files', () => {
	it('finds exported handlers however they are declared', () => {
		const source = [
			'export const GET: RequestHandler = async () => json(1);',
			'export async function POST() {}',
			'const patch = () => new Response();',
			'export { patch as PATCH };',
			'// export const DELETE: a handler commented out is not one',
			'/* export const PUT = 1; */'
		].join('\n');
		expect(endpointMethods(source)).toEqual(['GET', 'POST', 'PATCH']);
		expect(() => endpointMethods('export const fallback = () => 1;')).toThrow(/fallback/);
	});

	it('finds the keys of the actions object', () => {
		const source = [
			"import x from 'y';",
			'export const actions: Actions = {',
			'\t/** Doc. */',
			'\tsave: async ({ request }) => {',
			'\t\tconst inner = { nested: 1 };',
			'\t},',
			'\tasync remove(event) {',
			'\t\treturn;',
			'\t},',
			'\tdefault: async () => {}',
			'};',
			'const after = { notAnAction: 1 };'
		].join('\n');
		expect(formActions(source)).toEqual(['save', 'remove', 'default']);
		expect(formActions('export const load = () => ({});')).toEqual([]);
	});
});
