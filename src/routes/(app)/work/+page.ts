import { error } from '@sveltejs/kit';
import { can, refusal } from '$lib/permissions';
import type { PageLoad } from './$types';

/**
 * Who may open /work, judged from the signed-in person the layout already has, so the page needs
 * no server data of its own and a client-side visit opens with no network. Everything it lists
 * comes from the device (see +page.svelte).
 */
export const load: PageLoad = async ({ parent }) => {
	const { user } = await parent();
	if (!can(user, 'work-order.carry-out')) error(403, { message: refusal('work-order.carry-out') });
	return {};
};
