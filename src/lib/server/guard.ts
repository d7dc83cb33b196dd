import { error, json } from '@sveltejs/kit';
import type { Role } from '$lib/schemas/roles';

/** Who is acting: what every service function that changes data receives. */
export interface Actor {
	id: string;
	email: string;
	name: string;
	roles: Role[];
	/** The sign-in session the request came with (none for scripts such as the seed). */
	sessionId?: string;
}

/** Thrown by services when the actor lacks a role; routes turn it into 403. */
export class ForbiddenError extends Error {
	readonly status = 403;
	constructor(message = 'You do not have permission to do that.') {
		super(message);
		this.name = 'ForbiddenError';
	}
}

/** True when the actor holds at least one of `roles`. */
export function hasRole(actor: Pick<Actor, 'roles'> | null | undefined, roles: readonly Role[]) {
	return !!actor && actor.roles.some((r) => roles.includes(r));
}

/** Service-level check: throws ForbiddenError unless the actor holds one of `roles`. */
export function assertRole(actor: Actor, roles: readonly Role[], what = 'do that'): void {
	if (!hasRole(actor, roles)) {
		throw new ForbiddenError(`You need the ${roles.join(' or ')} role to ${what}.`);
	}
}

/** Page/action guard: 401 without a session, 403 without one of `roles` (none = any signed-in user). */
export function requireUser(locals: App.Locals, roles: readonly Role[] = []): Actor {
	if (!locals.user) error(401, { message: 'Please sign in.' });
	if (roles.length && !hasRole(locals.user, roles)) {
		error(403, { message: `This page is for the ${roles.join(' or ')} role.` });
	}
	return locals.user;
}

/**
 * API guard: returns the actor, or a JSON Response (401/403) for the endpoint to return as is.
 * Endpoints answer JSON errors whatever the Accept header says.
 */
export function apiUser(locals: App.Locals, roles: readonly Role[] = []): Actor | Response {
	if (!locals.user) return json({ error: 'Not signed in.' }, { status: 401 });
	if (roles.length && !hasRole(locals.user, roles)) {
		return json({ error: `Requires the ${roles.join(' or ')} role.` }, { status: 403 });
	}
	return locals.user;
}
