import { dueWork } from '$lib/server/fleet';
import { requireUser } from '$lib/server/guard';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals }) => {
	const actor = requireUser(locals, 'fixture.view');
	return { due: await dueWork(actor), generatedAt: new Date().toISOString() };
};
