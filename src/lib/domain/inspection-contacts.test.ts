import { describe, expect, it } from 'vitest';
import { threeVeeContacts, trihedralVeeFlatContacts } from './coupling-geometry';
import { inspectionContactNames } from './inspection-contacts';

const labels = (cs: { label?: string }[]) => cs.map((c) => c.label);

describe('inspectionContactNames', () => {
	it('turns a three-vee geometry’s six flank points into three balls and three vees', () => {
		const contacts = threeVeeContacts({
			ballCircleRadius_mm: 50,
			contactAngle_deg: 45,
			ballDiameter_mm: 12.7
		});
		expect(inspectionContactNames(labels(contacts))).toEqual([
			'Ball 1',
			'Ball 2',
			'Ball 3',
			'Vee 1',
			'Vee 2',
			'Vee 3'
		]);
	});

	it('turns a trihedral–vee–flat geometry into its balls, socket, vee and flat', () => {
		const contacts = trihedralVeeFlatContacts({
			ballCircleRadius_mm: 40,
			contactAngle_deg: 45,
			ballDiameter_mm: 10
		});
		expect(inspectionContactNames(labels(contacts))).toEqual([
			'Ball 1',
			'Ball 2',
			'Ball 3',
			'Trihedral socket',
			'Vee',
			'Flat'
		]);
	});

	it('uses a table’s labels as written, one per part, and nothing for no labels', () => {
		expect(
			inspectionContactNames(['groove A flank A', 'groove A flank B', 'pad 2', '', undefined])
		).toEqual(['Groove A', 'Pad 2']);
		expect(inspectionContactNames([])).toEqual([]);
	});
});
