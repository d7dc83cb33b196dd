import { describe, expect, it } from 'vitest';
import { parseSyncEvent } from '$lib/schemas/events';
import { initialValues, KIND_FORMS, missingFields, type FormValues } from './kind-forms';

const event = (kind: string, payload: Record<string, unknown>) => ({
	id: '1b4e28ba-2fa1-4d2b-883f-0016d3cca427',
	fixtureCode: 'NM-4K7QX',
	kind,
	occurredAt: '2026-03-02T08:00:00Z',
	payload
});

/** What a person might fill in on each quick form. */
const FILLED: Record<string, FormValues> = {
	cleaning: { method: 'solvent-wipe', relubricated: true, lubricant: 'light oil', note: '' },
	note: { text: '  Chip under ball 2  ' },
	inspection: { contact: 'ball 1', grade: '2', marks: ['fretting'], verdict: 'watch', note: '' },
	'break-in': { cycles: 50, note: 'first run' },
	'part-swap': { replaced: ['balls'], description: '', note: '' },
	hold: { reason: 'Scored vee' },
	release: { note: '' }
};

describe('the card’s quick forms', () => {
	for (const [kind, form] of Object.entries(KIND_FORMS)) {
		it(`${kind}: a filled form makes a payload the shared schema accepts`, () => {
			const values = { ...initialValues(form!), ...FILLED[kind] };
			expect(missingFields(form!, values)).toEqual({});
			const parsed = parseSyncEvent(event(kind, form!.toPayload(values)));
			expect(parsed.ok ? true : parsed.errors).toBe(true);
		});
	}

	it('leaves optional empty fields out instead of sending empty text', () => {
		const payload = KIND_FORMS.cleaning!.toPayload({
			method: 'dry-wipe',
			relubricated: false,
			lubricant: 'should not be sent',
			note: '  '
		});
		expect(payload).toEqual({ method: 'dry-wipe', relubricated: false });
	});

	it('names the required fields left empty, in plain words', () => {
		const form = KIND_FORMS.cleaning!;
		expect(missingFields(form, initialValues(form))).toEqual({
			method: 'Choose how it was cleaned.'
		});
		const swap = KIND_FORMS['part-swap']!;
		expect(Object.keys(missingFields(swap, initialValues(swap)))).toEqual(['replaced']);
	});

	it('ignores a required field that is hidden', () => {
		const form = {
			...KIND_FORMS.note!,
			fields: [{ ...KIND_FORMS.note!.fields[0], showIf: () => false }]
		};
		expect(missingFields(form, initialValues(form))).toEqual({});
	});
});
