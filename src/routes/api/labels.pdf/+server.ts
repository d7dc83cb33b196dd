import { json } from '@sveltejs/kit';
import { computeSheetLayout, sheetsNeeded } from '$lib/domain/label-layouts';
import { MAX_LABELS, parseLabelParams } from '$lib/schemas/labels';
import { apiUser } from '$lib/server/guard';
import { renderLabelsPdf, type LabelContent } from '$lib/server/labels/pdf';
import { labelOrigin } from '$lib/server/labels/qr';
import * as select from '$lib/server/labels/select';
import type { RequestHandler } from './$types';

// Sent in pieces so a browser can show download progress on a slow network.
const CHUNK = 64 * 1024;

function badRequest(fields: Record<string, string[]>) {
	return json({ error: 'Check the label settings.', fields }, { status: 400 });
}

/** A file name that says what is inside: what, size and paper. */
function fileName(what: string, layout: string, paper: string) {
	const safe = what.replace(/[^A-Za-z0-9-]+/g, '-').replace(/^-+|-+$/g, '') || 'labels';
	return `nestmark-labels-${safe}-${layout}-${paper}.pdf`;
}

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
		return badRequest(Object.fromEntries(Object.entries(laid.errors).map(([k, m]) => [k, [m]])));
	}
	const layout = laid.layout;
	if (startAt > layout.perSheet) {
		return badRequest({
			startAt: [`This sheet has ${layout.perSheet} labels; start at 1 to ${layout.perSheet}.`]
		});
	}

	let labels: LabelContent[];
	let what: string;
	if ('codes' in source) {
		const found = await select.labelsForCodes(source.codes);
		if (found.missing.length) {
			return json(
				{
					error: `No fixture with code ${found.missing.join(', ')} in the register.`,
					missing: found.missing
				},
				{ status: 404 }
			);
		}
		labels = found.labels;
		what = labels.length === 1 ? labels[0].code : `${labels.length}-fixtures`;
	} else {
		let areaName = 'register';
		if ('areaId' in source) {
			const area = (await select.labelAreas()).find((a) => a.id === source.areaId);
			if (!area) return json({ error: `No area with id ${source.areaId}.` }, { status: 404 });
			areaName = area.name;
		}
		// One more than allowed is enough to know the job is too big.
		labels = await select.labelsFor(source, MAX_LABELS + 1);
		if (labels.length > MAX_LABELS) {
			const field = 'areaId' in source ? 'area' : 'all';
			return badRequest({
				[field]: [`That is more than ${MAX_LABELS} labels; print one area at a time.`]
			});
		}
		if (labels.length === 0) {
			return json({ error: `There are no fixtures in service in ${areaName}.` }, { status: 404 });
		}
		what = areaName;
	}

	const bytes = await renderLabelsPdf(labels, {
		layout,
		startAt,
		origin: labelOrigin(url.origin)
	});
	let offset = 0;
	const body = new ReadableStream<Uint8Array>({
		pull(controller) {
			if (offset >= bytes.length) return controller.close();
			controller.enqueue(bytes.subarray(offset, offset + CHUNK));
			offset += CHUNK;
		}
	});
	return new Response(body, {
		headers: {
			'Content-Type': 'application/pdf',
			'Content-Length': String(bytes.length),
			'Content-Disposition': `attachment; filename="${fileName(what, stock, paper)}"`,
			'Cache-Control': 'private, no-store',
			'X-Label-Count': String(labels.length),
			'X-Sheet-Count': String(sheetsNeeded(labels.length, layout.perSheet, startAt))
		}
	});
};
