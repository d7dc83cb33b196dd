/**
 * The route table: who may reach each route (page, form action, endpoint method), keyed by
 * SvelteKit's route id. hooks.server.ts enforces it as the first line of the guard; the loads,
 * actions, endpoints and services check again with the same actions from $lib/permissions.
 * Every route needs an entry: a route without one is refused (and the access test fails).
 * Relative imports only, so the browser tests can read the table.
 */
import { ACTIONS, type Action } from '../permissions';

/** Who may reach a route: anyone, anyone signed in, or whoever may do the action. */
export type Access = 'public' | 'signed-in' | Action;

export const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;
export type Method = (typeof METHODS)[number];

/** A route's rule: a page with its form actions, or an endpoint (+server.ts) by method. */
export interface RouteRule {
	/** Who may open the page. */
	page?: Access;
	/** Who may post each form action ('default' for the unnamed one). */
	actions?: Readonly<Record<string, Access>>;
	/** Who may call each method of the endpoint. */
	methods?: Readonly<Partial<Record<Method, Access>>>;
}

export const ROUTE_ACCESS: Readonly<Record<string, RouteRule>> = {
	// Pages anyone may open: the landing page and signing in and out.
	'/': { page: 'public' },
	'/(auth)/signin': { page: 'public', actions: { password: 'public', link: 'public' } },
	'/(auth)/signin/check-mail': { page: 'public' },
	'/(auth)/signout': { page: 'public', actions: { default: 'public' } },

	// Everyone's own: the account and the device's outbox.
	'/(app)/account': { page: 'signed-in', actions: { password: 'signed-in' } },
	'/(app)/outbox': { page: 'signed-in' },

	// The floor: scanning and the fixture card (what a role may log is judged per kind).
	'/(app)/scan': { page: 'fixture.view' },
	'/(app)/f/[code]': { page: 'fixture.view' },
	'/(app)/f/[code]/break-in': { page: 'fixture.view' },

	// The register.
	'/(app)/fixtures': { page: 'fixture.view' },
	'/(app)/fixtures/[code=code]': { page: 'fixture.view' },
	'/(app)/fixtures/export.csv': { methods: { GET: 'fixture.view' } },
	'/(app)/fixtures/new': { page: 'fixture.edit', actions: { default: 'fixture.edit' } },
	'/(app)/fixtures/[code=code]/edit': {
		page: 'fixture.edit',
		actions: { default: 'fixture.edit' }
	},
	'/(app)/fixtures/import': {
		page: 'fixture.edit',
		actions: { preview: 'fixture.edit', commit: 'fixture.edit' }
	},
	'/(app)/fixtures/[code=code]/geometry': {
		page: 'geometry.edit',
		actions: { check: 'geometry.edit', save: 'geometry.edit' }
	},
	'/(app)/labels': { page: 'label.print' },
	// The fleet: the board for whoever watches or plans it; the due list for anyone.
	'/(app)/board': { page: 'fleet.view' },
	// The old due list now lives in /work; its address answers with a redirect there.
	'/(app)/my-work': { page: 'fixture.view' },
	// The technician's phone: work orders assigned to them, and what is due; read on the device.
	'/(app)/work': { page: 'work-order.carry-out' },
	'/(app)/policies': {
		page: 'policy.edit',
		actions: { saveType: 'policy.edit', saveOverrides: 'policy.edit' }
	},

	// Fleet health: the audit report and its PDF.
	'/(app)/board/report': { page: 'fleet.view' },
	'/(app)/board/report.pdf': { methods: { GET: 'fleet.view' } },

	// The planner's work orders: the list with its bulk actions, a new order, one order.
	'/(app)/plan': {
		page: 'work-order.plan',
		actions: {
			assign: 'work-order.plan',
			reschedule: 'work-order.plan',
			fromFlag: 'work-order.plan'
		}
	},
	'/(app)/plan/new': { page: 'work-order.plan', actions: { default: 'work-order.plan' } },
	// The calendar: orders by due date; a move is one order's new due date.
	'/(app)/plan/calendar': { page: 'work-order.plan', actions: { move: 'work-order.plan' } },
	'/(app)/plan/[id]': {
		page: 'work-order.plan',
		actions: { save: 'work-order.plan', status: 'work-order.plan' }
	},

	// Administration.
	'/(admin)/admin/users': {
		page: 'user.admin',
		actions: {
			invite: 'user.admin',
			roles: 'user.admin',
			deactivate: 'user.admin',
			reactivate: 'user.admin',
			resend: 'user.admin'
		}
	},
	'/(admin)/admin/mail': { page: 'mail.view' },
	'/(admin)/admin/office': { page: 'office.settings', actions: { save: 'office.settings' } },

	// The API.
	'/api/health': { methods: { GET: 'public' } },
	'/api/fixtures': { methods: { GET: 'fixture.view', POST: 'fixture.edit' } },
	'/api/fixtures/[code]': { methods: { GET: 'fixture.view', PATCH: 'fixture.edit' } },
	'/api/fixtures/[code]/events': { methods: { GET: 'fixture.view' } },
	'/api/fixtures/[code]/health': { methods: { GET: 'fixture.view' } },
	'/api/flags': { methods: { GET: 'fixture.view' } },
	'/api/fleet/summary': { methods: { GET: 'fleet.view' } },
	'/api/fleet/trends': { methods: { GET: 'fleet.view' } },
	// Work orders: planners change them; technicians read their own (the handlers judge that, so
	// the table lets every reader of the register through to GET and the handler refuses others).
	'/api/work-orders': { methods: { GET: 'fixture.view', POST: 'work-order.plan' } },
	'/api/work-orders/[id]': { methods: { GET: 'fixture.view', PATCH: 'work-order.plan' } },
	'/api/register-snapshot': { methods: { GET: 'fixture.view' } },
	// Per event, ingest judges the kind; a photo belongs to an inspection (attachments.ts judges).
	'/api/sync': { methods: { POST: 'event.log' } },
	'/api/attachments/[id]': { methods: { GET: 'fixture.view', PUT: 'event.log' } },
	'/api/attachments/[id]/thumb': { methods: { GET: 'fixture.view' } },
	'/api/labels.pdf': { methods: { GET: 'label.print' } }
};

/** The form action a POST names, as SvelteKit reads it: the first `?/name`, else 'default'. */
export function actionName(url: URL): string {
	for (const key of url.searchParams.keys()) {
		if (key.startsWith('/')) return key.slice(1);
	}
	return 'default';
}

/** Whether `access` is a level the table may use. */
export function isAccess(access: string): access is Access {
	return (
		access === 'public' || access === 'signed-in' || (ACTIONS as readonly string[]).includes(access)
	);
}

/**
 * Who may make this request; null when the route has no entry in the table (refused).
 * A method or action the route lacks is judged like the route itself (SvelteKit then answers
 * 404/405 without running any code of ours): an endpoint's public GET makes its 405s public too,
 * and a page's unknown actions need what opening the page needs.
 */
export function accessFor(routeId: string, method: string, url: URL): Access | null {
	const rule = ROUTE_ACCESS[routeId];
	if (!rule) return null;
	const m = method === 'HEAD' ? 'GET' : method;
	if (rule.methods) {
		const listed = rule.methods[m as Method];
		if (listed) return listed;
		return rule.methods.GET === 'public' ? 'public' : 'signed-in';
	}
	if (m === 'POST') return rule.actions?.[actionName(url)] ?? rule.page ?? null;
	return rule.page ?? null;
}
