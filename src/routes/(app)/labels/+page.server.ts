import { requireUser } from '$lib/server/guard';
import { labelOrigin } from '$lib/server/labels/qr';
import { labelPreview } from '$lib/server/labels/select';
import type { PageServerLoad } from './$types';

/** Labels sent for the preview: more than the fullest first sheet of any layout (5 × 15). */
const PREVIEW = 80;

export const load: PageServerLoad = async ({ locals, url }) => {
	requireUser(locals, 'label.print');
	return { ...(await labelPreview(url.searchParams, PREVIEW)), origin: labelOrigin(url.origin) };
};
