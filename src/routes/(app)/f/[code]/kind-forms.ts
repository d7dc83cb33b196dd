/**
 * The card's quick forms, one per event kind, as data: which fields, how they become the
 * payload the shared schema checks. Two kinds have fuller forms elsewhere: the card logs an
 * inspection with InspectionForm (a grade per contact), so the entry here only names its button;
 * a break-in run with readings is logged on the break-in page, while the quick form here logs the
 * cycles of a run without readings.
 */
import type { CautionKind } from '$lib/content/cautions';
import { CLEANING_CAUTIONS } from '$lib/content/fixture-cautions';
import type { EventKind } from '$lib/schemas/events';
import { INSPECTION_VERDICTS, WEAR_GRADES, WEAR_MARKS } from '$lib/schemas/wear';

export type FieldValue = string | number | boolean | string[] | null;
export type FormValues = Record<string, FieldValue>;

interface Base {
	name: string;
	label: string;
	hint?: string;
	/** Payload path the schema reports errors under (default: name). */
	path?: string;
	/** Message when left empty; the field is optional without it. */
	required?: string;
	/** Shown only when this returns true. */
	showIf?: (v: FormValues) => boolean;
}
export type FieldSpec =
	| (Base & { type: 'text' | 'textarea' })
	| (Base & { type: 'number'; min?: number; initial?: number })
	| (Base & { type: 'choice' | 'multi'; options: { value: string; label: string }[] })
	| (Base & { type: 'toggle' });

export interface KindForm {
	kind: EventKind;
	title: string;
	submit: string;
	fields: FieldSpec[];
	cautions?: readonly CautionKind[];
	toPayload: (v: FormValues) => Record<string, unknown>;
}

/** Trimmed text, or undefined when empty (the schemas refuse empty strings). */
const text = (v: FieldValue) => (typeof v === 'string' && v.trim() ? v.trim() : undefined);
const list = (v: FieldValue) => (Array.isArray(v) ? v : []);
const num = (v: FieldValue) => (typeof v === 'number' ? v : undefined);
/** Drops undefined members, so optional fields are absent rather than empty. */
const compact = (o: Record<string, unknown>) =>
	Object.fromEntries(Object.entries(o).filter(([, x]) => x !== undefined));

const note = (label = 'Note'): FieldSpec => ({ name: 'note', label, type: 'textarea' });

const CLEANING_LABELS: Record<string, string> = {
	'dry-wipe': 'Dry wipe (lint-free cloth)',
	'solvent-wipe': 'Solvent wipe',
	'ultrasonic-bath': 'Ultrasonic bath',
	'air-blow': 'Compressed air',
	other: 'Other'
};

export const KIND_FORMS: Partial<Record<EventKind, KindForm>> = {
	cleaning: {
		kind: 'cleaning',
		title: 'Cleaning',
		submit: 'Log cleaning',
		cautions: CLEANING_CAUTIONS,
		fields: [
			{
				name: 'method',
				label: 'How was it cleaned?',
				type: 'choice',
				required: 'Choose how it was cleaned.',
				options: Object.entries(CLEANING_LABELS).map(([value, label]) => ({ value, label }))
			},
			{ name: 'relubricated', label: 'Contacts relubricated', type: 'toggle' },
			{
				name: 'lubricant',
				label: 'Lubricant',
				type: 'text',
				showIf: (v) => v.relubricated === true
			},
			note()
		],
		toPayload: (v) =>
			compact({
				method: text(v.method),
				relubricated: v.relubricated === true,
				lubricant: v.relubricated === true ? text(v.lubricant) : undefined,
				note: text(v.note)
			})
	},
	note: {
		kind: 'note',
		title: 'Note',
		submit: 'Log note',
		fields: [{ name: 'text', label: 'Note', type: 'textarea', required: 'Write the note first.' }],
		toPayload: (v) => compact({ text: text(v.text) })
	},
	inspection: {
		kind: 'inspection',
		title: 'Inspection',
		submit: 'Log inspection',
		fields: [
			{
				name: 'contact',
				label: 'Contact inspected',
				type: 'text',
				path: 'contacts.0.contact',
				hint: 'e.g. “ball 2” or “all contacts”',
				required: 'Say which contact you looked at.'
			},
			{
				name: 'grade',
				label: 'Wear grade',
				type: 'choice',
				path: 'contacts.0.grade',
				required: 'Choose a wear grade.',
				options: WEAR_GRADES.map((g) => ({
					value: String(g.grade),
					label: `${g.grade} ${g.name} — ${g.cue}`
				}))
			},
			{
				name: 'marks',
				label: 'Marks seen',
				type: 'multi',
				path: 'contacts.0.marks',
				options: WEAR_MARKS.map((m) => ({ value: m, label: m }))
			},
			{
				name: 'verdict',
				label: 'Verdict',
				type: 'choice',
				required: 'Choose a verdict.',
				options: INSPECTION_VERDICTS.map((x) => ({ value: x, label: x }))
			},
			note()
		],
		toPayload: (v) =>
			compact({
				contacts: [
					{
						contact: text(v.contact),
						grade: typeof v.grade === 'string' ? Number(v.grade) : undefined,
						marks: list(v.marks)
					}
				],
				verdict: text(v.verdict),
				note: text(v.note)
			})
	},
	'break-in': {
		kind: 'break-in',
		title: 'Break-in run',
		submit: 'Log break-in run',
		fields: [
			{
				name: 'cycles',
				label: 'Cycles run',
				type: 'number',
				min: 1,
				required: 'Enter the cycles run.'
			},
			note()
		],
		toPayload: (v) => compact({ cycles: num(v.cycles), note: text(v.note) })
	},
	'part-swap': {
		kind: 'part-swap',
		title: 'Part swap',
		submit: 'Log part swap',
		fields: [
			{
				name: 'replaced',
				label: 'Replaced',
				type: 'multi',
				required: 'Tick what was replaced.',
				options: [
					{ value: 'balls', label: 'Balls' },
					{ value: 'seats', label: 'Seats (vees, grooves, sockets, flats)' },
					{ value: 'preload', label: 'Preload parts' },
					{ value: 'whole-fixture', label: 'Whole fixture' },
					{ value: 'other', label: 'Other' }
				]
			},
			{ name: 'description', label: 'Description', type: 'text' },
			note()
		],
		toPayload: (v) =>
			compact({ replaced: list(v.replaced), description: text(v.description), note: text(v.note) })
	},
	hold: {
		kind: 'hold',
		title: 'Hold',
		submit: 'Put on hold',
		fields: [
			{ name: 'reason', label: 'Reason', type: 'textarea', required: 'Say why it is held.' }
		],
		toPayload: (v) => compact({ reason: text(v.reason) })
	},
	release: {
		kind: 'release',
		title: 'Release',
		submit: 'Release',
		fields: [note()],
		toPayload: (v) => compact({ note: text(v.note) })
	}
};

/** Starting values of a form. */
export function initialValues(form: KindForm): FormValues {
	return Object.fromEntries(
		form.fields.map((f) => [
			f.name,
			f.type === 'toggle'
				? false
				: f.type === 'multi'
					? []
					: f.type === 'number'
						? (f.initial ?? null)
						: ''
		])
	);
}

/** Messages for required fields left empty (checked before the schema, in plainer words). */
export function missingFields(form: KindForm, v: FormValues): Record<string, string> {
	const out: Record<string, string> = {};
	for (const f of form.fields) {
		if (!f.required || (f.showIf && !f.showIf(v))) continue;
		const x = v[f.name];
		const empty = x === null || x === '' || (Array.isArray(x) && x.length === 0);
		if (empty) out[f.name] = f.required;
	}
	return out;
}
