import { redirect } from '@sveltejs/kit';
import type { PageServerLoad } from './$types';

/** The due list became part of `/work` (work orders first, then what is due and not planned). */
export const load: PageServerLoad = () => {
	redirect(308, '/work');
};
