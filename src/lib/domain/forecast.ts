/**
 * Straight-line trend of a figure (e.g. windowed R against cycles) and where it crosses a spec.
 *
 * OLS: b₁ = Σ(x−x̄)(y−ȳ)/Σ(x−x̄)², b₀ = ȳ − b₁x̄. Theil–Sen (Theil 1950; Sen, JASA 63(324):1379,
 * 1968): slope = median of the pairwise slopes over pairs with different x; intercept by the
 * 'separate' convention median(y) − b·median(x) (default) or the 'joint' convention median(y − b·x).
 * Status: 'exceeded' when the latest point (largest x; the later one on a tie) is above spec;
 * otherwise 'crossing' at x* = (spec − b₀)/b₁ when b₁ > 0, else 'no-crossing'. For 'exceeded' the
 * crossing of the fitted line is still reported when the slope is positive.
 */
import { DomainInputError, requireFinite } from './errors';

/** Options for forecastCrossing. */
export interface ForecastOptions {
	method: 'ols' | 'theil-sen';
	/** Theil–Sen intercept convention; default 'separate'. */
	intercept?: 'joint' | 'separate';
}

/** Result of forecastCrossing. */
export interface Forecast {
	slope: number;
	intercept: number;
	status: 'exceeded' | 'crossing' | 'no-crossing';
	crossingX: number | null;
	/** The latest point's x (largest x). */
	latestX: number;
	/** Number of points used. */
	n: number;
}

/** Median of a numeric array (mean of the middle two for an even count); sorts a copy. */
export function median(values: ArrayLike<number>): number {
	const a = Float64Array.from(values).sort();
	const m = a.length >> 1;
	return a.length % 2 ? a[m] : (a[m - 1] + a[m]) / 2;
}

/** Fit a trend line and say whether and where it crosses `spec`. */
export function forecastCrossing(
	points: { x: number; y: number }[],
	spec: number,
	options: ForecastOptions
): Forecast {
	if (!Array.isArray(points)) throw new DomainInputError('points', 'must be an array');
	requireFinite(spec, 'spec');
	if (options === null || typeof options !== 'object') {
		throw new DomainInputError('options', "must be { method: 'ols' | 'theil-sen' }");
	}
	points.forEach((p, i) => {
		requireFinite(p?.x, `points[${i}].x`);
		requireFinite(p?.y, `points[${i}].y`);
	});
	if (points.length < 2) {
		throw new DomainInputError('points', `needs at least 2 points (got ${points.length})`);
	}
	const xs = points.map((p) => p.x);
	const ys = points.map((p) => p.y);
	let slope: number;
	let intercept: number;
	if (options.method === 'ols') {
		const xBar = xs.reduce((s, x) => s + x, 0) / xs.length;
		const yBar = ys.reduce((s, y) => s + y, 0) / ys.length;
		let sxy = 0;
		let sxx = 0;
		for (let i = 0; i < xs.length; i++) {
			sxy += (xs[i] - xBar) * (ys[i] - yBar);
			sxx += (xs[i] - xBar) ** 2;
		}
		if (sxx === 0) throw new DomainInputError('points', 'need at least two different x values');
		slope = sxy / sxx;
		intercept = yBar - slope * xBar;
	} else if (options.method === 'theil-sen') {
		const slopes: number[] = [];
		for (let i = 0; i < xs.length; i++) {
			for (let j = i + 1; j < xs.length; j++) {
				if (xs[i] !== xs[j]) slopes.push((ys[j] - ys[i]) / (xs[j] - xs[i]));
			}
		}
		if (slopes.length === 0)
			throw new DomainInputError('points', 'need at least two different x values');
		slope = median(slopes);
		const convention = options.intercept ?? 'separate';
		if (convention === 'separate') intercept = median(ys) - slope * median(xs);
		else if (convention === 'joint') intercept = median(ys.map((y, i) => y - slope * xs[i]));
		else throw new DomainInputError('options.intercept', "must be 'joint' or 'separate'");
	} else {
		throw new DomainInputError('options.method', "must be 'ols' or 'theil-sen'");
	}
	let latest = 0;
	for (let i = 1; i < xs.length; i++) if (xs[i] >= xs[latest]) latest = i;
	const crossingX = slope > 0 ? (spec - intercept) / slope : null;
	const status = ys[latest] > spec ? 'exceeded' : crossingX !== null ? 'crossing' : 'no-crossing';
	return { slope, intercept, status, crossingX, latestX: xs[latest], n: points.length };
}
