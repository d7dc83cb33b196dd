import { parseFleetQuery } from '$lib/schemas/fleet';
import { readFleetTrendsQuery } from '$lib/schemas/fleet-trends';
import { fleetSummary } from '$lib/server/fleet';
import { fleetTrends } from '$lib/server/fleet-trends';
import { can } from '$lib/permissions';
import { requireUser } from '$lib/server/guard';
import { plannedByFlag } from '$lib/server/plan-pages';
import * as places from '$lib/server/places';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const actor = requireUser(locals, 'fleet.view');
	// A shared link with a bad value still opens: the bad filter is dropped and named on the page.
	const { query, errors } = parseFleetQuery(url.searchParams);
	// The charts follow the board's area filter over their default range (the last 12 months).
	const trendsQuery = readFleetTrendsQuery(
		new URLSearchParams(query.area ? { area: String(query.area) } : {})
	);
	const [summary, tree, trends] = await Promise.all([
		fleetSummary(actor, query),
		places.tree(),
		trendsQuery.success ? fleetTrends(actor, trendsQuery.data) : null
	]);
	const planned = await plannedByFlag(
		summary.attention.rows.flatMap((r) => r.flags.map((f) => f.id))
	);
	return {
		summary,
		planned,
		canPlan: can(actor, 'work-order.plan'),
		query,
		queryErrors: errors,
		tree,
		trends
	};
};
