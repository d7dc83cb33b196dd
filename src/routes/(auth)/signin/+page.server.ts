import { AuthError, CredentialsSignin } from '@auth/sveltekit';
import { fail, isRedirect, redirect } from '@sveltejs/kit';
import { z } from 'zod';
import { linkRequestSchema, passwordSignInSchema } from '$lib/schemas/users';
import { clientAddress, signIn } from '$lib/server/auth';
import { unavailable } from '$lib/server/overload';
import { countLinkRequest } from '$lib/server/throttle';
import { withForm } from './form-request';
import { noticeFor, refusalMessage, safeNext } from './messages';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = ({ locals, url }) => {
	const next = safeNext(
		url.searchParams.get('next') ?? url.searchParams.get('callbackUrl'),
		url.origin
	);
	if (locals.user) redirect(303, next);
	return { next, notice: noticeFor(url.searchParams) };
};

export const actions: Actions = {
	/** E-mail + password. Auth.js checks them (with throttling); we turn its answer into a page. */
	password: async (event) => {
		const form = await event.request.formData();
		const email = String(form.get('email') ?? '');
		const next = safeNext(form.get('next'), event.url.origin);
		const parsed = passwordSignInSchema.safeParse({ email, password: form.get('password') });
		if (!parsed.success) {
			return fail(400, {
				form: 'password' as const,
				email,
				errors: z.flattenError(parsed.error).fieldErrors
			});
		}
		try {
			await signIn(
				withForm(event, { providerId: 'credentials', ...parsed.data, redirectTo: next })
			);
		} catch (e) {
			if (isRedirect(e)) redirect(303, next);
			if (e instanceof CredentialsSignin) {
				// A lock or a wait is "too many requests"; a wrong password is a plain refusal.
				const status = /^(locked|wait)-/.test(e.code ?? '') ? 429 : 400;
				return fail(status, { form: 'password' as const, email, message: refusalMessage(e.code) });
			}
			// The database was too busy to check the password: say so on the form, keep what was typed.
			const busy = unavailable(e);
			if (busy) return fail(503, { form: 'password' as const, email, message: busy.message });
			throw e;
		}
		redirect(303, next);
	},

	/**
	 * "E-mail me a sign-in link". Every well-formed address gets the same answer; only an active
	 * person's address gets mail (see the signIn callback in $lib/server/auth).
	 */
	link: async (event) => {
		const form = await event.request.formData();
		const email = String(form.get('email') ?? '');
		const next = safeNext(form.get('next'), event.url.origin);
		const parsed = linkRequestSchema.safeParse({ email });
		if (!parsed.success) {
			return fail(400, {
				form: 'link' as const,
				email,
				errors: z.flattenError(parsed.error).fieldErrors
			});
		}
		const wait = await countLinkRequest({
			email: parsed.data.email,
			address: clientAddress(event)
		});
		if (wait) {
			return fail(429, {
				form: 'link' as const,
				email,
				message: `Several sign-in links were asked for just now. Use the newest one in your mail, or ask again in ${wait} minute${wait === 1 ? '' : 's'}.`
			});
		}
		try {
			await signIn(
				withForm(event, { providerId: 'nodemailer', email: parsed.data.email, redirectTo: next })
			);
		} catch (e) {
			if (!isRedirect(e)) {
				if (e instanceof AuthError) {
					console.error('[auth] sign-in link request failed:', e);
					return fail(503, {
						form: 'link' as const,
						email,
						message:
							'The sign-in link could not be prepared just now. Try again in a minute, or sign in with your password.'
					});
				}
				throw e;
			}
		}
		redirect(303, '/signin/check-mail');
	}
};
