import { json } from '@sveltejs/kit';
import { safeParseFleetQuery } from '$lib/schemas/fleet';
import { apiError } from '$lib/server/api-answers';
import { fleetSummary } from '$lib/server/fleet';
import { apiUser } from '$lib/server/guard';
import type { RequestHandler } from './$types';

/** The fleet board: open flags by kind, on hold, geometry not exact, and what needs attention. */
export const GET: RequestHandler = async ({ locals, url }) => {
	const actor = apiUser(locals, 'fleet.view');
	if (actor instanceof Response) return actor;
	const parsed = safeParseFleetQuery(url.searchParams);
	if (!parsed.ok) return apiError(400, 'Invalid query.', parsed.errors);
	return json(await fleetSummary(actor, parsed.query));
};
