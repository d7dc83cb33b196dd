import { describe, expect, it } from 'vitest';
import { DEFAULT_POLICY, POLICY_SOURCES, type Policy, assertPolicy } from './policy';

describe('policy', () => {
	it('the defaults are valid', () => {
		expect(assertPolicy(DEFAULT_POLICY)).toBe(DEFAULT_POLICY);
	});

	it('every field says where its default comes from', () => {
		expect(Object.keys(POLICY_SOURCES).sort()).toEqual(Object.keys(DEFAULT_POLICY).sort());
		for (const source of Object.values(POLICY_SOURCES)) {
			expect(['source', 'common practice', 'from memory']).toContain(source.basis);
			expect(source.note.length).toBeGreaterThan(20);
		}
	});

	it.each<[Partial<Policy>, RegExp]>([
		[{ repeatabilitySpec_um: 0 }, /policy.repeatabilitySpec_um: must be greater than zero/],
		[
			{ repeatabilityWindow: 1 },
			/policy.repeatabilityWindow: must be a whole number from 2 to 1000/
		],
		[{ settleWindow: 2.5 }, /policy.settleWindow/],
		[{ breakInMinCycles: -1 }, /policy.breakInMinCycles/],
		[{ settleTolerance_um: -0.1 }, /policy.settleTolerance_um: must not be negative/],
		[{ cleaningIntervalDays: 0 }, /policy.cleaningIntervalDays: must be greater than zero/],
		[{ ratedLifeCycles: NaN }, /policy.ratedLifeCycles: must be a finite number/],
		[{ wearLimitGrade: 5 }, /policy.wearLimitGrade: must be a whole number from 1 to 4/],
		[{ forecastHorizonCycles: -5 }, /policy.forecastHorizonCycles/]
	])('rejects %o', (change, message) => {
		expect(() => assertPolicy({ ...DEFAULT_POLICY, ...change })).toThrow(message);
	});

	it('intervals and the rated life may be switched off with null', () => {
		const off: Policy = {
			...DEFAULT_POLICY,
			cleaningIntervalCycles: null,
			cleaningIntervalDays: null,
			inspectionIntervalCycles: null,
			inspectionIntervalDays: null,
			ratedLifeCycles: null
		};
		expect(() => assertPolicy(off)).not.toThrow();
	});

	it('a missing field is named', () => {
		const { settleWindow: _drop, ...rest } = DEFAULT_POLICY;
		expect(() => assertPolicy(rest as Policy)).toThrow(/policy.settleWindow/);
	});
});
