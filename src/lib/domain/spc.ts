/**
 * Individuals and moving-range (I-MR) chart with the Western Electric and Nelson run rules.
 *
 * Sources: NIST/SEMATECH e-Handbook of Statistical Methods §6.3.2; ASTM E2587; Western Electric
 * Statistical Quality Control Handbook (1956); Nelson, J. Quality Technology 16(4) 1984.
 *
 * MR_i = |x_i − x_(i−1)|, MR̄ their mean, σ̂ = MR̄/d₂ with d₂ = 1.128; individuals limits
 * x̄ ± 3σ̂ (multiplier 'd2') or x̄ ± 2.66·MR̄ (multiplier '2.66'); MR chart UCL = 3.267·MR̄.
 * Limits may come from the first `baseline` points (phase I) and be applied to all points.
 *
 * Conventions: every window of a rule's length that qualifies gives one hit, reported at the
 * 1-based index of its last point (which need not itself be beyond the zone); "beyond" is strict;
 * in k-of-m rules the k points are on the same side; a trend is 6 points with 5 strictly monotone
 * steps (a tie breaks it); alternation needs every step non-zero and of opposite sign to the last;
 * a point exactly on the centre line breaks a run; zones use σ̂ = MR̄/1.128 whichever multiplier is
 * chosen; "beyond 3σ" (WE1, N1) means beyond the chart's control limits; "within 1σ" (N7) is
 * |x − x̄| ≤ σ̂; N8 needs 8 points all beyond 1σ with at least one on each side.
 */
import { DomainInputError, requireInteger } from './errors';

/** d₂ for moving ranges of two points (NIST/SEMATECH §6.3.2): σ̂ = MR̄/d₂. */
export const D2 = 1.128;
/** D₄ for moving ranges of two points: MR chart UCL = D₄·MR̄. */
export const D4 = 3.267;

/** Run-rule names: WE1–WE4 Western Electric, N1–N8 Nelson. */
export type RunRule =
	'WE1' | 'WE2' | 'WE3' | 'WE4' | 'N1' | 'N2' | 'N3' | 'N4' | 'N5' | 'N6' | 'N7' | 'N8';

/** Every rule, in the order hits are reported. */
export const ALL_RULES: readonly RunRule[] = [
	'WE1',
	'WE2',
	'WE3',
	'WE4',
	'N1',
	'N2',
	'N3',
	'N4',
	'N5',
	'N6',
	'N7',
	'N8'
];

/** One-line description of each rule, for reasons and help text. */
export const RULE_TEXT: Record<RunRule, string> = {
	WE1: '1 point beyond the 3σ limits',
	WE2: '2 of 3 points beyond 2σ on the same side',
	WE3: '4 of 5 points beyond 1σ on the same side',
	WE4: '8 points in a row on one side of the centre line',
	N1: '1 point beyond the 3σ limits',
	N2: '9 points in a row on one side of the centre line',
	N3: '6 points in a row steadily increasing or decreasing',
	N4: '14 points in a row alternating up and down',
	N5: '2 of 3 points beyond 2σ on the same side',
	N6: '4 of 5 points beyond 1σ on the same side',
	N7: '15 points in a row within 1σ of the centre line',
	N8: '8 points in a row beyond 1σ, on both sides of the centre line'
};

/** Window length of each rule. */
export const RULE_LENGTH: Record<RunRule, number> = {
	WE1: 1,
	WE2: 3,
	WE3: 5,
	WE4: 8,
	N1: 1,
	N2: 9,
	N3: 6,
	N4: 14,
	N5: 3,
	N6: 5,
	N7: 15,
	N8: 8
};

/** Centre, zone σ and control limits that the run rules test against. */
export interface ChartLimits {
	center: number;
	sigma: number;
	ucl: number;
	lcl: number;
}

/** A rule firing, at the 1-based index of the last point of its window. */
export interface RuleHit {
	rule: RunRule;
	index: number;
}

/** Points in values[end − len + 1 .. end] strictly above `over` (side 1) or below it (side −1). */
function countBeyond(
	values: number[],
	end: number,
	len: number,
	over: number,
	side: 1 | -1
): number {
	let n = 0;
	for (let i = end - len + 1; i <= end; i++) {
		if (side === 1 ? values[i] > over : values[i] < over) n++;
	}
	return n;
}

/** Whether `rule` fires on the window ending at 0-based position `end`. */
export function ruleFires(rule: RunRule, values: number[], end: number, l: ChartLimits): boolean {
	const len = RULE_LENGTH[rule];
	if (end - len + 1 < 0) return false;
	const c = l.center;
	const s = l.sigma;
	switch (rule) {
		case 'WE1':
		case 'N1':
			return values[end] > l.ucl || values[end] < l.lcl;
		case 'WE2':
		case 'N5':
			return (
				countBeyond(values, end, 3, c + 2 * s, 1) >= 2 ||
				countBeyond(values, end, 3, c - 2 * s, -1) >= 2
			);
		case 'WE3':
		case 'N6':
			return (
				countBeyond(values, end, 5, c + s, 1) >= 4 || countBeyond(values, end, 5, c - s, -1) >= 4
			);
		case 'WE4':
		case 'N2':
			return (
				countBeyond(values, end, len, c, 1) === len || countBeyond(values, end, len, c, -1) === len
			);
		case 'N3': {
			let up = true;
			let down = true;
			for (let i = end - 4; i <= end; i++) {
				if (!(values[i] > values[i - 1])) up = false;
				if (!(values[i] < values[i - 1])) down = false;
			}
			return up || down;
		}
		case 'N4': {
			let prev = 0;
			for (let i = end - 12; i <= end; i++) {
				const step = Math.sign(values[i] - values[i - 1]);
				if (step === 0 || step === prev) return false;
				prev = step;
			}
			return true;
		}
		case 'N7': {
			for (let i = end - 14; i <= end; i++) if (Math.abs(values[i] - c) > s) return false;
			return true;
		}
		case 'N8': {
			const hi = countBeyond(values, end, 8, c + s, 1);
			const lo = countBeyond(values, end, 8, c - s, -1);
			return hi + lo === 8 && hi > 0 && lo > 0;
		}
	}
}

/** Every hit of the given rules over `values` against fixed limits, ordered by index then rule. */
export function runRuleHits(
	values: number[],
	limits: ChartLimits,
	rules: readonly RunRule[] = ALL_RULES
): RuleHit[] {
	const hits: RuleHit[] = [];
	for (let end = 0; end < values.length; end++) {
		for (const rule of rules)
			if (ruleFires(rule, values, end, limits)) hits.push({ rule, index: end + 1 });
	}
	return hits;
}

/** Options for individualsChart. */
export interface ChartOptions {
	/** Number of leading points used for the limits (phase I); default all, at least 2. */
	baseline?: number;
	/** 'd2': x̄ ± 3·MR̄/1.128 (default); '2.66': x̄ ± 2.66·MR̄. */
	multiplier?: 'd2' | '2.66';
}

/** Result of individualsChart. */
export interface IndividualsChart extends ChartLimits {
	mrBar: number;
	mrUcl: number;
	hits: RuleHit[];
	/** Moving ranges of all points (first entry null). */
	movingRanges: (number | null)[];
}

/** I-MR chart limits from a baseline and run-rule hits over all the values. */
export function individualsChart(values: number[], options: ChartOptions = {}): IndividualsChart {
	if (!Array.isArray(values)) throw new DomainInputError('values', 'must be an array');
	values.forEach((v, i) => {
		if (typeof v !== 'number' || !Number.isFinite(v)) {
			throw new DomainInputError(`values[${i}]`, `must be a finite number (got ${String(v)})`);
		}
	});
	if (values.length < 2) {
		throw new DomainInputError(
			'values',
			`needs at least 2 points for a moving range (got ${values.length})`
		);
	}
	const n = requireInteger(options.baseline ?? values.length, 'options.baseline', 2, values.length);
	const multiplier = options.multiplier ?? 'd2';
	if (multiplier !== 'd2' && multiplier !== '2.66') {
		throw new DomainInputError('options.multiplier', "must be 'd2' or '2.66'");
	}
	let sum = 0;
	let mrSum = 0;
	for (let i = 0; i < n; i++) {
		sum += values[i];
		if (i > 0) mrSum += Math.abs(values[i] - values[i - 1]);
	}
	const center = sum / n;
	const mrBar = mrSum / (n - 1);
	const sigma = mrBar / D2;
	const half = multiplier === 'd2' ? 3 * sigma : 2.66 * mrBar;
	const limits = { center, sigma, ucl: center + half, lcl: center - half };
	return {
		...limits,
		mrBar,
		mrUcl: D4 * mrBar,
		hits: runRuleHits(values, limits),
		movingRanges: values.map((v, i) => (i === 0 ? null : Math.abs(v - values[i - 1])))
	};
}
