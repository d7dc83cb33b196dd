/** Kinds of fixture the register knows. */
export const FIXTURE_TYPES = [
	'three-vee',
	'trihedral-vee-flat',
	'pallet',
	'vise',
	'plate',
	'other'
] as const;
export type FixtureType = (typeof FIXTURE_TYPES)[number];
