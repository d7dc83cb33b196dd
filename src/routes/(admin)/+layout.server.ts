import { requireUser } from '$lib/server/guard';
import type { LayoutServerLoad } from './$types';

// Renders the 403 page for signed-in people without the admin role (hooks.server.ts refuses
// their form posts; each page and action below checks again).
export const load: LayoutServerLoad = ({ locals }) => {
	requireUser(locals, ['admin']);
};
