import { parseFleetQuery } from '$lib/schemas/fleet';
import { fleetSummary } from '$lib/server/fleet';
import { requireUser } from '$lib/server/guard';
import * as places from '$lib/server/places';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const actor = requireUser(locals, 'fleet.view');
	// A shared link with a bad value still opens: the bad filter is dropped and named on the page.
	const { query, errors } = parseFleetQuery(url.searchParams);
	const [summary, tree] = await Promise.all([fleetSummary(actor, query), places.tree()]);
	return {
		summary,
		query,
		queryErrors: errors,
		tree,
		// The charts helper wires its data in here (see FleetCharts.svelte).
		trends: null
	};
};
