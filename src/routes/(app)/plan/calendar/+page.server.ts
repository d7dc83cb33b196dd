import { error, fail, redirect } from '@sveltejs/kit';
import { calendarGrid, dayLoads } from '$lib/domain/calendar';
import { calendarMoveSchema, parseCalendarQuery } from '$lib/schemas/calendar';
import { calendarOrders, moveOnCalendar, openLoadRows } from '$lib/server/calendar';
import { ForbiddenError, requireUser } from '$lib/server/guard';
import { getOfficeSettings } from '$lib/server/office-settings';
import { activeTechnicians, todayUtc } from '$lib/server/plan-pages';
import * as places from '$lib/server/places';
import { WorkOrderError } from '$lib/server/work-order-errors';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	requireUser(locals, 'work-order.plan');
	const today = todayUtc();
	// A shared link with a bad value still opens: the bad part is dropped and named on the page.
	const { query, errors } = parseCalendarQuery(url.searchParams, today);
	const grid = calendarGrid(query.view, query.date);
	const [orders, loadRows, settings, technicians, tree] = await Promise.all([
		calendarOrders(
			{ assigneeEmail: query.assignee, areaId: query.area, action: query.action },
			grid,
			today
		),
		openLoadRows(grid, query.assignee),
		getOfficeSettings(),
		activeTechnicians(),
		places.tree()
	]);
	const moved = Number(url.searchParams.get('moved'));
	const movedTo = url.searchParams.get('to');
	return {
		query,
		queryErrors: errors,
		today,
		grid,
		...orders,
		capacity: settings.capacityPerDay,
		// Per day, per technician (by e-mail address): open orders against the capacity.
		loads: Object.fromEntries(dayLoads(loadRows, settings.capacityPerDay)),
		technicians,
		tree,
		moved: Number.isInteger(moved) && moved > 0 && movedTo ? { id: moved, to: movedTo } : null
	};
};

/** Where a plain form post returns to: the calendar as it was (only a query string of it). */
function backTo(form: FormData, id: number, dueOn: string): string {
	const raw = form.get('back');
	const params = new URLSearchParams(typeof raw === 'string' && raw.startsWith('?') ? raw : '');
	params.set('moved', String(id));
	params.set('to', dueOn);
	return `/plan/calendar?${params}`;
}

export const actions: Actions = {
	move: async ({ locals, request }) => {
		const actor = requireUser(locals, 'work-order.plan');
		const form = await request.formData();
		const parsed = calendarMoveSchema.safeParse({
			id: form.get('id') ?? undefined,
			dueOn: String(form.get('dueOn') ?? ''),
			from: form.has('from') ? String(form.get('from')) : undefined
		});
		const moveId = Number(form.get('id')) || null;
		if (!parsed.success)
			return fail(400, { moveId, moveError: parsed.error.issues.map((i) => i.message).join(' ') });
		try {
			await moveOnCalendar(actor, parsed.data);
		} catch (e) {
			if (e instanceof ForbiddenError) error(403, { message: e.message });
			if (e instanceof WorkOrderError)
				return fail(e.status, {
					moveId,
					moveError: e.fields ? Object.values(e.fields).flat().join(' ') : e.message
				});
			throw e;
		}
		redirect(303, backTo(form, parsed.data.id, parsed.data.dueOn));
	}
};
