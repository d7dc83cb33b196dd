import { describe, expect, it } from 'vitest';
import { parseSyncEvent } from '$lib/schemas/events';
import {
	defaultContacts,
	draftProblems,
	extraContact,
	initialContacts,
	inspectionPayload
} from './inspection-form';

const event = (payload: Record<string, unknown>) => ({
	id: '1b4e28ba-2fa1-4d2b-883f-0016d3cca427',
	fixtureCode: 'NM-4K7QX',
	kind: 'inspection',
	occurredAt: '2026-03-02T08:00:00Z',
	payload
});

describe('the inspection form', () => {
	it('lists a coupling’s balls and seats, and one generic contact for other fixtures', () => {
		expect(defaultContacts('three-vee').map((c) => c.name)).toEqual([
			'Ball 1',
			'Ball 2',
			'Ball 3',
			'Vee 1',
			'Vee 2',
			'Vee 3'
		]);
		expect(defaultContacts('trihedral-vee-flat').map((c) => c.name)).toEqual([
			'Ball 1',
			'Ball 2',
			'Ball 3',
			'Trihedral socket',
			'Vee',
			'Flat'
		]);
		const vise = defaultContacts('vise');
		expect(vise.map((c) => [c.name, c.fixed])).toEqual([['Contact 1', false]]);
		expect(extraContact(vise).name).toBe('Contact 2');
	});

	it('prefers the contacts named by the saved geometry', () => {
		const fromGeometry = initialContacts('three-vee', ['Ball 1', 'Ball 3', 'Vee 1', 'Vee 3']);
		expect(fromGeometry.map((c) => [c.name, c.fixed])).toEqual([
			['Ball 1', true],
			['Ball 3', true],
			['Vee 1', true],
			['Vee 3', true]
		]);
		expect(initialContacts('three-vee', null).map((c) => c.name)).toHaveLength(6);
		expect(initialContacts('plate', []).map((c) => c.name)).toEqual(['Contact 1']);
	});

	it('sends only graded contacts, and the schema accepts the payload', () => {
		const contacts = defaultContacts('three-vee');
		contacts[0].grade = 1;
		contacts[4].grade = 3;
		contacts[4].marks = ['fretting', 'pitting'];
		const payload = inspectionPayload(contacts, 'watch', '  ', [
			'9b1deb4d-3b7d-4bad-9bdd-2b0d7b3dcb6d'
		]);
		expect(payload).toEqual({
			contacts: [
				{ contact: 'Ball 1', grade: 1, marks: [] },
				{ contact: 'Vee 2', grade: 3, marks: ['fretting', 'pitting'] }
			],
			verdict: 'watch',
			photoIds: ['9b1deb4d-3b7d-4bad-9bdd-2b0d7b3dcb6d']
		});
		const parsed = parseSyncEvent(event(payload));
		expect(parsed.ok ? true : parsed.errors).toBe(true);
	});

	it('says in plain words what is missing', () => {
		const contacts = [...defaultContacts('plate')];
		expect(draftProblems(contacts, '')).toEqual({
			contacts: 'Grade at least one contact you looked at.',
			verdict: 'Choose a verdict.'
		});
		const extra = extraContact(contacts);
		contacts.push(extra);
		contacts[0].grade = 2;
		extra.grade = 0;
		extra.name = ' contact 1 ';
		expect(draftProblems(contacts, 'serviceable')).toEqual({
			[`contact.${extra.key}`]: 'Another contact has this name.'
		});
	});
});
