import { computeSheetLayout, sheetsNeeded } from '$lib/labels/sheet-layouts';
import { MAX_LABELS, parseLabelParams } from '$lib/schemas/labels';
import { apiError } from '$lib/server/api-answers';
import { apiUser } from '$lib/server/guard';
import { renderLabelsPdf } from '$lib/server/labels/pdf';
import { labelOrigin } from '$lib/server/labels/qr';
import * as select from '$lib/server/labels/select';
import { pdfDownload } from '$lib/server/pdf-download';
import type { RequestHandler } from './$types';

const badRequest = (fields: Record<string, string | string[]>) =>
	apiError(400, 'Check the label settings.', fields);

/**
 * `GET /api/labels.pdf?codes=A,B|area=<id>|all=1&layout=&paper=&margin=&gap=&startAt=`:
 * the labels as a PDF, laid out on sheets or one per page.
 */
export const GET: RequestHandler = async ({ locals, url }) => {
	const actor = apiUser(locals, 'label.print');
	if (actor instanceof Response) return actor;

	const reading = parseLabelParams(url.searchParams);
	if (!reading.ok) return badRequest(reading.fields);
	const { source, layout: stock, paper, margin, gap, startAt } = reading.request;

	const laid = computeSheetLayout({ stock, paper, margin_mm: margin, gap_mm: gap });
	if (!laid.ok) {
		return badRequest(laid.errors);
	}
	const layout = laid.layout;
	if (startAt > layout.perSheet) {
		return badRequest({
			startAt: [`This sheet has ${layout.perSheet} labels; start at 1 to ${layout.perSheet}.`]
		});
	}

	const job = await select.labelJob(source, MAX_LABELS);
	if (!job.ok) return apiError(job.status, job.error, job.fields);
	const { labels } = job;

	const bytes = await renderLabelsPdf(labels, {
		layout,
		startAt,
		origin: labelOrigin(url.origin)
	});
	return pdfDownload(bytes, select.labelFileName(job.what, stock, paper), {
		'X-Label-Count': String(labels.length),
		'X-Sheet-Count': String(sheetsNeeded(labels.length, layout.perSheet, startAt))
	});
};
