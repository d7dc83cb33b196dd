import { json } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/fixture-form';
import { readFleetTrendsQuery } from '$lib/schemas/fleet-trends';
import { apiError } from '$lib/server/api-answers';
import { fleetTrends } from '$lib/server/fleet-trends';
import { apiUser } from '$lib/server/guard';
import type { RequestHandler } from './$types';

/** The fleet charts: `from`/`to` (dates, default the last 12 months) bound the flags chart; `area` narrows all. */
export const GET: RequestHandler = async ({ locals, url }) => {
	const actor = apiUser(locals, 'fleet.view');
	if (actor instanceof Response) return actor;
	const parsed = readFleetTrendsQuery(url.searchParams);
	if (!parsed.success) return apiError(400, 'Invalid query.', fieldErrors(parsed.error));
	const trends = await fleetTrends(actor, parsed.data);
	if (!trends) {
		return apiError(400, 'Invalid query.', {
			area: `There is no area with id ${parsed.data.area}.`
		});
	}
	return json(trends);
};
