/** The health flags the rules raise (see health.ts, evaluateFlags); stored on the flags table. */
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
