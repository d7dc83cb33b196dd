import { error, fail, redirect } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/fixture-form';
import { overridesFormSchema, typePolicyFormSchema } from '$lib/schemas/policy-form';
import { ForbiddenError, requireUser } from '$lib/server/guard';
import * as policyAdmin from '$lib/server/policy-admin';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const actor = requireUser(locals, 'policy.edit');
	const code = url.searchParams.get('fixture')?.trim() || null;
	const [types, fixture] = await Promise.all([
		policyAdmin.typePolicies(actor),
		code ? policyAdmin.fixturePolicy(actor, code) : null
	]);
	return {
		types,
		fixture,
		fixtureQuery: code,
		saved: url.searchParams.get('saved'),
		changed: Number(url.searchParams.get('changed') ?? 0)
	};
};

/** The form's text fields (files and repeated names are not part of these forms). */
async function formValues(request: Request): Promise<Record<string, string>> {
	return Object.fromEntries(
		[...(await request.formData())].filter(([, v]) => typeof v === 'string')
	) as Record<string, string>;
}

function forbidden(e: unknown): never {
	if (e instanceof ForbiddenError) error(403, { message: e.message });
	throw e;
}

export const actions: Actions = {
	saveType: async ({ locals, request }) => {
		const actor = requireUser(locals, 'policy.edit');
		const values = await formValues(request);
		const parsed = typePolicyFormSchema.safeParse(values);
		if (!parsed.success) {
			return fail(400, {
				form: 'type',
				type: values.type,
				values,
				errors: fieldErrors(parsed.error)
			});
		}
		const { type, ...policy } = parsed.data;
		const changes = await policyAdmin.saveTypePolicy(actor, type, policy).catch(forbidden);
		redirect(303, `/policies?saved=${type}&changed=${changes.length}#type-${type}`);
	},
	saveOverrides: async ({ locals, request }) => {
		const actor = requireUser(locals, 'policy.edit');
		const values = await formValues(request);
		const parsed = overridesFormSchema.safeParse(values);
		if (!parsed.success) {
			return fail(400, { form: 'overrides', values, errors: fieldErrors(parsed.error) });
		}
		const { code, ...overrides } = parsed.data;
		const changes = await policyAdmin.saveFixtureOverrides(actor, code, overrides).catch(forbidden);
		if (!changes) {
			return fail(404, {
				form: 'overrides',
				values,
				errors: { code: [`No fixture has the code ${code}.`] }
			});
		}
		redirect(
			303,
			`/policies?fixture=${encodeURIComponent(code)}&saved=fixture&changed=${changes.length}#overrides`
		);
	}
};
