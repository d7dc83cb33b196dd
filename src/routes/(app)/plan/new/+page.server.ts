import { error, fail, redirect } from '@sveltejs/kit';
import {
	createFormValues,
	createInput,
	planFieldErrors,
	type CreateFormValues
} from '$lib/schemas/plan';
import { workOrderCreateSchema } from '$lib/schemas/work-orders';
import { handlingCautions } from '$lib/content/fixture-cautions';
import * as fixtures from '$lib/server/fixtures';
import { ForbiddenError, requireUser } from '$lib/server/guard';
import { activeTechnicians, todayUtc } from '$lib/server/plan-pages';
import * as workOrders from '$lib/server/work-orders';
import type { Actions, PageServerLoad } from './$types';

const EMPTY: CreateFormValues = {
	fixtureCode: '',
	action: '',
	actionText: '',
	dueOn: '',
	assigneeEmail: '',
	flagId: '',
	notes: '',
	parts: []
};

/** A flag that does not exist opens the empty form (with a note), not an error page. */
function notFoundAsNull(e: unknown): null {
	if (e instanceof workOrders.WorkOrderError && e.status === 404) return null;
	throw e;
}

export const load: PageServerLoad = async ({ locals, url }) => {
	requireUser(locals, 'work-order.plan');
	const flagParam = url.searchParams.get('flag');
	const flagId = flagParam && /^\d{1,10}$/.test(flagParam) ? Number(flagParam) : null;
	const [technicians, found] = await Promise.all([
		activeTechnicians(),
		flagId ? workOrders.draftFromFlag(flagId, todayUtc()).catch(notFoundAsNull) : null
	]);
	// A closed flag needs no order: the form opens empty, with the reason.
	const draft = found?.flagOpen ? found : null;
	let values: CreateFormValues = { ...EMPTY, fixtureCode: url.searchParams.get('fixture') ?? '' };
	if (draft) {
		values = {
			...EMPTY,
			fixtureCode: draft.fixtureCode,
			action: draft.action,
			dueOn: draft.dueOn,
			flagId: String(draft.flagId),
			notes: draft.notes,
			parts: draft.parts.map((p) => ({
				description: p.description,
				size: p.size ?? '',
				material: p.material ?? '',
				quantity: String(p.quantity)
			}))
		};
	}
	// The fixture of a flag is known: its handling cautions show beside a replacement.
	const fixture = draft ? await fixtures.getByCode(draft.fixtureCode) : null;
	return {
		technicians,
		cautions: fixture ? handlingCautions(fixture) : [],
		values,
		fromFlag: draft ? { id: draft.flagId, kind: draft.flagKind } : null,
		// A link to a flag that is gone or cleared still opens the form, with the reason.
		flagProblem:
			flagParam !== null && !draft
				? 'That flag is not open any more (or does not exist): plan the work by hand, or go back to the list.'
				: null
	};
};

export const actions: Actions = {
	default: async ({ locals, request }) => {
		const actor = requireUser(locals, 'work-order.plan');
		const values = createFormValues(await request.formData());
		const parsed = workOrderCreateSchema.safeParse(createInput(values));
		if (!parsed.success) return fail(400, { values, errors: planFieldErrors(parsed.error) });
		let id: number;
		try {
			({ id } = await workOrders.createWorkOrder(actor, parsed.data));
		} catch (e) {
			if (e instanceof ForbiddenError) error(403, { message: e.message });
			if (e instanceof workOrders.WorkOrderError)
				return fail(e.status, { values, errors: e.fields ?? { _form: [e.message] } });
			throw e;
		}
		redirect(303, `/plan/${id}?created=1`);
	}
};
