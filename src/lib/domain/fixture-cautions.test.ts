import { describe, expect, it } from 'vitest';
import { handlingCautions } from './fixture-cautions';

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
