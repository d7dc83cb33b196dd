import { describe, expect, it } from 'vitest';
import { DEFAULT_POOL_LIMITS, nestingGuardOn, poolLimits } from './pool';

describe('poolLimits', () => {
	it('takes the defaults when nothing is set', () => {
		expect(poolLimits({})).toEqual(DEFAULT_POOL_LIMITS);
		expect(poolLimits({ DB_POOL_SIZE: ' ' })).toEqual(DEFAULT_POOL_LIMITS);
	});

	it('reads size, queue limit and acquire timeout from the environment', () => {
		expect(
			poolLimits({ DB_POOL_SIZE: '4', DB_POOL_QUEUE_LIMIT: '0', DB_ACQUIRE_TIMEOUT_MS: '250' })
		).toEqual({ size: 4, queueLimit: 0, acquireTimeoutMs: 250 });
	});

	it('refuses values that are not whole numbers in range, naming the variable', () => {
		expect(() => poolLimits({ DB_POOL_SIZE: '0' })).toThrow(/DB_POOL_SIZE .* at least 1/);
		expect(() => poolLimits({ DB_POOL_QUEUE_LIMIT: '-1' })).toThrow(/DB_POOL_QUEUE_LIMIT/);
		expect(() => poolLimits({ DB_ACQUIRE_TIMEOUT_MS: '2.5' })).toThrow(/DB_ACQUIRE_TIMEOUT_MS/);
		expect(() => poolLimits({ DB_ACQUIRE_TIMEOUT_MS: 'soon' })).toThrow(/not "soon"/);
	});
});

describe('nestingGuardOn', () => {
	it('is on in tests and development, off in production', () => {
		expect(nestingGuardOn({ NESTMARK_ENV: 'test' })).toBe(true);
		expect(nestingGuardOn({ NESTMARK_ENV: 'development' })).toBe(true);
		expect(nestingGuardOn({ VITEST: 'true' })).toBe(true);
		expect(nestingGuardOn({ NESTMARK_ENV: 'production' })).toBe(false);
		expect(nestingGuardOn({})).toBe(false);
	});
});
