import type { z } from 'zod';
import { can } from '$lib/permissions';
import { apiError } from '$lib/server/api-answers';
import { ForbiddenError, type Actor } from '$lib/server/guard';
import { readApiJsonObject } from '$lib/server/json-body';
import { WorkOrderError } from '$lib/server/work-orders';

/** Largest work-order body accepted: every field at its longest (30 part lines) is far below. */
export const WORK_ORDER_BODY_LIMIT_BYTES = 64 * 1024;

/** A work-order body: a JSON object of known fields, or the 400 answer (see readApiJsonObject). */
export function readWorkOrderBody(
	request: Request,
	known: Record<string, unknown>
): Promise<Record<string, unknown> | Response> {
	return readApiJsonObject(request, WORK_ORDER_BODY_LIMIT_BYTES, known, 'a work order');
}

/** Messages by field, the path spelt out ("parts.0.quantity") so a part line can be found. */
export function workOrderFieldErrors(error: z.ZodError): Record<string, string[]> {
	const out: Record<string, string[]> = {};
	for (const issue of error.issues) {
		const key = issue.path.length ? issue.path.map(String).join('.') : '_form';
		(out[key] ??= []).push(issue.message);
	}
	return out;
}

/** Turns the services' refusals into JSON answers; anything else is a real failure. */
export function workOrderErrorResponse(e: unknown): Response {
	if (e instanceof WorkOrderError) return apiError(e.status, e.message, e.fields);
	if (e instanceof ForbiddenError) return apiError(403, e.message);
	throw e;
}

/**
 * Who may read work orders: planners, supervisors and admins all of them ('all'), technicians
 * their own ('own'), anyone else none (the 403 answer). The route table lets every reader of the
 * register through; this is the finer rule.
 */
export function readerScope(actor: Actor): 'all' | 'own' | Response {
	if (can(actor, 'work-order.plan')) return 'all';
	if (can(actor, 'work-order.carry-out')) return 'own';
	return apiError(
		403,
		'You need the planner, supervisor, admin or technician role to see work orders.'
	);
}

/** The id in the path as a work order id, or null when it cannot be one. */
export function orderId(param: string): number | null {
	if (!/^[1-9]\d{0,9}$/.test(param)) return null;
	const n = Number(param);
	return n <= 2_147_483_647 ? n : null;
}
