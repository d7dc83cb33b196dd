/**
 * The generated access test: every page, form action and endpoint method found in src/routes is
 * asked for by nobody and by each of the five demo roles, through real HTTP against the built app,
 * and each answer is checked against the route table (src/lib/server/route-access.ts) and the
 * permission table (src/lib/permissions.ts): 401 JSON from the API and the sign-in redirect from
 * pages for nobody, 403 for a role the table refuses, the route's own answer for the others.
 * A route added without a table entry fails here. Requests that change data carry an empty body,
 * so the allowed ones stop at validation (400) and nothing in the test database changes.
 */
import {
	expect,
	test,
	type APIRequestContext,
	type APIResponse,
	type PlaywrightWorkerArgs
} from '@playwright/test';
import { randomUUID } from 'node:crypto';
import { can } from '../../../src/lib/permissions';
import { ROLES, type Role } from '../../../src/lib/schemas/roles';
import { ROUTE_ACCESS, type Access } from '../../../src/lib/server/route-access';
import { demoAccount } from '../helpers/auth';
import { discoverRoutes, routePath, type HttpMethod } from '../helpers/route-tree';

type Playwright = PlaywrightWorkerArgs['playwright'];
type Who = 'nobody' | Role;
const WHO: Who[] = ['nobody', ...ROLES];

/** One thing to ask for: a page (GET), a form action (POST) or an endpoint's method. */
interface Probe {
	/** How the table and the expectations below name it. */
	key: string;
	routeId: string;
	method: HttpMethod;
	/** For form actions: the name ('default' for the unnamed one). */
	action?: string;
	/** Whether it is a page or action (else an endpoint). */
	page: boolean;
	access: Access | undefined;
}

const routes = discoverRoutes();

const probes: Probe[] = routes.flatMap((r): Probe[] => {
	const rule = ROUTE_ACCESS[r.routeId];
	if (r.kind === 'endpoint') {
		return r.methods.map((method) => ({
			key: `${method} ${r.routeId}`,
			routeId: r.routeId,
			method,
			page: false,
			access: rule?.methods?.[method]
		}));
	}
	return [
		{ key: `GET ${r.routeId}`, routeId: r.routeId, method: 'GET', page: true, access: rule?.page },
		...r.actions.map((action) => ({
			key: `POST ${r.routeId} ?/${action}`,
			routeId: r.routeId,
			method: 'POST' as const,
			action,
			page: true,
			access: rule?.actions?.[action]
		}))
	];
});

/**
 * What each route answers someone it lets in, when the status is known: pages 200, and the
 * empty bodies refused by validation with 400. A function answers per person.
 */
const ANSWER: Record<string, number | ((who: Who) => number)> = {
	'GET /': (who) => (who === 'nobody' ? 200 : 303),
	'GET /(auth)/signin': (who) => (who === 'nobody' ? 200 : 303),
	// Refused, the form is shown again, and its load sends a signed-in person on.
	'POST /(auth)/signin ?/password': (who) => (who === 'nobody' ? 400 : 303),
	'POST /(auth)/signin ?/link': (who) => (who === 'nobody' ? 400 : 303),
	'GET /(auth)/signin/check-mail': 200,
	'GET /(auth)/signout': 200,
	'POST /(auth)/signout ?/default': 303,
	'GET /(app)/account': 200,
	'POST /(app)/account ?/password': 400,
	'GET /(app)/outbox': 200,
	'GET /(app)/scan': 200,
	'GET /(app)/f/[code]': 200,
	'GET /(app)/f/[code]/break-in': 200,
	'GET /(app)/fixtures': 200,
	'GET /(app)/fixtures/[code=code]': 200,
	'GET /(app)/fixtures/export.csv': 200,
	'GET /(app)/fixtures/new': 200,
	'POST /(app)/fixtures/new ?/default': 400,
	'GET /(app)/fixtures/[code=code]/edit': 200,
	'POST /(app)/fixtures/[code=code]/edit ?/default': 400,
	'GET /(app)/fixtures/import': 200,
	'POST /(app)/fixtures/import ?/preview': 400,
	'POST /(app)/fixtures/import ?/commit': 400,
	'GET /(app)/fixtures/[code=code]/geometry': 200,
	'POST /(app)/fixtures/[code=code]/geometry ?/check': 400,
	'POST /(app)/fixtures/[code=code]/geometry ?/save': 400,
	'GET /(app)/labels': 200,
	'GET /(app)/board': 200,
	'GET /(app)/my-work': 308,
	'GET /(app)/work': 200,
	'GET /(app)/policies': 200,
	'POST /(app)/policies ?/saveType': 400,
	'POST /(app)/policies ?/saveOverrides': 400,
	'GET /(app)/board/report': 200,
	'GET /(app)/board/report.pdf': 200,
	'GET /(app)/plan': 200,
	'POST /(app)/plan ?/assign': 400,
	'POST /(app)/plan ?/reschedule': 400,
	'POST /(app)/plan ?/fromFlag': 400,
	'GET /(app)/plan/new': 200,
	'POST /(app)/plan/new ?/default': 400,
	'GET /(app)/plan/calendar': 200,
	'POST /(app)/plan/calendar ?/move': 400,
	// The probe's id is no work order's number: the page and its actions answer "not found".
	'GET /(app)/plan/[id]': 404,
	'POST /(app)/plan/[id] ?/save': 404,
	'POST /(app)/plan/[id] ?/status': 404,
	'GET /(admin)/admin/users': 200,
	'POST /(admin)/admin/users ?/invite': 400,
	'POST /(admin)/admin/users ?/roles': 400,
	'POST /(admin)/admin/users ?/deactivate': 400,
	'POST /(admin)/admin/users ?/reactivate': 400,
	'POST /(admin)/admin/users ?/resend': 400,
	'GET /(admin)/admin/mail': 200,
	'GET /(admin)/admin/office': 200,
	'POST /(admin)/admin/office ?/save': 400,
	'GET /api/health': 200,
	'GET /api/fixtures': 200,
	'POST /api/fixtures': 400,
	'GET /api/fixtures/[code]': 200,
	'PATCH /api/fixtures/[code]': 400,
	'GET /api/fixtures/[code]/events': 200,
	'GET /api/fixtures/[code]/health': 200,
	'GET /api/flags': 200,
	'GET /api/fleet/summary': 200,
	'GET /api/fleet/trends': 200,
	// Operators pass the table (they read the register) and are refused by the handler.
	'GET /api/work-orders': (who) => (who === 'operator' ? 403 : 200),
	'POST /api/work-orders': 400,
	// No work order has this id (a UUID, not a number).
	'GET /api/work-orders/[id]': (who) => (who === 'operator' ? 403 : 404),
	'PATCH /api/work-orders/[id]': 400,
	'GET /api/register-snapshot': 200,
	'POST /api/sync': 400,
	// No photo has this id: the answer after the guard is "not found".
	'GET /api/attachments/[id]': 404,
	'PUT /api/attachments/[id]': 400,
	'GET /api/attachments/[id]/thumb': 404,
	// No codes, area or all: the label settings are refused.
	'GET /api/labels.pdf': 400
};

/** Form actions that end the session they are sent with: each person signs in afresh for them. */
const ENDS_SESSION = new Set(['POST /(auth)/signout ?/default']);

/** Signs a fresh API context in with e-mail and password, as the sign-in form does. */
async function signedIn(playwright: Playwright, baseURL: string, role: Role) {
	const account = demoAccount(role);
	const api = await playwright.request.newContext({ baseURL });
	const res = await api.post('/auth/callback/credentials', {
		headers: { origin: baseURL },
		form: { email: account.email, password: account.password, redirectTo: '/' },
		maxRedirects: 0
	});
	expect(res.status(), `sign-in of the ${role}`).toBeLessThan(400);
	const { cookies } = await api.storageState();
	expect(
		cookies.some((c) => /session-token/.test(c.name)),
		`a session for the ${role}`
	).toBe(true);
	return api;
}

let contexts = new Map<Who, APIRequestContext>();
let params: Record<string, string> = {};

test.beforeAll(async ({ playwright, baseURL }) => {
	const base = baseURL!;
	contexts = new Map([['nobody', await playwright.request.newContext({ baseURL: base })]]);
	for (const role of ROLES) contexts.set(role, await signedIn(playwright, base, role));
	// A real fixture of the demo register, and a photo id nobody has used.
	const list = await contexts.get('admin')!.get('/api/fixtures?pageSize=1');
	expect(list.status()).toBe(200);
	const { items } = (await list.json()) as { items: { code: string }[] };
	expect(items.length, 'the demo register has fixtures').toBeGreaterThan(0);
	params = { code: items[0].code, id: randomUUID() };
});

test.afterAll(async () => {
	await Promise.all([...contexts.values()].map((c) => c.dispose()));
	contexts = new Map();
});

/** Sends the probe with an empty body where it has one; never follows a redirect. */
function send(api: APIRequestContext, probe: Probe, baseURL: string): Promise<APIResponse> {
	const path = routePath(probe.routeId, params);
	const url = probe.action && probe.action !== 'default' ? `${path}?/${probe.action}` : path;
	// As a browser asks: without text/html, SvelteKit answers a form post as `use:enhance` would
	// (JSON, always 200).
	const headers = { origin: baseURL, accept: probe.page ? 'text/html' : 'application/json' };
	const options = { maxRedirects: 0, headers };
	if (probe.method === 'GET') return api.get(url, options);
	// Form actions get an empty form; the API an empty body.
	if (probe.page) return api.post(url, { ...options, form: {} });
	return api.fetch(url, { ...options, method: probe.method });
}

/** Whether the table lets `who` through to the route's own code. */
function lets(access: Access, who: Who): boolean {
	if (access === 'public') return true;
	if (who === 'nobody') return false;
	return access === 'signed-in' || can({ roles: [who] }, access);
}

test('every route in src/routes has an entry in the route table', () => {
	const missing = probes.filter((p) => !p.access).map((p) => p.key);
	expect(missing, 'add these to ROUTE_ACCESS in src/lib/server/route-access.ts').toEqual([]);
	// Each has a known answer here too, so the checks below are exact.
	expect(probes.filter((p) => !(p.key in ANSWER)).map((p) => p.key)).toEqual([]);
});

for (const probe of probes) {
	test(`${probe.key}`, async ({ playwright, baseURL }) => {
		const base = baseURL!;
		expect(probe.access, `${probe.key} is in the route table`).toBeTruthy();
		const access = probe.access!;
		const api = !probe.page && probe.routeId.startsWith('/api/');
		const path = routePath(probe.routeId, params);
		for (const who of WHO) {
			const fresh = ENDS_SESSION.has(probe.key) && who !== 'nobody';
			const context = fresh ? await signedIn(playwright, base, who) : contexts.get(who)!;
			try {
				const res = await send(context, probe, base);
				const status = res.status();
				const what = `${probe.key} as ${who} (${access})`;
				if (lets(access, who)) {
					const answer = ANSWER[probe.key];
					const expected = typeof answer === 'function' ? answer(who) : answer;
					expect(status, what).toBe(expected);
				} else if (who === 'nobody' && api) {
					expect(status, what).toBe(401);
					expect(res.headers()['content-type'], what).toMatch(/^application\/json/);
					expect(await res.json(), what).toEqual({ error: 'Not signed in.' });
				} else if (who === 'nobody') {
					expect(status, what).toBe(303);
					const next =
						path + (probe.action && probe.action !== 'default' ? `?/${probe.action}` : '');
					expect(res.headers().location, what).toBe(`/signin?next=${encodeURIComponent(next)}`);
				} else {
					expect(status, what).toBe(403);
					if (api) {
						expect(await res.json(), what).toEqual({ error: expect.stringMatching(/role/) });
					}
				}
			} finally {
				if (fresh) await context.dispose();
			}
		}
	});
}
