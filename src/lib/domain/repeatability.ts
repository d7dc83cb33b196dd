/**
 * Repeatability of re-seating, ISO 230-2:2014 style: the seatings are treated as repeated
 * approaches to one position from one direction, s is the sample standard deviation (n − 1) and the
 * unidirectional repeatability is R = 4s, per measured axis. The combined radial figure is named:
 * s_r = √(s_x² + s_y²) (DRMS) and R_r = 2 s_r (2DRMS), as in GNSS accuracy practice.
 */
import { DomainInputError } from './errors';

/** One seating's indicator readings (µm) on whichever axes were measured. */
export interface Reading {
	dx?: number;
	dy?: number;
	dz?: number;
}

/** Per-axis statistics (µm). */
export interface AxisRepeatability {
	mean: number;
	s: number;
	R: number;
	/** Number of readings on this axis. */
	n: number;
}

/** Result of repeatability. */
export interface RepeatabilityResult {
	n: number;
	axes: Partial<Record<'x' | 'y' | 'z', AxisRepeatability>>;
	radial?: { s: number; R: number };
	/** The largest per-axis R and its axis: the figure compared with a fixture's spec. */
	worst: { axis: 'x' | 'y' | 'z'; R: number };
}

const AXES = [
	['x', 'dx'],
	['y', 'dy'],
	['z', 'dz']
] as const;

/** Mean and sample standard deviation (n − 1) by the two-pass formula; needs n ≥ 2. */
export function meanAndS(values: number[], field = 'values'): { mean: number; s: number } {
	if (values.length < 2) {
		throw new DomainInputError(
			field,
			`needs at least 2 values for a standard deviation (got ${values.length})`
		);
	}
	let sum = 0;
	for (const v of values) sum += v;
	const mean = sum / values.length;
	let ss = 0;
	for (const v of values) ss += (v - mean) * (v - mean);
	return { mean, s: Math.sqrt(ss / (values.length - 1)) };
}

/** Per-axis and radial repeatability of a set of seatings. */
export function repeatability(readings: Reading[]): RepeatabilityResult {
	if (!Array.isArray(readings)) throw new DomainInputError('readings', 'must be an array');
	if (readings.length < 2) {
		throw new DomainInputError('readings', `needs at least 2 seatings (got ${readings.length})`);
	}
	const values: Record<'x' | 'y' | 'z', number[]> = { x: [], y: [], z: [] };
	readings.forEach((r, i) => {
		if (r === null || typeof r !== 'object') {
			throw new DomainInputError(`readings[${i}]`, 'must be an object { dx?, dy?, dz? }');
		}
		for (const [axis, key] of AXES) {
			const v = r[key];
			if (v === undefined || v === null) continue;
			if (typeof v !== 'number' || !Number.isFinite(v)) {
				throw new DomainInputError(
					`readings[${i}].${key}`,
					`must be a finite number (got ${String(v)})`
				);
			}
			values[axis].push(v);
		}
	});
	const axes: RepeatabilityResult['axes'] = {};
	let worst: RepeatabilityResult['worst'] | null = null;
	for (const [axis, key] of AXES) {
		const v = values[axis];
		if (v.length === 0) continue;
		const { mean, s } = meanAndS(v, `readings (${key})`);
		axes[axis] = { mean, s, R: 4 * s, n: v.length };
		if (!worst || 4 * s > worst.R) worst = { axis, R: 4 * s };
	}
	if (!worst) throw new DomainInputError('readings', 'contain no dx, dy or dz values');
	const result: RepeatabilityResult = { n: readings.length, axes, worst };
	if (axes.x && axes.y) {
		const s = Math.hypot(axes.x.s, axes.y.s);
		result.radial = { s, R: 2 * s };
	}
	return result;
}
