import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { workOrderCreateSchema, workOrderQuerySchema } from '$lib/schemas/work-orders';
import { apiError } from '$lib/server/api-answers';
import { apiUser } from '$lib/server/guard';
import * as workOrders from '$lib/server/work-orders';
import {
	readerScope,
	readWorkOrderBody,
	workOrderErrorResponse,
	workOrderFieldErrors
} from './api-helpers';
import type { RequestHandler } from './$types';

const blank = (v: unknown) => (v === '' ? undefined : v);
const pageNumber = (field: string, max: number) =>
	z.preprocess(
		blank,
		z.coerce
			.number({ error: `${field} must be a whole number.` })
			.int(`${field} must be a whole number.`)
			.min(1, `${field} must be at least 1.`)
			.max(max, `${field} must be at most ${max}.`)
			.optional()
	);
const listQuerySchema = workOrderQuerySchema.extend({
	page: pageNumber('page', 100_000),
	pageSize: pageNumber('pageSize', workOrders.WORK_ORDER_PAGE_SIZE_MAX)
});

/**
 * Work orders, overdue first then by due date: `?status=&assignee=me|EMAIL&fixture=CODE&from=&to=`
 * (due range) and `page`, `pageSize`. Planners, supervisors and admins see all; a technician
 * sees the orders assigned to them whatever `assignee` says, and is refused someone else's.
 */
export const GET: RequestHandler = async ({ locals, url }) => {
	const actor = apiUser(locals, 'fixture.view');
	if (actor instanceof Response) return actor;
	const scope = readerScope(actor);
	if (scope instanceof Response) return scope;
	const raw = Object.fromEntries(
		Object.keys(listQuerySchema.shape).map((k) => [k, url.searchParams.get(k) ?? undefined])
	);
	const parsed = listQuerySchema.safeParse(raw);
	if (!parsed.success) return apiError(400, 'Invalid query.', workOrderFieldErrors(parsed.error));
	const q = parsed.data;
	const mine = q.assignee === 'me' || q.assignee === actor.email.toLowerCase();
	if (scope === 'own' && q.assignee && !mine)
		return apiError(403, 'Technicians see only the work orders assigned to them (assignee=me).');
	const filters: workOrders.WorkOrderFilters = {
		statuses: q.status ? [q.status] : undefined,
		fixtureCode: q.fixture,
		from: q.from,
		to: q.to,
		page: q.page,
		pageSize: q.pageSize
	};
	if (scope === 'own' || mine) filters.assigneeId = actor.id;
	else if (q.assignee) filters.assigneeEmail = q.assignee;
	const page = q.page ?? 1;
	const pageSize = q.pageSize ?? workOrders.WORK_ORDER_PAGE_SIZE;
	const { items, total } = await workOrders.listWorkOrders(filters, workOrders.todayUtc());
	return json({ items, total, page, pageSize });
};

/** Makes a work order (planner, supervisor, admin): 201 with the order. */
export const POST: RequestHandler = async ({ locals, request }) => {
	const actor = apiUser(locals, 'work-order.plan');
	if (actor instanceof Response) return actor;
	const body = await readWorkOrderBody(request, workOrderCreateSchema.shape);
	if (body instanceof Response) return body;
	const parsed = workOrderCreateSchema.safeParse(body);
	if (!parsed.success)
		return apiError(400, 'Invalid work order.', workOrderFieldErrors(parsed.error));
	try {
		const order = await workOrders.createWorkOrder(actor, parsed.data);
		return json(order, { status: 201, headers: { location: `/api/work-orders/${order.id}` } });
	} catch (e) {
		return workOrderErrorResponse(e);
	}
};
