import { error, fail, redirect } from '@sveltejs/kit';
import { handlingCautions } from '$lib/content/fixture-cautions';
import { transitionRefusal } from '$lib/domain/work-orders';
import { partLines, partsInput, planFieldErrors, REPLACING_ACTIONS } from '$lib/schemas/plan';
import { workOrderPatchSchema, type WorkOrderPatch } from '$lib/schemas/work-orders';
import * as fixtures from '$lib/server/fixtures';
import { ForbiddenError, requireUser } from '$lib/server/guard';
import { activeTechnicians } from '$lib/server/plan-pages';
import * as workOrders from '$lib/server/work-orders';
import * as reads from '$lib/server/work-order-reads';
import type { Actions, PageServerLoad } from './$types';

/** The order the path names; 404 for an id that is not one. */
async function orderOf(idParam: string) {
	const id = /^\d{1,10}$/.test(idParam) ? Number(idParam) : 0;
	const order = id > 0 ? await reads.getWorkOrder(id) : null;
	if (!order) error(404, { message: `No work order has the number ${idParam}.` });
	return order;
}

const NOTICES: Record<string, string> = {
	created: 'Work order created.',
	saved: 'Changes saved.',
	status: 'Status changed.'
};

export const load: PageServerLoad = async ({ locals, params, url }) => {
	requireUser(locals, 'work-order.plan');
	const order = await orderOf(params.id);
	const [technicians, fixture] = await Promise.all([
		activeTechnicians(),
		REPLACING_ACTIONS.includes(order.action) ? fixtures.getByCode(order.fixtureCode) : null
	]);
	const notice = Object.keys(NOTICES).find((k) => url.searchParams.has(k));
	return {
		order,
		technicians,
		cautions: fixture ? handlingCautions(fixture) : [],
		notice: notice ? NOTICES[notice] : null
	};
};

const str = (v: FormDataEntryValue | null) => (typeof v === 'string' ? v : '');

/** Only what differs from the order goes in the patch, so the history shows real changes. */
function changesOf(
	order: Awaited<ReturnType<typeof orderOf>>,
	form: FormData
): Record<string, unknown> {
	const dueOn = str(form.get('dueOn')).trim() || null;
	const assigneeEmail = str(form.get('assigneeEmail')).trim().toLowerCase() || null;
	const notes = str(form.get('notes')).trim() || null;
	const parts = partsInput(partLines(form));
	const out: Record<string, unknown> = {};
	if (dueOn !== order.dueOn) out.dueOn = dueOn;
	if (assigneeEmail !== (order.assigneeEmail ?? null)) out.assigneeEmail = assigneeEmail;
	if (notes !== (order.notes ?? null)) out.notes = notes;
	if (JSON.stringify(normalParts(parts)) !== JSON.stringify(normalParts(order.parts)))
		out.parts = parts;
	return out;
}

const normalParts = (
	parts: { description: string; quantity: number; size?: string; material?: string }[]
) =>
	parts.map((p) => [
		p.description.trim(),
		p.quantity,
		p.size?.trim() || '',
		p.material?.trim() || ''
	]);

/** Runs a patch; field messages, 403 and refusals (409) come back to the form. */
async function patch(
	actor: Parameters<typeof workOrders.updateWorkOrder>[0],
	id: number,
	input: WorkOrderPatch,
	values: Record<string, unknown>
) {
	try {
		await workOrders.updateWorkOrder(actor, id, input);
		return null;
	} catch (e) {
		if (e instanceof ForbiddenError) error(403, { message: e.message });
		if (e instanceof workOrders.WorkOrderError) {
			if (e.status === 409) return fail(409, { values, errors: null, refusal: e.message });
			if (e.status === 404) error(404, { message: e.message });
			return fail(400, { values, errors: e.fields ?? { _form: [e.message] }, refusal: null });
		}
		throw e;
	}
}

export const actions: Actions = {
	save: async ({ locals, params, request }) => {
		const actor = requireUser(locals, 'work-order.plan');
		const order = await orderOf(params.id);
		const form = await request.formData();
		const values = {
			dueOn: str(form.get('dueOn')),
			assigneeEmail: str(form.get('assigneeEmail')),
			notes: str(form.get('notes')),
			parts: partLines(form)
		};
		const changes = changesOf(order, form);
		if (Object.keys(changes).length === 0)
			return fail(400, { values, errors: { _form: ['Nothing was changed.'] }, refusal: null });
		const parsed = workOrderPatchSchema.safeParse(changes);
		if (!parsed.success)
			return fail(400, { values, errors: planFieldErrors(parsed.error), refusal: null });
		const failed = await patch(actor, order.id, parsed.data, values);
		if (failed) return failed;
		redirect(303, `/plan/${order.id}?saved`);
	},

	status: async ({ locals, params, request }) => {
		const actor = requireUser(locals, 'work-order.plan');
		const order = await orderOf(params.id);
		const form = await request.formData();
		const to = str(form.get('to'));
		const cancelReason = str(form.get('cancelReason'));
		const values = { to, cancelReason };
		const parsed = workOrderPatchSchema.safeParse({
			status: to,
			cancelReason: to === 'cancelled' ? cancelReason : undefined
		});
		if (!parsed.success)
			return fail(400, { values, errors: planFieldErrors(parsed.error), refusal: null });
		// The page may be older than the order (the phone finished it meanwhile): say so plainly.
		const refusal = transitionRefusal(order.status, parsed.data.status!);
		if (refusal) return fail(409, { values, errors: null, refusal });
		const failed = await patch(actor, order.id, parsed.data, values);
		if (failed) return failed;
		redirect(303, `/plan/${order.id}?status`);
	}
};
