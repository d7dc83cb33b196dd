import { json } from '@sveltejs/kit';
import { flagsQuerySchema } from '$lib/schemas/flags-query';
import { scanOnRead } from '$lib/server/due-scan';
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
	if (!parsed.success) {
		const fields: Record<string, string> = {};
		for (const issue of parsed.error.issues) fields[String(issue.path[0])] = issue.message;
		return json({ error: 'Invalid query.', fields }, { status: 400 });
	}
	// Calendar flags fall due without any event: bring them up to date before listing.
	await scanOnRead();
	return json({ flags: await openFlags(parsed.data) });
};
