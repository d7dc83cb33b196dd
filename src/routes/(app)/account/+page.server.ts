import { fail, redirect } from '@sveltejs/kit';
import { z } from 'zod';
import { changePasswordSchema } from '$lib/schemas/users';
import { requireUser } from '$lib/server/guard';
import { changePassword, getUser, UserRuleError } from '$lib/server/users';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const me = requireUser(locals);
	const summary = await getUser(me.id);
	return {
		name: me.name,
		email: me.email,
		roles: me.roles,
		hasPassword: !!summary?.hasPassword,
		saved: url.searchParams.has('saved')
	};
};

export const actions: Actions = {
	/** A new password; every other session of the person ends (see users.changePassword). */
	password: async ({ locals, request }) => {
		const me = requireUser(locals);
		const form = await request.formData();
		const parsed = changePasswordSchema.safeParse({
			current: String(form.get('current') ?? ''),
			next: String(form.get('next') ?? ''),
			confirm: String(form.get('confirm') ?? '')
		});
		if (!parsed.success) {
			return fail(400, { errors: z.flattenError(parsed.error).fieldErrors });
		}
		try {
			await changePassword(me, parsed.data);
		} catch (e) {
			if (e instanceof UserRuleError) {
				return fail(400, { errors: { [e.field ?? 'form']: [e.message] } });
			}
			throw e;
		}
		redirect(303, '/account?saved=1');
	}
};
