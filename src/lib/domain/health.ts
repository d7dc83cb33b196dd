/**
 * The health rules under their old name, so existing imports keep working: the state and its bounds
 * (fold-state.ts), the running sums and the figures read from them (fold-sums.ts), the fold itself
 * (fold.ts) and the flag rules with their wording (flag-rules.ts).
 */
export {
	BREAK_IN_MAX_WINDOWS,
	DRIFT_MEMORY,
	DRIFT_RULES,
	FORECAST_MIN_WINDOWS,
	SPC_BASELINE_POINTS,
	SPC_TAIL,
	TREND_MAX_WINDOWS,
	cloneState,
	emptyState,
	initialState,
	type AxisSpc,
	type BreakInProgress,
	type BreakInReason,
	type FixtureState,
	type InitialStateOptions,
	type StoredReading,
	type WindowAccumulator,
	type WindowPoint
} from './fold-state';
export { fixtureForecast, recentRepeatability } from './fold-sums';
export {
	applyEvent,
	compareEvents,
	foldEvents,
	isOutOfOrder,
	readingCycle,
	recompute
} from './fold';
export { evaluateFlags, type Flag } from './flag-rules';
