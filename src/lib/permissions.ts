/**
 * Who may do what: the one table of permissions, read by the route guard (hooks), the services,
 * the form actions, the API routes and the pages (to show only what a person may use). Pure and
 * shared by client and server; relative imports so the browser tests can read it too.
 */
import { EVENT_KINDS, type EventKind } from './domain/events';
import { ROLES, type Role } from './schemas/roles';

/** What a person can be allowed to do, beyond being signed in. */
export const ACTIONS = [
	'fixture.view',
	'fixture.edit',
	'geometry.edit',
	'event.log',
	'policy.edit',
	'policy.defaults',
	'place.edit',
	'label.print',
	'user.admin',
	'mail.view',
	'fleet.view',
	'work-order.plan',
	'work-order.carry-out',
	'stock.manage',
	'office.settings',
	'mail.admin'
] as const;
export type Action = (typeof ACTIONS)[number];

/** What an action can be about: logging is judged per event kind. */
export interface Subjects {
	'event.log': { kind: EventKind };
}
export type Subject<A extends Action> = A extends keyof Subjects ? Subjects[A] : never;

/** Anyone asking: a signed-in person's roles, or nobody. */
export type Who = { readonly roles: readonly Role[] } | null | undefined;

const OFFICE = ['supervisor', 'admin'] as const satisfies readonly Role[];
const ADMIN = ['admin'] as const satisfies readonly Role[];
/** The fleet board and its report: whoever watches or plans the fleet. */
const FLEET = ['supervisor', 'planner', 'admin'] as const satisfies readonly Role[];
/** Work orders are planned by the planner; supervisors and admins may too. */
const PLANNERS = ['planner', 'supervisor', 'admin'] as const satisfies readonly Role[];
/** Work orders are carried out by whoever may log the work they ask for. */
const DOERS = ['technician', 'supervisor', 'admin'] as const satisfies readonly Role[];

/** The spare-parts stock is kept by the planner, who reserves it, and the admin. */
const STOCK_KEEPERS = ['planner', 'admin'] as const satisfies readonly Role[];

/** Which kinds each role may log (a person with several roles may log the union). */
export const LOG_KINDS: Readonly<Record<Role, readonly EventKind[]>> = {
	operator: ['reseat', 'cleaning', 'note'],
	technician: EVENT_KINDS,
	supervisor: EVENT_KINDS,
	planner: ['note'],
	admin: EVENT_KINDS
};

/** Each action: the roles that may do it, and the words for it after "to". */
export const PERMISSIONS: Readonly<Record<Action, { roles: readonly Role[]; doing: string }>> = {
	'fixture.view': { roles: ROLES, doing: 'see the register' },
	'fixture.edit': { roles: OFFICE, doing: 'add, change or import fixtures' },
	'geometry.edit': { roles: OFFICE, doing: 'check and save a coupling geometry' },
	// Every role may log some kind (a note at least); the kind itself is judged by LOG_KINDS.
	'event.log': {
		roles: ROLES.filter((r) => LOG_KINDS[r].length > 0),
		doing: 'log entries'
	},
	'policy.edit': { roles: OFFICE, doing: 'see and change policies' },
	'policy.defaults': { roles: ADMIN, doing: 'set policies' },
	'place.edit': { roles: ADMIN, doing: 'add sites, areas and locations' },
	'label.print': { roles: OFFICE, doing: 'print labels' },
	'user.admin': { roles: ADMIN, doing: 'manage people and their roles' },
	'mail.view': { roles: ADMIN, doing: 'read captured mail' },
	'fleet.view': { roles: FLEET, doing: 'see the fleet board' },
	'work-order.plan': { roles: PLANNERS, doing: 'plan work orders' },
	'work-order.carry-out': { roles: DOERS, doing: 'carry out work orders' },
	'stock.manage': { roles: STOCK_KEEPERS, doing: 'keep the spare-parts stock' },
	'office.settings': { roles: ADMIN, doing: 'set the office settings' },
	'mail.admin': { roles: ADMIN, doing: 'see and retry outgoing mail' }
};

/** Whether one role may do `action` (about `subject`, where the action has one). */
export function roleCan<A extends Action>(role: Role, action: A, subject?: Subject<A>): boolean {
	if (!PERMISSIONS[action].roles.includes(role)) return false;
	if (action === 'event.log' && subject) {
		return LOG_KINDS[role].includes((subject as Subjects['event.log']).kind);
	}
	return true;
}

/** Whether `who` may do `action` (about `subject`): true when any of their roles may. */
export function can<A extends Action>(who: Who, action: A, subject?: Subject<A>): boolean {
	return !!who && who.roles.some((role) => roleCan(role, action, subject));
}

/** The roles that may do `action` (about `subject`), in the order of ROLES. */
export function rolesThatCan<A extends Action>(action: A, subject?: Subject<A>): Role[] {
	return ROLES.filter((role) => roleCan(role, action, subject));
}

/** The event kinds `who` may log, in the order of EVENT_KINDS (for the card's buttons). */
export function loggableKinds(who: Who): EventKind[] {
	return EVENT_KINDS.filter((kind) => can(who, 'event.log', { kind }));
}

/** "You need the supervisor or admin role to print labels." */
export function refusal(action: Action): string {
	const roles = rolesThatCan(action);
	const doing = PERMISSIONS[action].doing;
	if (!roles.length) return `Nobody may ${doing}.`;
	return `You need the ${roles.join(' or ')} role to ${doing}.`;
}
