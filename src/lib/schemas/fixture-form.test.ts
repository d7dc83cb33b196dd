import { describe, expect, it } from 'vitest';
import {
	fieldErrors,
	fixtureCodeSchema,
	fixtureCreateSchema,
	fixturePatchSchema,
	latestAllowedDate,
	parseRegisterQuery,
	registerQueryString,
	registerQuerySchema
} from './fixture-form';

const valid = {
	name: 'Pallet A, lathe 1',
	type: 'three-vee',
	locationId: '7',
	status: 'in-service',
	repeatabilitySpec_um: '0.5',
	ratedLifeCycles: '50000',
	ballMaterial: '52100 steel',
	seatMaterial: 'Carbide',
	ballDiameter_mm: '12.7',
	preload_N: '450',
	mass_kg: '18.2',
	commissionedOn: '2024-03-18',
	notes: ''
};

function errorsOf(input: Record<string, unknown>) {
	const r = fixtureCreateSchema.safeParse(input);
	expect(r.success).toBe(false);
	return r.success ? {} : fieldErrors(r.error);
}

describe('fixtureCreateSchema', () => {
	it('reads form strings into typed values and blanks into null', () => {
		const r = fixtureCreateSchema.parse(valid);
		expect(r).toEqual({
			name: 'Pallet A, lathe 1',
			type: 'three-vee',
			locationId: 7,
			status: 'in-service',
			repeatabilitySpec_um: 0.5,
			ratedLifeCycles: 50000,
			ballMaterial: '52100 steel',
			seatMaterial: 'Carbide',
			ballDiameter_mm: 12.7,
			preload_N: 450,
			mass_kg: 18.2,
			commissionedOn: '2024-03-18',
			notes: null
		});
	});

	it('needs only a name, a type and a location; status defaults to in service', () => {
		const r = fixtureCreateSchema.parse({ name: 'Rack', type: 'other', locationId: 3 });
		expect(r.status).toBe('in-service');
		expect(r.mass_kg).toBeNull();
		expect(r.commissionedOn).toBeNull();
	});

	it('accepts a type or status by its label, in any case', () => {
		const r = fixtureCreateSchema.parse({
			...valid,
			type: 'trihedral–vee–flat coupling',
			status: 'ON HOLD'
		});
		expect(r.type).toBe('trihedral-vee-flat');
		expect(r.status).toBe('on-hold');
	});

	it('gives a message per field', () => {
		const e = errorsOf({ ...valid, name: '   ', type: 'spindle', locationId: '' });
		expect(e.name).toEqual(['Give the fixture a name.']);
		expect(e.type?.[0]).toMatch(/"spindle" is not a fixture type/);
		expect(e.locationId).toEqual(['Choose a location.']);
	});

	it('keeps the repeatability spec positive and at most 1000 µm', () => {
		expect(errorsOf({ ...valid, repeatabilitySpec_um: '0' }).repeatabilitySpec_um?.[0]).toMatch(
			/more than 0 µm/
		);
		expect(errorsOf({ ...valid, repeatabilitySpec_um: '-1' }).repeatabilitySpec_um).toBeDefined();
		expect(
			errorsOf({ ...valid, repeatabilitySpec_um: '1000.5' }).repeatabilitySpec_um?.[0]
		).toMatch(/at most 1000 µm/);
		expect(
			fixtureCreateSchema.parse({ ...valid, repeatabilitySpec_um: '1000' }).repeatabilitySpec_um
		).toBe(1000);
	});

	it('says what is wrong with a number written with its unit or a decimal comma', () => {
		const e = errorsOf({
			...valid,
			repeatabilitySpec_um: '2 µm',
			preload_N: '2,5',
			mass_kg: 'heavy'
		});
		expect(e.repeatabilitySpec_um?.[0]).toBe(
			'Enter the number only: the unit is already µm (got "2 µm").'
		);
		expect(e.preload_N?.[0]).toBe('Use a decimal point, not a comma: 2.5.');
		expect(e.mass_kg?.[0]).toBe('"heavy" is not a number.');
	});

	it('wants whole rated-life cycles', () => {
		expect(errorsOf({ ...valid, ratedLifeCycles: '100.5' }).ratedLifeCycles?.[0]).toMatch(/whole/);
	});

	it('rejects impossible and future commissioning dates', () => {
		expect(errorsOf({ ...valid, commissionedOn: '2024-02-30' }).commissionedOn).toEqual([
			'That date does not exist.'
		]);
		expect(errorsOf({ ...valid, commissionedOn: '18/03/2024' }).commissionedOn?.[0]).toMatch(
			/YYYY-MM-DD/
		);
		const future = new Date(Date.now() + 3 * 86400_000).toISOString().slice(0, 10);
		expect(errorsOf({ ...valid, commissionedOn: future }).commissionedOn).toEqual([
			'The commissioning date cannot be in the future.'
		]);
		const today = new Date().toISOString().slice(0, 10);
		expect(fixtureCreateSchema.parse({ ...valid, commissionedOn: today }).commissionedOn).toBe(
			today
		);
	});

	it('allows the local date of a shop up to 14 hours ahead of UTC', () => {
		expect(latestAllowedDate(new Date('2025-06-01T09:59:00Z'))).toBe('2025-06-01');
		expect(latestAllowedDate(new Date('2025-06-01T10:00:00Z'))).toBe('2025-06-02');
	});
});

describe('fixturePatchSchema', () => {
	it('changes only what is sent and clears with null', () => {
		expect(fixturePatchSchema.parse({ name: 'New' })).toEqual({ name: 'New' });
		expect(fixturePatchSchema.parse({ mass_kg: null, notes: '' })).toEqual({
			mass_kg: null,
			notes: null
		});
	});

	it('refuses an empty change and still validates each field', () => {
		expect(fixturePatchSchema.safeParse({}).success).toBe(false);
		const r = fixturePatchSchema.safeParse({ repeatabilitySpec_um: 5000 });
		expect(r.success).toBe(false);
	});
});

describe('fixtureCodeSchema', () => {
	it('normalises a typed code and rejects ambiguous characters', () => {
		expect(fixtureCodeSchema.parse('nm 2222 2')).toBe('NM-22222');
		const r = fixtureCodeSchema.safeParse('NM-0000');
		expect(r.success).toBe(false);
		if (!r.success) expect(r.error.issues[0].message).toMatch(/zero/);
	});
});

describe('register query', () => {
	it('fills defaults and reads numbers from the URL', () => {
		const { query, errors } = parseRegisterQuery(
			new URLSearchParams('q=lathe&site=2&type=pallet&flag=any&page=3')
		);
		expect(errors).toBeNull();
		expect(query).toMatchObject({
			q: 'lathe',
			site: 2,
			type: 'pallet',
			flag: 'any',
			sort: 'code',
			dir: 'asc',
			page: 3,
			pageSize: 25
		});
	});

	it('treats empty parameters (a form with blank selects) as absent', () => {
		const { query, errors } = parseRegisterQuery(new URLSearchParams('q=&site=&type=&page='));
		expect(errors).toBeNull();
		expect(query.site).toBeUndefined();
		expect(query.type).toBeUndefined();
		expect(query.page).toBe(1);
	});

	it('limits the page size to 100 and reports bad values, keeping the good ones', () => {
		expect(registerQuerySchema.safeParse({ pageSize: '101' }).success).toBe(false);
		expect(registerQuerySchema.parse({ pageSize: '100' }).pageSize).toBe(100);
		const { query, errors } = parseRegisterQuery(
			new URLSearchParams('pageSize=500&status=lost&q=vee&sort=colour')
		);
		expect(Object.keys(errors ?? {}).sort()).toEqual(['pageSize', 'sort', 'status']);
		expect(query).toMatchObject({ q: 'vee', pageSize: 25, sort: 'code' });
		expect(query.status).toBeUndefined();
	});

	it('writes short URLs that read back to the same query', () => {
		const q = registerQuerySchema.parse({ q: 'flat mount', area: '4', dir: 'desc', page: '2' });
		const s = registerQueryString(q);
		expect(s).toBe('?q=flat+mount&area=4&dir=desc&page=2');
		expect(parseRegisterQuery(new URLSearchParams(s)).query).toEqual(q);
		expect(registerQueryString(registerQuerySchema.parse({}))).toBe('');
	});
});

describe('what a JSON body can carry', () => {
	it('refuses text that is not valid Unicode, naming the field', () => {
		const r = fixturePatchSchema.safeParse({ name: 'Pallet \ud800', notes: 'x\udc00' });
		expect(r.error?.issues.map((i) => [i.path.join('.'), i.message])).toEqual([
			['name', 'The name contains text that is not valid Unicode (a lone surrogate); retype it.'],
			['notes', 'Notes contains text that is not valid Unicode (a lone surrogate); retype it.']
		]);
	});

	it('answers a deeply nested value with a message, not a stack overflow', () => {
		const deep = JSON.parse('['.repeat(5000) + ']'.repeat(5000));
		const r = fixturePatchSchema.safeParse({ type: deep, status: { a: 1 } });
		expect(r.error?.issues.map((i) => i.message)).toEqual([
			'"a list" is not a fixture type; use one of: three-vee, trihedral-vee-flat, pallet, vise, plate, other.',
			'"an object" is not a status; use one of: in-service, breaking-in, on-hold, retired.'
		]);
	});
});
