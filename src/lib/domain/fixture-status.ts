/**
 * A fixture's status has two sources. The register stores one of FIXTURE_STATUSES; the health fold
 * derives one of DERIVED_STATUSES from the event log. Retiring is a register decision that no event
 * makes or undoes, so a derived status is never 'retired', and a retired fixture stays retired
 * whatever its log says.
 */
export const FIXTURE_STATUSES = ['in-service', 'breaking-in', 'on-hold', 'retired'] as const;
/** The status the register stores and shows. */
export type FixtureStatus = (typeof FIXTURE_STATUSES)[number];

/** The statuses the event log can lead to: on hold wins over breaking in. */
export const DERIVED_STATUSES = [
	'in-service',
	'breaking-in',
	'on-hold'
] as const satisfies readonly FixtureStatus[];
/** The status folded from the event log. */
export type DerivedStatus = (typeof DERIVED_STATUSES)[number];
