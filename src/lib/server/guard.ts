import { error } from '@sveltejs/kit';
import { can, refusal, type Action, type Subject } from '$lib/permissions';
import type { Role } from '$lib/schemas/roles';
import { apiError } from './api-answers';

/** Who is acting: what every service function that changes data receives. */
export interface Actor {
	id: string;
	email: string;
	name: string;
	roles: Role[];
	/** The sign-in session the request came with (none for scripts such as the seed). */
	sessionId?: string;
}

/** Thrown by services when the actor may not do something; routes turn it into 403. */
export class ForbiddenError extends Error {
	readonly status = 403;
	constructor(message = 'You do not have permission to do that.') {
		super(message);
		this.name = 'ForbiddenError';
	}
}

/** Service-level check: throws ForbiddenError unless the actor may do `action` (see permissions.ts). */
export function assertCan<A extends Action>(actor: Actor, action: A, subject?: Subject<A>): void {
	if (!can(actor, action, subject)) throw new ForbiddenError(refusal(action));
}

/** The API's one refusal answer: JSON `{ error }` with status 403. */
export function forbiddenJson(message: string): Response {
	return apiError(403, message);
}

/** Page/action guard: 401 without a session, 403 unless the person may do `action` (if given). */
export function requireUser(locals: App.Locals, action?: Action): Actor {
	if (!locals.user) error(401, { message: 'Please sign in.' });
	if (action && !can(locals.user, action)) error(403, { message: refusal(action) });
	return locals.user;
}

/**
 * API guard: returns the actor, or a JSON Response (401/403) for the endpoint to return as is.
 * Endpoints answer JSON errors whatever the Accept header says.
 */
export function apiUser(locals: App.Locals, action?: Action): Actor | Response {
	if (!locals.user) return apiError(401, 'Not signed in.');
	if (action && !can(locals.user, action)) return forbiddenJson(refusal(action));
	return locals.user;
}
