import type { PolicySource } from '$lib/domain/policy';

/**
 * How the pages introduce a default policy value. Only a published figure is presented as one; every
 * other default is the shop's to check against its own process before relying on it.
 */
export function policyBasisWords(source: PolicySource): string {
	return source.basis === 'source'
		? 'from a published source'
		: `a shop starting point to review (${source.basis})`;
}
