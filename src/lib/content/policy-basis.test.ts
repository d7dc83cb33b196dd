import { describe, expect, it } from 'vitest';
import { POLICY_SOURCES } from '$lib/domain/policy';
import { policyBasisWords } from './policy-basis';

describe('policyBasisWords', () => {
	it('presents a default without a published source as a shop starting point to review', () => {
		expect(policyBasisWords({ basis: 'common practice', note: '' })).toBe(
			'a shop starting point to review (common practice)'
		);
		expect(policyBasisWords({ basis: 'from memory', note: '' })).toBe(
			'a shop starting point to review (from memory)'
		);
		expect(policyBasisWords({ basis: 'source', note: '' })).toBe('from a published source');
	});

	it('every shipped default that is not sourced reads as a starting point', () => {
		for (const source of Object.values(POLICY_SOURCES)) {
			if (source.basis !== 'source') {
				expect(policyBasisWords(source)).toMatch(/^a shop starting point to review/);
			}
		}
	});
});
