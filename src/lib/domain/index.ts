/**
 * Nestmark's computation core: pure functions, no I/O. Units: geometry in mm, loads in N, moduli in
 * GPa, stresses in MPa, readings and repeatability in µm, stiffness in N/µm.
 */
export { DomainInputError } from './errors';
export { isoMs } from './time';
export type { Vec3 } from './vec';
export {
	analyzeConstraints,
	permitsTwist,
	twistVectors,
	type Contact,
	type Twist,
	type ConstraintAnalysis,
	type ConstraintOptions
} from './constraints';
export {
	threeVeeContacts,
	trihedralVeeFlatContacts,
	type ThreeVeeDesign,
	type TrihedralVeeFlatDesign
} from './coupling-geometry';
export {
	hertzBallOnFlat,
	hertzBallOnBall,
	hertzBallInSeat,
	hertzBallInVee,
	hertzBallInGroove,
	allowableLoad,
	effectiveModulus,
	MATERIALS,
	MATERIAL_SOURCES,
	ISO76_BALL_LIMIT_MPA,
	type Material,
	type HertzContact,
	type AllowableLoad
} from './hertz';
export { circularMaxShear, ellipticalMaxShear } from './subsurface';
export {
	repeatability,
	meanAndS,
	type Reading,
	type AxisRepeatability,
	type RepeatabilityResult
} from './repeatability';
export { breakInStatus, type BreakInRule, type BreakInResult } from './break-in';
export {
	individualsChart,
	runRuleHits,
	ALL_RULES,
	RULE_TEXT,
	RULE_LENGTH,
	D2,
	D4,
	type RunRule,
	type RuleHit,
	type ChartLimits,
	type ChartOptions,
	type IndividualsChart
} from './spc';
export { forecastCrossing, median, type Forecast, type ForecastOptions } from './forecast';
export {
	DEFAULT_POLICY,
	POLICY_SOURCES,
	assertPolicy,
	type Policy,
	type PolicySource
} from './policy';
export {
	emptyState,
	initialState,
	cloneState,
	applyEvent,
	foldEvents,
	recompute,
	evaluateFlags,
	isOutOfOrder,
	compareEvents,
	recentRepeatability,
	fixtureForecast,
	SPC_BASELINE_POINTS,
	SPC_TAIL,
	DRIFT_RULES,
	DRIFT_MEMORY,
	BREAK_IN_MAX_WINDOWS,
	TREND_MAX_WINDOWS,
	FORECAST_MIN_WINDOWS,
	type FixtureState,
	type BreakInReason,
	type BreakInProgress,
	type StoredReading,
	type WindowPoint,
	type AxisSpc,
	type Flag,
	type InitialStateOptions
} from './health';
export {
	EVENT_KINDS,
	MAX_READING_UM,
	MAX_CYCLES_PER_EVENT,
	MAX_READINGS_PER_BREAK_IN,
	CLEANING_METHODS,
	SWAPPABLE_PARTS,
	type EventKind,
	type CleaningMethod,
	type SwappablePart,
	type EventReading,
	type InspectionContact,
	type EventPayloadInputs,
	type FixtureEvent
} from './events';
export {
	WEAR_GRADES,
	WEAR_GRADE_MAX,
	WEAR_MARKS,
	INSPECTION_VERDICTS,
	type WearGrade,
	type WearMark,
	type InspectionVerdict
} from './wear';
export { FLAG_KINDS, type FlagKind } from './flag-kinds';
export {
	FIXTURE_STATUSES,
	DERIVED_STATUSES,
	type FixtureStatus,
	type DerivedStatus
} from './fixture-status';
export { FIXTURE_TYPES, type FixtureType } from './fixture-types';
export {
	WORK_ORDER_ACTIONS,
	WORK_ORDER_STATUSES,
	type WorkOrderAction,
	type WorkOrderStatus
} from './work-orders';
