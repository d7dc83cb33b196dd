import { parseReportQuery } from '$lib/schemas/audit-report';
import { auditReport } from '$lib/server/audit-report';
import { reportAreas } from '$lib/server/audit-report-rows';
import { requireUser } from '$lib/server/guard';
import type { PageServerLoad } from './$types';

/**
 * The audit report for `?from=&to=&area=` (the last 90 days by default): every section's first
 * page, or with `section=&after=` one section continued. A query that does not hold is shown
 * with its messages beside the form.
 */
export const load: PageServerLoad = async ({ locals, url }) => {
	const actor = requireUser(locals, 'fleet.view');
	const now = new Date();
	const reading = parseReportQuery(url.searchParams, now.toISOString().slice(0, 10));
	const areas = await reportAreas();
	if (!reading.ok) return { areas, values: reading.values, problems: reading.fields, report: null };
	const result = await auditReport(actor, reading.query, { now });
	if (!result.ok) return { areas, values: reading.values, problems: result.fields, report: null };
	return { areas, values: reading.values, problems: null, report: result.report };
};
