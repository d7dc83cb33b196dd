/**
 * The register's enumerations with their names on screen. The members are defined in `$lib/domain`
 * and re-exported here so forms and pages find them beside their labels.
 */
import type { FixtureStatus } from '../domain/fixture-status';
import type { FixtureType } from '../domain/fixture-types';
import type { FlagKind } from '../domain/flag-kinds';

export { FIXTURE_STATUSES, type FixtureStatus } from '../domain/fixture-status';
export { FIXTURE_TYPES, type FixtureType } from '../domain/fixture-types';
export { FLAG_KINDS, type FlagKind } from '../domain/flag-kinds';
export {
	WORK_ORDER_ACTIONS,
	WORK_ORDER_STATUSES,
	type WorkOrderAction,
	type WorkOrderStatus
} from '../domain/work-orders';

export const FIXTURE_TYPE_LABELS: Record<FixtureType, string> = {
	'three-vee': 'Three-vee kinematic coupling',
	'trihedral-vee-flat': 'Trihedral–vee–flat coupling',
	pallet: 'Zero-point pallet',
	vise: 'Quick-change vise',
	plate: 'Fixture plate',
	other: 'Other fixture'
};

export const FIXTURE_STATUS_LABELS: Record<FixtureStatus, string> = {
	'in-service': 'In service',
	'breaking-in': 'Breaking in',
	'on-hold': 'On hold',
	retired: 'Retired'
};

export const FLAG_LABELS: Record<FlagKind, string> = {
	'break-in-due': 'Break-in due',
	'cleaning-due': 'Cleaning due',
	'inspection-due': 'Inspection due',
	'out-of-spec': 'Out of spec',
	drift: 'Drifting',
	'replace-soon': 'Replace soon',
	'replace-now': 'Replace now'
};
