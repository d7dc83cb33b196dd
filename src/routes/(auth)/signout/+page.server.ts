import { isRedirect, redirect } from '@sveltejs/kit';
import { signOut } from '$lib/server/auth';
import { revokeSession } from '$lib/server/sessions';
import { withForm } from '../signin/form-request';
import type { Actions, PageServerLoad } from './$types';

// Signing out is a POST (a link or a prefetch must never sign anyone out); GET shows the button.
export const load: PageServerLoad = ({ locals }) => ({ signedIn: !!locals.user });

export const actions: Actions = {
	default: async (event) => {
		// The session's row first: a copy of the cookie must stop working even though the JWT
		// itself stays valid until it expires. Other devices of the same person stay signed in.
		const sessionId = event.locals.user?.sessionId;
		if (sessionId) await revokeSession(sessionId);
		try {
			await signOut(withForm(event, { redirectTo: '/signin?signedout=1' }));
		} catch (e) {
			if (!isRedirect(e)) throw e;
		}
		redirect(303, '/signin?signedout=1');
	}
};
