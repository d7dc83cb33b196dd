/**
 * Errors thrown by the computation core for input it cannot work with. Every function in
 * $lib/domain throws one of these rather than return NaN, so callers (API routes, forms) can turn
 * the message into a 400 answer.
 */
export class DomainInputError extends Error {
	/** Name of the argument or field at fault, e.g. "contacts[2].normal". */
	readonly field: string;

	constructor(field: string, message: string) {
		super(`${field}: ${message}`);
		this.name = 'DomainInputError';
		this.field = field;
	}
}

/** Throws unless `value` is a finite number. */
export function requireFinite(value: number, field: string): number {
	if (typeof value !== 'number' || !Number.isFinite(value)) {
		throw new DomainInputError(field, `must be a finite number (got ${String(value)})`);
	}
	return value;
}

/** Throws unless `value` is a finite number greater than zero. */
export function requirePositive(value: number, field: string): number {
	requireFinite(value, field);
	if (value <= 0) throw new DomainInputError(field, `must be greater than zero (got ${value})`);
	return value;
}

/** Throws unless `value` is a finite number of zero or more. */
export function requireNonNegative(value: number, field: string): number {
	requireFinite(value, field);
	if (value < 0) throw new DomainInputError(field, `must not be negative (got ${value})`);
	return value;
}

/** Throws unless `value` is an integer in [min, max]. */
export function requireInteger(value: number, field: string, min: number, max = Infinity): number {
	if (typeof value !== 'number' || !Number.isInteger(value) || value < min || value > max) {
		const range = max === Infinity ? `at least ${min}` : `from ${min} to ${max}`;
		throw new DomainInputError(field, `must be a whole number ${range} (got ${String(value)})`);
	}
	return value;
}
