/**
 * The demo scenario: Larchmere Precision Optics, an invented contract shop. Every name, figure and
 * date here is made up for the demo. Specs are 0.5–2 µm; masses of the lathe pallets put several
 * over the heavy-lift threshold on purpose, so the caution shows in the demo.
 */
import type { FixtureStatus, FixtureType } from '../src/lib/schemas/fixture';
import type { Role } from '../src/lib/schemas/roles';

export const DEMO_SITE = 'Larchmere Precision Optics';

/** Display names for the demo accounts in scripts/demo-accounts.txt. */
export const DEMO_PEOPLE: Record<Role, string> = {
	operator: 'Olga Brennan',
	technician: 'Tomas Okafor',
	supervisor: 'Sara Lindqvist',
	planner: 'Piet Hallam',
	admin: 'Ada Marwick'
};

/** Areas and their locations (machines, benches, shelves). */
export const DEMO_PLACES: Record<string, string[]> = {
	'Diamond-turning bay': ['Lathe DT-1', 'Lathe DT-2', 'Pallet rack', 'Setup bench'],
	'CMM lab': ['CMM 1', 'CMM 2', 'Fixture crib'],
	'Interferometry room': [
		'Interferometer bench A',
		'Interferometer bench B',
		'Reference-flat cabinet'
	]
};

/** One demo fixture. `key` is stable forever: the fixture's code is derived from it. */
export interface DemoFixture {
	key: string;
	name: string;
	type: FixtureType;
	area: string;
	location: string;
	status?: FixtureStatus;
	spec_um?: number;
	ratedLife?: number;
	ball?: string;
	seat?: string;
	ballDia_mm?: number;
	preload_N?: number;
	mass_kg?: number;
	commissioned?: string;
	notes?: string;
}

const SI3N4 = 'Si3N4 (silicon nitride)';
const STEEL = '52100 steel';
const CARBIDE = 'Tungsten carbide';
const HARD = 'Hardened tool steel';

const dt = 'Diamond-turning bay';
const cmm = 'CMM lab';
const ifm = 'Interferometry room';

/** Fixtures per lathe pallet set: three-vee kinematic pallets, carbide vees, ceramic balls. */
function lathePallets(lathe: 'DT-1' | 'DT-2'): DemoFixture[] {
	const ceramic = lathe === 'DT-1';
	return (['A', 'B', 'C'] as const).map((p, i) => ({
		key: `pallet-${lathe}-${p}`,
		name: `${lathe} kinematic pallet ${p}`,
		type: 'three-vee',
		area: dt,
		location: `Lathe ${lathe}`,
		spec_um: ceramic ? 0.5 : 1,
		ratedLife: ceramic ? 60_000 : 40_000,
		ball: ceramic ? SI3N4 : STEEL,
		seat: ceramic ? CARBIDE : HARD,
		ballDia_mm: 25.4,
		preload_N: ceramic ? 1200 : 900,
		mass_kg: Math.round(([18.5, 18.5, 22.4][i] - (ceramic ? 0 : 1.6)) * 10) / 10,
		commissioned: ceramic ? `2022-0${3 + i}-1${i}` : `2020-1${i}-0${4 + i}`,
		notes:
			i === 2
				? 'Carries the large-aperture vacuum chuck; lift with the bay hoist.'
				: 'Wipe balls and vees with lint-free tissue before every seating.'
	}));
}

export const DEMO_FIXTURES: DemoFixture[] = [
	...lathePallets('DT-1'),
	...lathePallets('DT-2'),
	{
		key: 'pallet-spare-1',
		name: 'Spare kinematic pallet S1',
		type: 'three-vee',
		area: dt,
		location: 'Pallet rack',
		status: 'breaking-in',
		spec_um: 0.5,
		ratedLife: 60_000,
		ball: SI3N4,
		seat: CARBIDE,
		ballDia_mm: 25.4,
		preload_N: 1200,
		mass_kg: 17.8,
		commissioned: '2025-09-22',
		notes: 'New carbide vee inserts fitted; break-in in progress.'
	},
	{
		key: 'pallet-spare-2',
		name: 'Spare kinematic pallet S2',
		type: 'three-vee',
		area: dt,
		location: 'Pallet rack',
		spec_um: 1,
		ratedLife: 40_000,
		ball: STEEL,
		seat: HARD,
		ballDia_mm: 25.4,
		preload_N: 900,
		mass_kg: 16.9,
		commissioned: '2019-06-03'
	},
	{
		key: 'dt-master-pallet',
		name: 'Setup-bench master pallet',
		type: 'three-vee',
		area: dt,
		location: 'Setup bench',
		spec_um: 0.5,
		ratedLife: 80_000,
		ball: SI3N4,
		seat: CARBIDE,
		ballDia_mm: 25.4,
		preload_N: 1200,
		mass_kg: 15.2,
		commissioned: '2021-02-15',
		notes: 'Reference for presetting pallets off the machine.'
	},
	{
		key: 'dt-toolsetter',
		name: 'Tool-setter microscope mount',
		type: 'three-vee',
		area: dt,
		location: 'Setup bench',
		spec_um: 1,
		ball: STEEL,
		seat: HARD,
		ballDia_mm: 12.7,
		preload_N: 150,
		mass_kg: 3.1,
		commissioned: '2021-04-30'
	},
	{
		key: 'dt-vise-1',
		name: 'Quick-change vise V1',
		type: 'vise',
		area: dt,
		location: 'Setup bench',
		spec_um: 2,
		mass_kg: 7.4,
		commissioned: '2018-11-12'
	},
	{
		key: 'dt-zero-point-1',
		name: 'Zero-point pallet ZP-1 (roughing)',
		type: 'pallet',
		area: dt,
		location: 'Pallet rack',
		spec_um: 2,
		ratedLife: 100_000,
		mass_kg: 11.5,
		commissioned: '2019-08-19'
	},
	{
		key: 'dt-chuck-adapter',
		name: 'Vacuum-chuck adapter plate',
		type: 'plate',
		area: dt,
		location: 'Pallet rack',
		spec_um: 2,
		mass_kg: 9.6,
		commissioned: '2020-01-27'
	},
	// CMM lab: probe-change racks and fixture plates on kinematic mounts.
	...[1, 2].flatMap((m) =>
		[1, 2, 3].map((port): DemoFixture => ({
			key: `cmm${m}-probe-port-${port}`,
			name: `CMM ${m} probe-change rack, port ${port}`,
			type: 'three-vee',
			area: cmm,
			location: `CMM ${m}`,
			spec_um: 1,
			ratedLife: 50_000,
			ball: STEEL,
			seat: HARD,
			ballDia_mm: 6,
			preload_N: 20,
			mass_kg: 0.4,
			commissioned: `202${m}-0${port + 2}-0${port + 4}`,
			notes: 'Magnetic preload; keep the rack covered between runs.'
		}))
	),
	{
		key: 'cmm1-plate-300',
		name: 'Fixture plate FP-300 on kinematic mount',
		type: 'plate',
		area: cmm,
		location: 'CMM 1',
		spec_um: 1,
		ratedLife: 30_000,
		ball: STEEL,
		seat: CARBIDE,
		ballDia_mm: 19.05,
		preload_N: 400,
		mass_kg: 12.8,
		commissioned: '2021-10-04'
	},
	{
		key: 'cmm1-plate-450',
		name: 'Fixture plate FP-450 on kinematic mount',
		type: 'plate',
		area: cmm,
		location: 'CMM 1',
		spec_um: 1,
		ratedLife: 30_000,
		ball: STEEL,
		seat: CARBIDE,
		ballDia_mm: 19.05,
		preload_N: 600,
		mass_kg: 19.7,
		commissioned: '2021-10-04'
	},
	{
		key: 'cmm2-plate-300',
		name: 'Fixture plate FP-300B on kinematic mount',
		type: 'plate',
		area: cmm,
		location: 'CMM 2',
		status: 'breaking-in',
		spec_um: 1,
		ratedLife: 30_000,
		ball: SI3N4,
		seat: CARBIDE,
		ballDia_mm: 19.05,
		preload_N: 400,
		mass_kg: 12.6,
		commissioned: '2025-10-13',
		notes: 'Replacement for the plate damaged in the March move.'
	},
	{
		key: 'cmm2-rotary-adapter',
		name: 'Rotary-table kinematic adapter',
		type: 'three-vee',
		area: cmm,
		location: 'CMM 2',
		spec_um: 0.5,
		ratedLife: 40_000,
		ball: SI3N4,
		seat: CARBIDE,
		ballDia_mm: 12.7,
		preload_N: 250,
		mass_kg: 6.2,
		commissioned: '2023-05-08'
	},
	{
		key: 'cmm-sphere-mount',
		name: 'Calibration-sphere kinematic mount',
		type: 'trihedral-vee-flat',
		area: cmm,
		location: 'Fixture crib',
		spec_um: 0.5,
		ball: CARBIDE,
		seat: CARBIDE,
		ballDia_mm: 10,
		preload_N: 60,
		mass_kg: 1.1,
		commissioned: '2020-07-21'
	},
	{
		key: 'cmm-plate-spare',
		name: 'Fixture plate FP-300 (spare)',
		type: 'plate',
		area: cmm,
		location: 'Fixture crib',
		status: 'on-hold',
		spec_um: 1,
		ratedLife: 30_000,
		ball: STEEL,
		seat: CARBIDE,
		ballDia_mm: 19.05,
		preload_N: 400,
		mass_kg: 12.8,
		commissioned: '2018-03-05',
		notes: 'On hold: one vee insert shows fretting; waiting for inspection.'
	},
	{
		key: 'cmm1-stylus-mount',
		name: 'Stylus-qualification mount',
		type: 'trihedral-vee-flat',
		area: cmm,
		location: 'CMM 1',
		spec_um: 0.5,
		ratedLife: 30_000,
		ball: CARBIDE,
		seat: CARBIDE,
		ballDia_mm: 8,
		preload_N: 40,
		mass_kg: 0.7,
		commissioned: '2023-08-14'
	},
	{
		key: 'cmm2-lens-cell-nest',
		name: 'Lens-cell part nest',
		type: 'three-vee',
		area: cmm,
		location: 'CMM 2',
		spec_um: 1,
		ratedLife: 25_000,
		ball: SI3N4,
		seat: HARD,
		ballDia_mm: 9.525,
		preload_N: 45,
		mass_kg: 1.5,
		commissioned: '2024-02-19'
	},
	{
		key: 'cmm-vise-1',
		name: 'Quick-change vise V2 (CMM)',
		type: 'vise',
		area: cmm,
		location: 'Fixture crib',
		spec_um: 2,
		mass_kg: 5.9,
		commissioned: '2022-01-17'
	},
	{
		key: 'cmm-zero-point-1',
		name: 'Zero-point pallet ZP-4 (CMM)',
		type: 'pallet',
		area: cmm,
		location: 'Fixture crib',
		spec_um: 1.5,
		ratedLife: 100_000,
		mass_kg: 8.3,
		commissioned: '2022-01-17'
	},
	// Interferometry room: trihedral-vee-flat mounts for reference flats and spheres.
	...(
		[
			['A', 'RF-100', 100, 2.2],
			['A', 'RF-150', 150, 4.8],
			['B', 'RF-100B', 100, 2.2],
			['B', 'RF-200', 200, 9.5]
		] as const
	).map(([bench, id, dia, mass], i): DemoFixture => ({
		key: `ifm-flat-${id.toLowerCase()}`,
		name: `Reference flat mount ${id} (Ø${dia} mm)`,
		type: 'trihedral-vee-flat',
		area: ifm,
		location: `Interferometer bench ${bench}`,
		spec_um: 0.5,
		ratedLife: 20_000,
		ball: SI3N4,
		seat: CARBIDE,
		ballDia_mm: 12.7,
		preload_N: 80 + 20 * i,
		mass_kg: mass,
		commissioned: `2023-0${i + 2}-1${i}`,
		notes: 'Handle the flat by its rim only; gloves on.'
	})),
	{
		key: 'ifm-ts-mount-a',
		name: 'Transmission-sphere mount TS-A',
		type: 'trihedral-vee-flat',
		area: ifm,
		location: 'Interferometer bench A',
		spec_um: 1,
		ratedLife: 20_000,
		ball: STEEL,
		seat: HARD,
		ballDia_mm: 12.7,
		preload_N: 120,
		mass_kg: 3.6,
		commissioned: '2019-09-09'
	},
	{
		key: 'ifm-test-nest-b',
		name: 'Test-part kinematic nest B',
		type: 'three-vee',
		area: ifm,
		location: 'Interferometer bench B',
		spec_um: 0.5,
		ratedLife: 25_000,
		ball: SI3N4,
		seat: CARBIDE,
		ballDia_mm: 9.525,
		preload_N: 50,
		mass_kg: 1.8,
		commissioned: '2024-06-24'
	},
	{
		key: 'ifm-flat-rf-100-old',
		name: 'Reference flat mount RF-100 (first build)',
		type: 'trihedral-vee-flat',
		area: ifm,
		location: 'Reference-flat cabinet',
		status: 'retired',
		spec_um: 1,
		ratedLife: 20_000,
		ball: STEEL,
		seat: HARD,
		ballDia_mm: 12.7,
		preload_N: 80,
		mass_kg: 2.3,
		commissioned: '2016-05-16',
		notes: 'Retired: past its rated life, kept for comparison measurements.'
	},
	{
		key: 'ifm-flat-spare',
		name: 'Reference flat mount RF-150 (spare)',
		type: 'trihedral-vee-flat',
		area: ifm,
		location: 'Reference-flat cabinet',
		spec_um: 0.5,
		ratedLife: 20_000,
		ball: SI3N4,
		seat: CARBIDE,
		ballDia_mm: 12.7,
		preload_N: 100,
		mass_kg: 4.8,
		commissioned: '2024-11-04'
	},
	{
		key: 'ifm-fold-mirror',
		name: 'Fold-mirror kinematic mount',
		type: 'three-vee',
		area: ifm,
		location: 'Interferometer bench B',
		spec_um: 2,
		ball: STEEL,
		seat: HARD,
		ballDia_mm: 6,
		preload_N: 30,
		mass_kg: 0.9,
		commissioned: '2020-02-11'
	},
	{
		key: 'ifm-breadboard-plate',
		name: 'Breadboard sub-plate',
		type: 'plate',
		area: ifm,
		location: 'Interferometer bench A',
		spec_um: 2,
		mass_kg: 7.7,
		commissioned: '2019-09-09'
	},
	{
		key: 'ifm-camera-mount',
		name: 'Camera head quick-release',
		type: 'other',
		area: ifm,
		location: 'Reference-flat cabinet',
		spec_um: 2,
		mass_kg: 1.4,
		commissioned: '2021-12-06'
	}
];

/**
 * Where a demo fixture's invented year of history leads (scripts/demo-history.ts generates it):
 * the flags it shows on the day of the seed. Fixtures not listed are healthy.
 */
export type DemoCondition =
	| 'healthy'
	| 'cleaning-due-days'
	| 'cleaning-due-cycles'
	| 'inspection-due'
	| 'breaking-in-part-swap'
	| 'breaking-in-relubricated'
	| 'drifting'
	| 'past-rated-life'
	| 'on-hold'
	| 'no-history';

/** Something that happened once in a fixture's year, some days before the seed. */
export type DemoEpisode =
	| { daysAgo: number; kind: 'part-swap'; replaced: ('balls' | 'seats')[]; note: string }
	| { daysAgo: number; kind: 'relubricated'; lubricant: string }
	| { daysAgo: number; kind: 'hold'; reason: string; releasedAfterDays: number; release: string }
	| { daysAgo: number; kind: 'move'; note: string }
	| { daysAgo: number; kind: 'note'; text: string };

/** A fixture's story: the condition it ends in, how hard it is used, and its episodes. */
export interface DemoStory {
	condition: DemoCondition;
	/** Working days a week it is seated (1–5); default from its key. */
	daysPerWeek?: number;
	/** Seatings on a day it is used; default from its key. */
	seatingsPerDay?: number;
	episodes?: DemoEpisode[];
}

/** The stories behind BRIEF.md's demo: most healthy, a few due, two breaking in, one drifting, one past its life. */
export const DEMO_STORIES: Record<string, DemoStory> = {
	'pallet-DT-1-A': {
		condition: 'healthy',
		episodes: [
			{
				daysAgo: 212,
				kind: 'part-swap',
				replaced: ['balls'],
				note: 'Ceramic balls replaced after a chip was found on ball 2.'
			}
		]
	},
	'pallet-DT-2-B': { condition: 'drifting', daysPerWeek: 5, seatingsPerDay: 6 },
	'pallet-spare-1': {
		condition: 'breaking-in-part-swap',
		daysPerWeek: 2,
		seatingsPerDay: 4
	},
	'dt-master-pallet': {
		condition: 'healthy',
		episodes: [{ daysAgo: 150, kind: 'relubricated', lubricant: 'light instrument oil' }]
	},
	'dt-vise-1': { condition: 'cleaning-due-days', daysPerWeek: 1, seatingsPerDay: 3 },
	'cmm2-probe-port-3': { condition: 'cleaning-due-cycles', daysPerWeek: 5, seatingsPerDay: 36 },
	'cmm1-plate-450': { condition: 'inspection-due', daysPerWeek: 3, seatingsPerDay: 3 },
	'ifm-breadboard-plate': { condition: 'inspection-due', daysPerWeek: 2, seatingsPerDay: 2 },
	'cmm2-plate-300': {
		condition: 'breaking-in-relubricated',
		daysPerWeek: 3,
		seatingsPerDay: 4,
		episodes: [
			{ daysAgo: 240, kind: 'move', note: 'Into CMM 2 from the crib, replacing the damaged plate.' }
		]
	},
	'cmm-plate-spare': { condition: 'on-hold', daysPerWeek: 1, seatingsPerDay: 2 },
	'cmm1-stylus-mount': {
		condition: 'healthy',
		episodes: [
			{
				daysAgo: 97,
				kind: 'hold',
				reason: 'Stylus crash during qualification; hold until the mount is inspected.',
				releasedAfterDays: 1,
				release: 'Inspected after the crash: no dents, repeatability re-checked.'
			}
		]
	},
	'ifm-ts-mount-a': { condition: 'past-rated-life', daysPerWeek: 5, seatingsPerDay: 5 },
	'ifm-flat-rf-100-old': { condition: 'no-history' },
	'cmm1-probe-port-2': {
		condition: 'healthy',
		episodes: [
			{ daysAgo: 33, kind: 'note', text: 'Rack cover left off over the weekend; ports wiped.' }
		]
	}
};
