import { json } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/fixture-form';
import { apiError } from '$lib/server/api-answers';
import { flagsQuerySchema } from '$lib/schemas/flags-query';
import { apiUser } from '$lib/server/guard';
import { openFlags } from '$lib/server/health-report';
import type { RequestHandler } from './$types';

/** Open health flags with their fixture and place; `kind` and `area` (id) narrow the list. */
export const GET: RequestHandler = async ({ locals, url }) => {
	const actor = apiUser(locals);
	if (actor instanceof Response) return actor;
	const parsed = flagsQuerySchema.safeParse({
		kind: url.searchParams.get('kind'),
		area: url.searchParams.get('area')
	});
	if (!parsed.success) return apiError(400, 'Invalid query.', fieldErrors(parsed.error));
	// Calendar flags fall due without any event: brought up to date before listing.
	return json({ flags: await openFlags(parsed.data, { dueScan: true }) });
};
