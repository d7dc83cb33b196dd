import { redirect } from '@sveltejs/kit';
import { landingFor } from '$lib/landing';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = ({ locals }) => {
	// Signed-in people go where their work is (sign-in lands here unless it was given a `next`);
	// the landing page is for everyone else.
	if (locals.user) redirect(303, landingFor(locals.user.roles));
};
