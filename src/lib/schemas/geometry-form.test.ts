import { describe, expect, it } from 'vitest';
import { MATERIALS } from '../domain/hertz';
import {
	evaluateGeometryForm,
	formFromFixture,
	formFromSaved,
	materialFields,
	materialFromText
} from './geometry-form';

describe('materials between the register, the saved geometry and the form', () => {
	it('reads the register’s free-text material as the nearest listed choice', () => {
		expect(materialFromText('Si3N4 balls')).toBe('silicon-nitride');
		expect(materialFromText('WC')).toBe('tungsten-carbide');
		expect(materialFromText('silicon carbide')).toBe('silicon-carbide');
		expect(materialFromText('Al2O3 seat')).toBe('alumina');
		expect(materialFromText('440C')).toBe('steel-440c');
		expect(materialFromText(null)).toBe('steel-52100');
	});

	it('gives back a listed material as its choice and anything else as custom E and ν', () => {
		const nitride = MATERIALS['silicon-nitride'];
		expect(materialFields('ball', { E_GPa: nitride.E_GPa, nu: nitride.nu })).toEqual({
			ballMaterial: 'silicon-nitride'
		});
		expect(materialFields('seat', { E_GPa: 123, nu: 0.25 })).toEqual({
			seatMaterial: 'custom',
			seatE_GPa: '123',
			seatNu: '0.25'
		});
		expect(materialFields('seat', null)).toEqual({});
	});
});

describe('the form filled from a saved version or from the register', () => {
	it('fills a table geometry’s rows as text, and a three-vee’s parameters', () => {
		const { values, rows } = formFromSaved({
			kind: 'table',
			params: null,
			contacts: [{ point: [1, 2, 3], normal: [0, 0, 1], label: 'A' }],
			ballDiameter_mm: 10,
			preload_N: 200,
			ballMaterial: null,
			seatMaterial: null
		});
		expect(values.kind).toBe('table');
		expect(values.preload_N).toBe('200');
		expect(rows).toEqual([{ px: '1', py: '2', pz: '3', nx: '0', ny: '0', nz: '1', label: 'A' }]);

		const vee = formFromSaved({
			kind: 'three-vee',
			params: { ballCircleRadius_mm: 40, contactAngle_deg: 30 },
			contacts: [],
			ballDiameter_mm: null,
			preload_N: null,
			ballMaterial: null,
			seatMaterial: null
		});
		expect(vee.values).toMatchObject({ ballCircleRadius_mm: '40', contactAngle_deg: '30' });
		expect(vee.values.grooveYaw_deg).toBe('0');
		expect(vee.rows).toEqual([]);
	});

	it('starts a fixture with no saved geometry from its type and register facts', () => {
		const values = formFromFixture({
			type: 'trihedral-vee-flat',
			ballDiameter_mm: null,
			preload_N: 150,
			ballMaterial: 'Si3N4',
			seatMaterial: null
		});
		expect(values).toMatchObject({
			kind: 'trihedral-vee-flat',
			ballDiameter_mm: '12.7',
			preload_N: '150',
			ballMaterial: 'silicon-nitride',
			seatMaterial: 'steel-52100'
		});
	});
});

describe('evaluateGeometryForm', () => {
	it('checks the default three-vee coupling: six contacts, exactly constrained', () => {
		const values = formFromFixture({
			type: 'three-vee',
			ballDiameter_mm: null,
			preload_N: null,
			ballMaterial: null,
			seatMaterial: null
		});
		const { errors, report, form } = evaluateGeometryForm(values, []);
		expect(errors).toBeNull();
		expect(form?.kind).toBe('three-vee');
		// Three balls in three vees: six point contacts remove all six freedoms (common practice).
		expect(report?.contactCount).toBe(6);
		expect(report?.dof).toBe(0);
		expect(report?.status).toBe('exact');
	});

	it('answers a bad field with its message and no report', () => {
		const { errors, report } = evaluateGeometryForm(
			{
				...formFromFixture({
					type: 'three-vee',
					ballDiameter_mm: null,
					preload_N: null,
					ballMaterial: null,
					seatMaterial: null
				}),
				preload_N: '3,5'
			},
			[]
		);
		expect(report).toBeNull();
		expect(errors?.preload_N).toMatch(/decimal point/);
	});
});
