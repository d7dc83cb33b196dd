import { describe, expect, it } from 'vitest';
import { breakInCautions, handlingCautions } from './fixture-cautions';

describe('handlingCautions', () => {
	it('warns of a heavy lift from 15 kg (common practice), not below', () => {
		expect(handlingCautions({ type: 'plate', mass_kg: 14.99 })).toEqual([]);
		expect(handlingCautions({ type: 'plate', mass_kg: 15 })).toEqual(['heavy']);
		expect(handlingCautions({ type: 'plate', mass_kg: null })).toEqual([]);
	});

	it('warns of pinch points on couplings and pallets', () => {
		expect(handlingCautions({ type: 'three-vee', mass_kg: 2 })).toEqual(['pinch']);
		expect(handlingCautions({ type: 'trihedral-vee-flat', mass_kg: null })).toEqual(['pinch']);
		expect(handlingCautions({ type: 'pallet', mass_kg: 22 })).toEqual(['heavy', 'pinch']);
		expect(handlingCautions({ type: 'vise', mass_kg: 3 })).toEqual([]);
	});
});

describe('breakInCautions', () => {
	it('always warns of pinch points, and of a heavy lift unless the mass is known to be light', () => {
		expect(breakInCautions({ type: 'vise', mass_kg: 3 })).toEqual(['pinch']);
		expect(breakInCautions({ type: 'three-vee', mass_kg: 15 })).toEqual(['heavy', 'pinch']);
		expect(breakInCautions({ type: 'plate', mass_kg: null })).toEqual(['heavy', 'pinch']);
	});
});
