import { parseReportQuery } from '$lib/schemas/audit-report';
import { auditReport } from '$lib/server/audit-report';
import { renderAuditReportPdf } from '$lib/server/audit-report-pdf';
import { requireUser } from '$lib/server/guard';
import { pdfDownload } from '$lib/server/pdf-download';
import type { RequestHandler } from './$types';

const badQuery = (fields: Record<string, string[]>) =>
	new Response(
		`The report cannot be made:\n${Object.values(fields)
			.flat()
			.map((m) => `- ${m}`)
			.join('\n')}\n`,
		{ status: 400, headers: { 'Content-Type': 'text/plain; charset=utf-8' } }
	);

/**
 * `GET /board/report.pdf?from=&to=&area=`: the whole audit report (every section, up to
 * REPORT_PDF_SECTION_ROWS rows each) as a PDF download named after its range.
 */
export const GET: RequestHandler = async ({ locals, url }) => {
	const actor = requireUser(locals, 'fleet.view');
	const now = new Date();
	const reading = parseReportQuery(url.searchParams, now.toISOString().slice(0, 10));
	if (!reading.ok) return badQuery(reading.fields);
	// Counts only here: the PDF reads each section itself, a page at a time.
	const query = { ...reading.query, section: null, after: null };
	const result = await auditReport(actor, query, { now, pageRows: 0 });
	if (!result.ok) return badQuery(result.fields);

	const bytes = await renderAuditReportPdf(result.report, result.bounds);
	const area = query.area === null ? '' : `-area-${query.area}`;
	return pdfDownload(bytes, `nestmark-audit-${query.from}-${query.to}${area}.pdf`);
};
