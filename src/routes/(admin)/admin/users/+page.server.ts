import { error, fail, redirect } from '@sveltejs/kit';
import { z } from 'zod';
import { inviteSchema, setRolesSchema, userIdSchema } from '$lib/schemas/users';
import { ForbiddenError, requireUser } from '$lib/server/guard';
import { MailNotSentError } from '$lib/server/mail';
import { publicOrigin } from '$lib/server/origin';
import * as people from '$lib/server/users';
import type { Actions, PageServerLoad } from './$types';

type ActionName = 'invite' | 'roles' | 'deactivate' | 'reactivate' | 'resend';

/** Every refused form answers in this one shape, so the page reads it without guessing. */
interface Failure {
	action: ActionName;
	userId?: string;
	values?: { email: string; name: string; roles: string[] };
	errors: Record<string, string[] | undefined>;
}

const failWith = (status: number, f: Failure) => fail(status, f);

const DONE: Record<string, (name: string) => string> = {
	invited: (n) => `Invitation sent to ${n}.`,
	resent: (n) => `A new invitation is on its way to ${n}.`,
	roles: (n) => `Roles of ${n} saved.`,
	deactivated: (n) =>
		`${n} is deactivated and can no longer sign in. Their entries stay in their name.`,
	reactivated: (n) => `${n} can sign in again.`
};

export const load: PageServerLoad = async ({ locals, url }) => {
	const me = requireUser(locals, 'user.admin');
	const list = await people.listUsers();
	const done = url.searchParams.get('done');
	const who = list.find((u) => u.id === url.searchParams.get('user'));
	return {
		me: me.id,
		people: list,
		notice: done && who && DONE[done] ? DONE[done](who.name) : null
	};
};

/** Turns a refusal from the user service into the form's answer; anything else propagates. */
function refused(action: ActionName, e: unknown, extra: Omit<Failure, 'action' | 'errors'> = {}) {
	if (e instanceof people.UserRuleError) {
		return failWith(400, { action, ...extra, errors: { [e.field ?? 'form']: [e.message] } });
	}
	if (e instanceof MailNotSentError) {
		console.error('[admin/users]', e);
		return failWith(503, {
			action,
			...extra,
			errors: {
				form: [
					'The mail server did not take the invitation, so nothing was changed. Try again in a minute.'
				]
			}
		});
	}
	if (e instanceof ForbiddenError) error(403, { message: e.message });
	throw e;
}

/** Reads and validates the one-person forms. */
async function personForm(request: Request) {
	const form = await request.formData();
	return userIdSchema.safeParse({ userId: form.get('userId') });
}

const done = (kind: string, userId: string) =>
	redirect(303, `/admin/users?done=${kind}&user=${encodeURIComponent(userId)}`);

export const actions: Actions = {
	invite: async ({ locals, request, url }) => {
		const actor = requireUser(locals, 'user.admin');
		const form = await request.formData();
		const values = {
			email: String(form.get('email') ?? ''),
			name: String(form.get('name') ?? ''),
			roles: form.getAll('roles').map(String)
		};
		const parsed = inviteSchema.safeParse(values);
		if (!parsed.success) {
			return failWith(400, {
				action: 'invite',
				values,
				errors: z.flattenError(parsed.error).fieldErrors
			});
		}
		let id: string;
		try {
			id = (await people.inviteUser(parsed.data, actor, { origin: publicOrigin(url.origin) })).id;
		} catch (e) {
			return refused('invite', e, { values });
		}
		done('invited', id);
	},

	roles: async ({ locals, request }) => {
		const actor = requireUser(locals, 'user.admin');
		const form = await request.formData();
		const values = {
			userId: String(form.get('userId') ?? ''),
			roles: form.getAll('roles').map(String)
		};
		const parsed = setRolesSchema.safeParse(values);
		if (!parsed.success) {
			return failWith(400, {
				action: 'roles',
				userId: values.userId,
				errors: z.flattenError(parsed.error).fieldErrors
			});
		}
		try {
			await people.setRoles(parsed.data.userId, parsed.data.roles, actor);
		} catch (e) {
			return refused('roles', e, { userId: values.userId });
		}
		done('roles', parsed.data.userId);
	},

	deactivate: async ({ locals, request }) => {
		const actor = requireUser(locals, 'user.admin');
		const parsed = await personForm(request);
		if (!parsed.success)
			return failWith(400, { action: 'deactivate', errors: { form: ['Choose a person.'] } });
		try {
			await people.deactivate(parsed.data.userId, actor);
		} catch (e) {
			return refused('deactivate', e, { userId: parsed.data.userId });
		}
		done('deactivated', parsed.data.userId);
	},

	reactivate: async ({ locals, request }) => {
		const actor = requireUser(locals, 'user.admin');
		const parsed = await personForm(request);
		if (!parsed.success)
			return failWith(400, { action: 'reactivate', errors: { form: ['Choose a person.'] } });
		try {
			await people.reactivate(parsed.data.userId, actor);
		} catch (e) {
			return refused('reactivate', e, { userId: parsed.data.userId });
		}
		done('reactivated', parsed.data.userId);
	},

	resend: async ({ locals, request, url }) => {
		const actor = requireUser(locals, 'user.admin');
		const parsed = await personForm(request);
		if (!parsed.success)
			return failWith(400, { action: 'resend', errors: { form: ['Choose a person.'] } });
		try {
			await people.resendInvitation(parsed.data.userId, actor, {
				origin: publicOrigin(url.origin)
			});
		} catch (e) {
			return refused('resend', e, { userId: parsed.data.userId });
		}
		done('resent', parsed.data.userId);
	}
};
