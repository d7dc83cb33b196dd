// A stand-in for the board page so the fleet charts can be tried in this branch; the board's own
// page (Today, Needs attention, filters) replaces it and wires `trends` into its load.
import { readFleetTrendsQuery } from '$lib/schemas/fleet-trends';
import { fleetTrends } from '$lib/server/fleet-trends';
import { requireUser } from '$lib/server/guard';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const actor = requireUser(locals, 'fleet.view');
	const area = url.searchParams.get('area') ?? '';
	const parsed = readFleetTrendsQuery(new URLSearchParams(area ? { area } : {}));
	return {
		trends: parsed.success ? await fleetTrends(actor, parsed.data) : null,
		query: area ? { area } : ({} as Record<string, string>)
	};
};
