import { describe, expect, it } from 'vitest';
import {
	ACTIONS,
	LOG_KINDS,
	PERMISSIONS,
	can,
	loggableKinds,
	refusal,
	roleCan,
	rolesThatCan,
	type Action
} from './permissions';
import { EVENT_KINDS, type EventKind } from './schemas/events';
import { ROLES, type Role } from './schemas/roles';

// Written out by hand, not derived from the table: a change to who may do what must change both.
const EXPECTED: Record<Action, Role[]> = {
	'fixture.view': ['operator', 'technician', 'supervisor', 'planner', 'admin'],
	'fixture.edit': ['supervisor', 'admin'],
	'geometry.edit': ['supervisor', 'admin'],
	'event.log': ['operator', 'technician', 'supervisor', 'planner', 'admin'],
	'policy.edit': ['supervisor', 'admin'],
	'policy.defaults': ['admin'],
	'place.edit': ['admin'],
	'label.print': ['supervisor', 'admin'],
	'user.admin': ['admin'],
	'mail.view': ['admin'],
	'fleet.view': ['supervisor', 'planner', 'admin'],
	'work-order.plan': ['supervisor', 'planner', 'admin'],
	'work-order.carry-out': ['technician', 'supervisor', 'admin'],
	'stock.manage': ['planner', 'admin'],
	'office.settings': ['admin'],
	'mail.admin': ['admin']
};

const EVERYTHING: EventKind[] = [...EVENT_KINDS];
const EXPECTED_KINDS: Record<Role, EventKind[]> = {
	operator: ['reseat', 'cleaning', 'note'],
	technician: EVERYTHING,
	supervisor: EVERYTHING,
	planner: ['note'],
	admin: EVERYTHING
};

describe('the permission table', () => {
	it('has a row for every action and nothing else', () => {
		expect(Object.keys(PERMISSIONS).sort()).toEqual([...ACTIONS].sort());
		expect(Object.keys(EXPECTED).sort()).toEqual([...ACTIONS].sort());
	});

	for (const action of ACTIONS) {
		for (const role of ROLES) {
			const allowed = EXPECTED[action].includes(role);
			it(`${role} ${allowed ? 'may' : 'may not'} ${action}`, () => {
				expect(can({ roles: [role] }, action)).toBe(allowed);
				expect(roleCan(role, action)).toBe(allowed);
			});
		}
	}

	for (const role of ROLES) {
		for (const kind of EVENT_KINDS) {
			const allowed = EXPECTED_KINDS[role].includes(kind);
			it(`${role} ${allowed ? 'may' : 'may not'} log a ${kind}`, () => {
				expect(can({ roles: [role] }, 'event.log', { kind })).toBe(allowed);
			});
		}
	}

	it('keeps the kinds per role in one place', () => {
		expect(LOG_KINDS).toEqual(EXPECTED_KINDS);
	});
});

describe('can', () => {
	it('refuses nobody signed in and a person with no role', () => {
		for (const action of ACTIONS) {
			expect(can(null, action)).toBe(false);
			expect(can(undefined, action)).toBe(false);
			expect(can({ roles: [] }, action)).toBe(false);
		}
		expect(can({ roles: [] }, 'event.log', { kind: 'note' })).toBe(false);
	});

	it('gives a person with several roles the union of what they allow', () => {
		const both = { roles: ['operator', 'planner'] as Role[] };
		expect(can(both, 'fixture.edit')).toBe(false);
		expect(can(both, 'event.log', { kind: 'inspection' })).toBe(false);
		expect(can(both, 'event.log', { kind: 'reseat' })).toBe(true);
		const opAndSup = { roles: ['operator', 'supervisor'] as Role[] };
		expect(can(opAndSup, 'event.log', { kind: 'inspection' })).toBe(true);
		expect(can(opAndSup, 'label.print')).toBe(true);
		expect(can(opAndSup, 'user.admin')).toBe(false);
	});
});

describe('helpers for the pages and messages', () => {
	it('lists the roles that may do something, in the order of ROLES', () => {
		expect(rolesThatCan('fixture.edit')).toEqual(['supervisor', 'admin']);
		expect(rolesThatCan('event.log', { kind: 'inspection' })).toEqual([
			'technician',
			'supervisor',
			'admin'
		]);
		expect(rolesThatCan('event.log', { kind: 'note' })).toEqual([...ROLES]);
		expect(rolesThatCan('mail.view')).toEqual(['admin']);
	});

	it('lists the kinds a person may log, for the card to show only those buttons', () => {
		expect(loggableKinds({ roles: ['operator'] })).toEqual(['reseat', 'cleaning', 'note']);
		expect(loggableKinds({ roles: ['planner'] })).toEqual(['note']);
		expect(loggableKinds({ roles: ['technician'] })).toEqual(EVERYTHING);
		expect(loggableKinds({ roles: ['operator', 'planner'] })).toEqual([
			'reseat',
			'cleaning',
			'note'
		]);
		expect(loggableKinds(null)).toEqual([]);
	});

	it('says which role is needed, in words', () => {
		expect(refusal('label.print')).toBe('You need the supervisor or admin role to print labels.');
		expect(refusal('user.admin')).toBe('You need the admin role to manage people and their roles.');
		for (const action of ACTIONS) expect(refusal(action)).toMatch(/^You need the .+ role to .+\.$/);
	});
});
