import { normaliseFixtureCode } from '$lib/domain/fixture-code';
import { splitCodes } from '$lib/schemas/labels';
import { requireUser } from '$lib/server/guard';
import type { LabelContent } from '$lib/server/labels/pdf';
import { labelOrigin } from '$lib/server/labels/qr';
import * as select from '$lib/server/labels/select';
import type { PageServerLoad } from './$types';

/** Labels sent for the preview: more than the fullest first sheet of any layout (5 × 15). */
const PREVIEW = 80;

/** What the page is printing, from its query (?codes=… | ?area=<id> | ?all=1). */
export type LabelPageSelection =
	| { kind: 'none' }
	| { kind: 'codes'; codes: string[]; invalid: string[]; missing: string[] }
	| { kind: 'area'; areaId: number }
	| { kind: 'all' };

export const load: PageServerLoad = async ({ locals, url }) => {
	requireUser(locals, 'label.print');
	const q = url.searchParams;
	const areas = await select.labelAreas();
	const total = areas.reduce((sum, a) => sum + a.count, 0);

	let selection: LabelPageSelection = { kind: 'none' };
	let labels: LabelContent[] = [];
	let count = 0;
	const codesText = q.get('codes');
	const areaId = Number(q.get('area'));
	if (codesText !== null) {
		const codes: string[] = [];
		const invalid: string[] = [];
		for (const raw of splitCodes(codesText)) {
			const r = normaliseFixtureCode(raw);
			if (r.ok) codes.push(r.code);
			else invalid.push(`${raw}: ${r.error}`);
		}
		const found = await select.labelsForCodes(codes);
		selection = { kind: 'codes', codes, invalid, missing: found.missing };
		labels = found.labels;
		count = labels.length;
	} else if (Number.isInteger(areaId) && areas.some((a) => a.id === areaId)) {
		selection = { kind: 'area', areaId };
		[labels, count] = await Promise.all([
			select.labelsFor({ areaId }, PREVIEW),
			select.countLabels({ areaId })
		]);
	} else if (q.get('all') === '1') {
		selection = { kind: 'all' };
		labels = await select.labelsFor({ all: true }, PREVIEW);
		count = total;
	}

	return {
		areas,
		total,
		selection,
		count,
		preview: labels.slice(0, PREVIEW),
		origin: labelOrigin(url.origin)
	};
};
