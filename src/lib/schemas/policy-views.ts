/** Policies as the policy pages and the fixture page show them: plain types, no I/O. */
import type { FixtureType } from '../domain/fixture-types';
import type { Policy, PolicySource } from '../domain/policy';

type PolicyField = keyof Policy;

/** Where one effective value comes from. */
export type PolicySourceKind = 'fixture' | 'class' | 'type' | 'default';

/** One line of a fixture's effective policy. */
export interface EffectivePolicyEntry {
	field: PolicyField;
	label: string;
	unit: string;
	/** Null means the rule is switched off (e.g. no calendar interval). */
	value: number | null;
	source: { kind: PolicySourceKind; label: string };
	/** For built-in defaults: what the default is based on (a source, common practice…). */
	note: PolicySource | null;
}

/** One value of a type's policy with its origin. */
export interface PolicyFieldView {
	field: keyof Policy;
	label: string;
	unit: string;
	value: number | null;
	/** Built-in default and what it rests on, or null when the shop set another value. */
	basis: PolicySource | null;
	defaultValue: number | null;
}

/** A fixture type's policy as the page shows it. */
export interface TypePolicyView {
	type: FixtureType;
	label: string;
	saved: boolean;
	updatedAt: string | null;
	fields: PolicyFieldView[];
}
