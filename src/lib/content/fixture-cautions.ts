import { HEAVY_LIFT_KG, type CautionKind } from './cautions';
import type { FixtureType } from '$lib/domain/fixture-types';

/** Fixture types whose halves close on each other when seated, so fingers can be caught. */
const SEATING_TYPES: readonly FixtureType[] = ['three-vee', 'trihedral-vee-flat', 'pallet'];

/**
 * The handling cautions that apply to a fixture itself: heavy lift at or above
 * HEAVY_LIFT_KG (15 kg, common practice; the shop's lifting rules govern) and pinch points for
 * couplings and pallets. Cleaning cautions (solvents, compressed air) are shown where cleaning is.
 */
export function handlingCautions(f: { type: FixtureType; mass_kg: number | null }): CautionKind[] {
	const kinds: CautionKind[] = [];
	if (f.mass_kg !== null && f.mass_kg >= HEAVY_LIFT_KG) kinds.push('heavy');
	if (SEATING_TYPES.includes(f.type)) kinds.push('pinch');
	return kinds;
}

/** Cautions shown beside cleaning: solvents and lubricants, and compressed air. */
export const CLEANING_CAUTIONS: readonly CautionKind[] = ['solvent', 'air'];

/**
 * Cautions beside a break-in run, where the moving half is lifted and seated again and again:
 * pinch points always (every seating closes the halves), and the heavy lift when the fixture is
 * heavy or its mass is not recorded — a run should not assume a light part.
 */
export function breakInCautions(f: { type: FixtureType; mass_kg: number | null }): CautionKind[] {
	const heavy = f.mass_kg === null || f.mass_kg >= HEAVY_LIFT_KG;
	return [...(heavy ? (['heavy'] as const) : []), 'pinch'];
}
