import { error, fail, redirect } from '@sveltejs/kit';
import { z } from 'zod';
import { parsePlanQuery, PLAN_PAGE_SIZE } from '$lib/schemas/plan';
import { isoDateSchema, OPEN_WORK_ORDER_STATUSES } from '$lib/schemas/work-orders';
import { ForbiddenError, requireUser } from '$lib/server/guard';
import { activeTechnicians, todayUtc } from '$lib/server/plan-pages';
import * as places from '$lib/server/places';
import * as workOrders from '$lib/server/work-orders';
import * as reads from '$lib/server/work-order-reads';
import type { Actions, PageServerLoad } from './$types';

const NOTICES: Record<string, (n: number) => string> = {
	assigned: (n) => `${n} ${n === 1 ? 'work order' : 'work orders'} assigned.`,
	rescheduled: (n) => `${n} ${n === 1 ? 'work order' : 'work orders'} moved to the new date.`
};

export const load: PageServerLoad = async ({ locals, url }) => {
	requireUser(locals, 'work-order.plan');
	// A shared link with a bad value still opens: the bad filter is dropped and named on the page.
	const { query, errors } = parsePlanQuery(url.searchParams);
	const today = todayUtc();
	const [list, unplanned, technicians, tree] = await Promise.all([
		reads.listWorkOrders(
			{
				statuses: query.status === 'open' ? [...OPEN_WORK_ORDER_STATUSES] : [query.status],
				assigneeEmail: query.assignee,
				areaId: query.area,
				action: query.action,
				from: query.from,
				to: query.to,
				page: query.page,
				pageSize: PLAN_PAGE_SIZE
			},
			today
		),
		reads.openFlagsWithoutOrder({ areaId: query.area }),
		activeTechnicians(),
		places.tree()
	]);
	const notice = url.searchParams.get('notice') ?? '';
	const count = Number(url.searchParams.get('count'));
	return {
		query,
		queryErrors: errors,
		today,
		orders: list.items,
		total: list.total,
		unplanned,
		technicians,
		tree,
		notice: NOTICES[notice] && Number.isInteger(count) && count > 0 ? NOTICES[notice](count) : null
	};
};

const idsSchema = z
	.array(z.coerce.number().int().positive())
	.min(1, 'Tick at least one work order first.')
	.max(500, 'At most 500 work orders at once.');

/** Where to go back to: the list as it was filtered (only a query string of /plan). */
function backTo(form: FormData, notice: string, count: number): string {
	const raw = form.get('back');
	const params = new URLSearchParams(typeof raw === 'string' && raw.startsWith('?') ? raw : '');
	params.delete('notice');
	params.delete('count');
	params.set('notice', notice);
	params.set('count', String(count));
	return `/plan?${params}`;
}

/** A refusal in one sentence: its field messages, else its message. */
const fieldText = (e: InstanceType<typeof workOrders.WorkOrderError>) =>
	e.fields ? Object.values(e.fields).flat().join(' ') : e.message;

/** Runs a bulk change; its refusal comes back to the form as one message. */
async function bulk(work: () => Promise<unknown>) {
	try {
		await work();
		return null;
	} catch (e) {
		if (e instanceof ForbiddenError) error(403, { message: e.message });
		if (e instanceof workOrders.WorkOrderError) return fail(e.status, { bulkError: fieldText(e) });
		throw e;
	}
}

export const actions: Actions = {
	assign: async ({ locals, request }) => {
		const actor = requireUser(locals, 'work-order.plan');
		const form = await request.formData();
		const ids = idsSchema.safeParse(form.getAll('ids'));
		if (!ids.success) return fail(400, { bulkError: ids.error.issues[0].message });
		const email = z.email().safeParse(
			String(form.get('bulkAssignee') ?? '')
				.trim()
				.toLowerCase()
		);
		if (!email.success) return fail(400, { bulkError: 'Choose whom to assign them to.' });
		const failed = await bulk(() => workOrders.bulkAssign(actor, ids.data, email.data));
		if (failed) return failed;
		redirect(303, backTo(form, 'assigned', ids.data.length));
	},

	reschedule: async ({ locals, request }) => {
		const actor = requireUser(locals, 'work-order.plan');
		const form = await request.formData();
		const ids = idsSchema.safeParse(form.getAll('ids'));
		if (!ids.success) return fail(400, { bulkError: ids.error.issues[0].message });
		const dueOn = isoDateSchema('The new due date').safeParse(String(form.get('bulkDueOn') ?? ''));
		if (!dueOn.success) return fail(400, { bulkError: 'Choose the new due date.' });
		const failed = await bulk(() => workOrders.bulkReschedule(actor, ids.data, dueOn.data));
		if (failed) return failed;
		redirect(303, backTo(form, 'rescheduled', ids.data.length));
	},

	fromFlag: async ({ locals, request }) => {
		const actor = requireUser(locals, 'work-order.plan');
		const form = await request.formData();
		const flagId = z.coerce.number().int().positive().safeParse(form.get('flagId'));
		if (!flagId.success) return fail(400, { flagError: 'That is not a flag.', flagId: null });
		let id: number;
		try {
			({ id } = await workOrders.createFromFlag(actor, flagId.data, {}));
		} catch (e) {
			if (e instanceof ForbiddenError) error(403, { message: e.message });
			if (e instanceof workOrders.WorkOrderError)
				return fail(e.status, { flagError: fieldText(e), flagId: flagId.data });
			throw e;
		}
		redirect(303, `/plan/${id}?created`);
	}
};
