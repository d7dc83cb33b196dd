/**
 * A fixture's health policy: the shop's numbers behind every flag. Field names are also the column
 * names of the policies table (in snake_case), so keep them.
 */
import { WEAR_GRADE_MAX } from './wear';
import { DomainInputError, requireInteger, requireNonNegative, requirePositive } from './errors';

/** The policy fields; units in the names (µm, cycles, days). */
export interface Policy {
	/** Spec for R = 4s (µm) over the latest window of seatings with readings. */
	repeatabilitySpec_um: number;
	/** Seatings with readings per repeatability window. */
	repeatabilityWindow: number;
	/** Cycles a break-in must run at least. */
	breakInMinCycles: number;
	/** Seatings with readings per settling window during break-in. */
	settleWindow: number;
	/** Largest change of windowed R (µm) between consecutive settling windows that counts as settled. */
	settleTolerance_um: number;
	cleaningIntervalCycles: number | null;
	cleaningIntervalDays: number | null;
	inspectionIntervalCycles: number | null;
	inspectionIntervalDays: number | null;
	/** Seating life of the contacts in cycles; null when the maker gives none. */
	ratedLifeCycles: number | null;
	/** Wear grade (Nestmark scale) at or above which the contacts must be replaced now. */
	wearLimitGrade: number;
	/** Replace soon if the trend forecast crosses the spec within this many cycles. */
	forecastHorizonCycles: number;
	/** Work orders made from a flag (other than replace now) are due within this many days. */
	planningHorizonDays: number;
}

/** Where a default comes from. */
export interface PolicySource {
	note: string;
	basis: 'source' | 'common practice' | 'from memory';
}

/** Starting values; every number is the shop's to change. */
export const DEFAULT_POLICY: Policy = {
	repeatabilitySpec_um: 1,
	repeatabilityWindow: 10,
	breakInMinCycles: 30,
	settleWindow: 10,
	settleTolerance_um: 0.1,
	cleaningIntervalCycles: 250,
	cleaningIntervalDays: 30,
	inspectionIntervalCycles: 2000,
	inspectionIntervalDays: 90,
	ratedLifeCycles: null,
	wearLimitGrade: 3,
	forecastHorizonCycles: 2000,
	planningHorizonDays: 14
};

/** Basis of each default, for the code's readers and the policy page. */
export const POLICY_SOURCES: Record<keyof Policy, PolicySource> = {
	repeatabilitySpec_um: {
		basis: 'common practice',
		note: 'Well-made ball-and-vee couplings repeat to about 0.1–1 µm, and ceramic or carbide ones with a fine finish to tens of nanometres (Schouten et al., Precision Engineering, 1997). 1 µm is the loose end of that range; set the figure your process needs.'
	},
	repeatabilityWindow: {
		basis: 'common practice',
		note: 'Ten seatings per check is the usual re-measurement in precision shops; R = 4s follows ISO 230-2. More seatings give a steadier figure but react later.'
	},
	breakInMinCycles: {
		basis: 'from memory',
		note: 'Couplings improve over their first tens of seatings and then level off; cycling 20–50 times before an acceptance measurement is commonly recommended in the precision-design literature.'
	},
	settleWindow: {
		basis: 'common practice',
		note: 'Same size as the repeatability window, so a settled break-in is judged on the figure used in service.'
	},
	settleTolerance_um: {
		basis: 'common practice',
		note: 'No published figure: no standard defines settling. One tenth of the default spec, so that once settled, R no longer moves by an amount the spec check would notice.'
	},
	cleaningIntervalCycles: {
		basis: 'common practice',
		note: 'Wipe balls and seats before every seating; a logged cleaning every 250 seatings is a starting point with no published basis. Tighten it where chips or coolant mist are about.'
	},
	cleaningIntervalDays: {
		basis: 'common practice',
		note: 'A monthly logged cleaning for fixtures that sit unused; no published basis.'
	},
	inspectionIntervalCycles: {
		basis: 'common practice',
		note: 'No published interval. Re-measure and inspect at commissioning, after any crash or overload, and periodically; tighten when drift is flagged.'
	},
	inspectionIntervalDays: {
		basis: 'common practice',
		note: 'A quarterly inspection as a starting point; no published interval.'
	},
	ratedLifeCycles: {
		basis: 'common practice',
		note: 'No general figure exists: enter the maker’s rated seating life where one is given.'
	},
	wearLimitGrade: {
		basis: 'common practice',
		note: 'Grade 3 on the Nestmark scale: a fingernail catches on pits, dents or fretting scars. A defect that changes how the ball seats defeats the coupling’s purpose.'
	},
	forecastHorizonCycles: {
		basis: 'common practice',
		note: 'One inspection interval: a fixture whose trend will leave its spec before the next inspection is due is flagged now, leaving time to order parts.'
	},
	planningHorizonDays: {
		basis: 'common practice',
		note: 'Two weeks: long enough to get balls and seats from stock or a supplier and to fit the work into a shift plan, short enough that a flag does not wait a month.'
	}
};

/** Throws a clear error unless every policy field is in range. */
export function assertPolicy(p: Policy): Policy {
	if (p === null || typeof p !== 'object')
		throw new DomainInputError('policy', 'must be an object');
	requirePositive(p.repeatabilitySpec_um, 'policy.repeatabilitySpec_um');
	requireInteger(p.repeatabilityWindow, 'policy.repeatabilityWindow', 2, 1000);
	requireInteger(p.breakInMinCycles, 'policy.breakInMinCycles', 0);
	requireInteger(p.settleWindow, 'policy.settleWindow', 2, 1000);
	requireNonNegative(p.settleTolerance_um, 'policy.settleTolerance_um');
	for (const key of [
		'cleaningIntervalCycles',
		'cleaningIntervalDays',
		'inspectionIntervalCycles',
		'inspectionIntervalDays',
		'ratedLifeCycles'
	] as const) {
		if (p[key] !== null) requirePositive(p[key], `policy.${key}`);
	}
	requireInteger(p.wearLimitGrade, 'policy.wearLimitGrade', 1, WEAR_GRADE_MAX);
	requireNonNegative(p.forecastHorizonCycles, 'policy.forecastHorizonCycles');
	requireInteger(p.planningHorizonDays, 'policy.planningHorizonDays', 0, 366);
	return p;
}
