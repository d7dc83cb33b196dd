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

export const FIXTURE_TYPE_LABELS: Record<FixtureType, string> = {
	'three-vee': 'Three-vee kinematic coupling',
	'trihedral-vee-flat': 'Trihedral–vee–flat coupling',
	pallet: 'Zero-point pallet',
	vise: 'Quick-change vise',
	plate: 'Fixture plate',
	other: 'Other fixture'
};

/** Life-cycle status of a fixture. */
export const FIXTURE_STATUSES = ['in-service', 'breaking-in', 'on-hold', 'retired'] as const;
export type FixtureStatus = (typeof FIXTURE_STATUSES)[number];

export const FIXTURE_STATUS_LABELS: Record<FixtureStatus, string> = {
	'in-service': 'In service',
	'breaking-in': 'Breaking in',
	'on-hold': 'On hold',
	retired: 'Retired'
};

/** Health flags the server raises (see `$lib/domain` evaluateFlags). */
export const FLAG_KINDS = [
	'break-in-due',
	'cleaning-due',
	'inspection-due',
	'out-of-spec',
	'drift',
	'replace-soon',
	'replace-now'
] as const;
export type FlagKind = (typeof FLAG_KINDS)[number];

export const FLAG_LABELS: Record<FlagKind, string> = {
	'break-in-due': 'Break-in due',
	'cleaning-due': 'Cleaning due',
	'inspection-due': 'Inspection due',
	'out-of-spec': 'Out of spec',
	drift: 'Drifting',
	'replace-soon': 'Replace soon',
	'replace-now': 'Replace now'
};

/** What a work order asks for. */
export const WORK_ORDER_ACTIONS = [
	'replace-balls',
	'replace-seats',
	'replace-fixture',
	're-break-in',
	'inspect'
] as const;
export type WorkOrderAction = (typeof WORK_ORDER_ACTIONS)[number];

/** Where a work order stands. */
export const WORK_ORDER_STATUSES = [
	'planned',
	'scheduled',
	'underway',
	'done',
	'cancelled'
] as const;
export type WorkOrderStatus = (typeof WORK_ORDER_STATUSES)[number];
