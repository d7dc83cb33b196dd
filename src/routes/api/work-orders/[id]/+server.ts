import { json } from '@sveltejs/kit';
import { workOrderPatchSchema } from '$lib/schemas/work-orders';
import { apiError } from '$lib/server/api-answers';
import { apiUser } from '$lib/server/guard';
import * as workOrders from '$lib/server/work-orders';
import {
	orderId,
	readerScope,
	readWorkOrderBody,
	workOrderErrorResponse,
	workOrderFieldErrors
} from '../api-helpers';
import type { RequestHandler } from './$types';

const notFound = (id: string) => apiError(404, `There is no work order ${id}.`);

/** One work order with its history; a technician may read the orders assigned to them. */
export const GET: RequestHandler = async ({ locals, params }) => {
	const actor = apiUser(locals, 'fixture.view');
	if (actor instanceof Response) return actor;
	const scope = readerScope(actor);
	if (scope instanceof Response) return scope;
	const id = orderId(params.id);
	const order = id === null ? null : await workOrders.getWorkOrder(id);
	if (!order) return notFound(params.id);
	if (scope === 'own' && order.assigneeEmail?.toLowerCase() !== actor.email.toLowerCase())
		return apiError(403, 'This work order is not assigned to you.');
	return json(order);
};

/**
 * Changes a work order (planner, supervisor, admin): any of dueOn, assigneeEmail, status,
 * cancelReason, notes, parts. 409 with a message for a move between statuses that is not
 * allowed, and for any change to a done or cancelled order.
 */
export const PATCH: RequestHandler = async ({ locals, params, request }) => {
	const actor = apiUser(locals, 'work-order.plan');
	if (actor instanceof Response) return actor;
	const body = await readWorkOrderBody(request, workOrderPatchSchema.shape);
	if (body instanceof Response) return body;
	const parsed = workOrderPatchSchema.safeParse(body);
	if (!parsed.success) return apiError(400, 'Invalid change.', workOrderFieldErrors(parsed.error));
	const id = orderId(params.id);
	if (id === null) return notFound(params.id);
	try {
		return json(await workOrders.updateWorkOrder(actor, id, parsed.data));
	} catch (e) {
		return workOrderErrorResponse(e);
	}
};
