import { redirect } from '@sveltejs/kit';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = ({ locals }) => {
	// Signed-in people go straight to the register; the landing page is for everyone else.
	if (locals.user) redirect(303, '/fixtures');
};
