/**
 * The inspection form as data: which contacts a fixture has, what a person filled in for each, and
 * the payload the shared schema checks. Pure, so it is tested without a browser.
 */
import type { FixtureType } from '$lib/schemas/fixture';
import type { InspectionVerdict, WearMark } from '$lib/schemas/wear';

/** One contact on the form; `fixed` ones come from the coupling's design and cannot be renamed. */
export interface ContactDraft {
	key: string;
	name: string;
	fixed: boolean;
	/** Null until graded: contacts left ungraded were not looked at and are not sent. */
	grade: number | null;
	marks: WearMark[];
}

/** Words for each verdict on the form. */
export const VERDICT_LABELS: Record<InspectionVerdict, string> = {
	serviceable: 'Serviceable: keep it in use',
	watch: 'Watch: inspect again sooner',
	replace: 'Replace: plan new balls or seats'
};

let seq = 0;
const draft = (name: string, fixed: boolean): ContactDraft => ({
	key: `c${++seq}`,
	name,
	fixed,
	grade: null,
	marks: []
});

/**
 * The contacts of a fixture of `type`: a coupling's three balls and its seats (three vees; or a
 * trihedral socket, a vee and a flat); for other fixtures one generic contact to rename or add to.
 */
export function defaultContacts(type: FixtureType): ContactDraft[] {
	const balls = ['Ball 1', 'Ball 2', 'Ball 3'];
	if (type === 'three-vee') return [...balls, 'Vee 1', 'Vee 2', 'Vee 3'].map((n) => draft(n, true));
	if (type === 'trihedral-vee-flat') {
		return [...balls, 'Trihedral socket', 'Vee', 'Flat'].map((n) => draft(n, true));
	}
	return [draft('Contact 1', false)];
}

/** The form's contacts: those named by the fixture's saved geometry, else by its type. */
export function initialContacts(
	type: FixtureType,
	fromGeometry: readonly string[] | null | undefined
): ContactDraft[] {
	return fromGeometry?.length ? fromGeometry.map((n) => draft(n, true)) : defaultContacts(type);
}

/** A new generic contact, named after the ones already there. */
export function extraContact(existing: readonly ContactDraft[]): ContactDraft {
	const names = new Set(existing.map((c) => c.name.trim().toLowerCase()));
	let n = existing.length + 1;
	while (names.has(`contact ${n}`)) n += 1;
	return draft(`Contact ${n}`, false);
}

/** Problems to fix before logging, by field ('contacts', 'contact.<key>', 'verdict'). */
export function draftProblems(
	contacts: readonly ContactDraft[],
	verdict: string
): Record<string, string> {
	const out: Record<string, string> = {};
	const graded = contacts.filter((c) => c.grade !== null);
	if (!graded.length) out.contacts = 'Grade at least one contact you looked at.';
	const seen = new Set<string>();
	for (const c of graded) {
		const name = c.name.trim().toLowerCase();
		if (!name) out[`contact.${c.key}`] = 'Name this contact.';
		else if (seen.has(name)) out[`contact.${c.key}`] = 'Another contact has this name.';
		seen.add(name);
	}
	if (!verdict) out.verdict = 'Choose a verdict.';
	return out;
}

/** The inspection payload: graded contacts only, in form order. */
export function inspectionPayload(
	contacts: readonly ContactDraft[],
	verdict: string,
	note: string,
	photoIds: readonly string[]
): Record<string, unknown> {
	return {
		contacts: contacts
			.filter((c) => c.grade !== null)
			.map((c) => ({ contact: c.name.trim(), grade: c.grade, marks: [...c.marks] })),
		verdict,
		photoIds: [...photoIds],
		...(note.trim() ? { note: note.trim() } : {})
	};
}
