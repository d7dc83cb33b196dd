/**
 * Policy editing (supervisor, admin): each fixture type's policy with where every value comes
 * from, per-fixture overrides, and re-evaluation of the affected fixtures' flags after a change.
 *
 * A change re-evaluates flags from the stored states under the new policy (one transaction per
 * chunk of fixtures, see reevaluateFlags). Settings that shape the fold itself (window sizes, the
 * break-in rule) apply to events folded from then on; `npm run state:rebuild -- --fix` refolds
 * every history under the current policies when that is wanted.
 */
import { and, eq, isNull } from 'drizzle-orm';
import { DEFAULT_POLICY, POLICY_SOURCES, type Policy } from '../domain/policy';
import { normaliseFixtureCode } from '../domain/fixture-code';
import { FIXTURE_TYPES, FIXTURE_TYPE_LABELS, type FixtureType } from '../schemas/fixture';
import { POLICY_FIELDS, type PolicyValues } from '../schemas/policy-form';
import { db, schema } from './db';
import { assertCan, type Actor } from './guard';
import { reevaluateFlags, type FlagChange } from './health';
import type { PolicyFieldView, TypePolicyView } from '../schemas/policy-views';
import { effectivePolicy, POLICY_FIELD_INFO, type EffectivePolicyEntry } from './policies';

export type { PolicyFieldView, TypePolicyView };

/** Every fixture type's policy (built-in defaults for a type with no saved row). */
export async function typePolicies(actor: Actor): Promise<TypePolicyView[]> {
	assertCan(actor, 'policy.edit');
	const rows = await db.select().from(schema.policies);
	return FIXTURE_TYPES.map((type) => {
		const row = rows.find((r) => r.fixtureType === type);
		return {
			type,
			label: FIXTURE_TYPE_LABELS[type],
			saved: !!row,
			updatedAt: row?.updatedAt.toISOString() ?? null,
			fields: POLICY_FIELDS.map((field) => {
				const value = row ? (row[field] as number | null) : DEFAULT_POLICY[field];
				const defaultValue = DEFAULT_POLICY[field];
				return {
					field,
					...POLICY_FIELD_INFO[field],
					value,
					defaultValue,
					basis: value === defaultValue ? POLICY_SOURCES[field] : null
				};
			})
		};
	});
}

/**
 * Saves a fixture type's policy and re-evaluates the flags of the fixtures it governs (those of
 * the type without a named policy class). Returns the flag changes.
 */
export async function saveTypePolicy(
	actor: Actor,
	type: FixtureType,
	values: PolicyValues,
	now: Date = new Date()
): Promise<FlagChange[]> {
	assertCan(actor, 'policy.edit');
	const [row] = await db
		.select({ id: schema.policies.id })
		.from(schema.policies)
		.where(eq(schema.policies.fixtureType, type));
	if (row) {
		await db
			.update(schema.policies)
			.set({ ...values, updatedAt: now, updatedBy: actor.id })
			.where(eq(schema.policies.id, row.id));
	} else {
		await db.insert(schema.policies).values({
			name: `${FIXTURE_TYPE_LABELS[type]} — default`,
			fixtureType: type,
			...values,
			updatedAt: now,
			updatedBy: actor.id
		});
	}
	const governed = await db
		.select({ id: schema.fixtures.id })
		.from(schema.fixtures)
		.where(and(eq(schema.fixtures.type, type), isNull(schema.fixtures.policyId)));
	return reevaluateFlags(
		governed.map((f) => f.id),
		{ now }
	);
}

/** A fixture's effective policy and its own overrides, or null when there is no such code. */
export async function fixturePolicy(
	actor: Actor,
	code: string
): Promise<{
	code: string;
	name: string;
	entries: EffectivePolicyEntry[];
	overrides: Partial<Record<keyof Policy, number | null>>;
} | null> {
	assertCan(actor, 'policy.edit');
	const reading = normaliseFixtureCode(code);
	if (!reading.ok) return null;
	const [f] = await db.select().from(schema.fixtures).where(eq(schema.fixtures.code, reading.code));
	if (!f) return null;
	const overrides: Partial<Record<keyof Policy, number | null>> = { ...(f.policyOverrides ?? {}) };
	if (f.repeatabilitySpec_um !== null) overrides.repeatabilitySpec_um = f.repeatabilitySpec_um;
	if (f.ratedLifeCycles !== null) overrides.ratedLifeCycles = f.ratedLifeCycles;
	return { code: f.code, name: f.name, entries: await effectivePolicy(f), overrides };
}

/**
 * Replaces a fixture's overrides (fields left out inherit) and re-evaluates its flags. The spec
 * and the rated life are the register's own columns, so they are written there.
 */
export async function saveFixtureOverrides(
	actor: Actor,
	code: string,
	overrides: Partial<PolicyValues>,
	now: Date = new Date()
): Promise<FlagChange[] | null> {
	assertCan(actor, 'policy.edit');
	const reading = normaliseFixtureCode(code);
	if (!reading.ok) return null;
	const [f] = await db
		.select({ id: schema.fixtures.id })
		.from(schema.fixtures)
		.where(eq(schema.fixtures.code, reading.code));
	if (!f) return null;
	const { repeatabilitySpec_um, ratedLifeCycles, ...rest } = overrides;
	await db
		.update(schema.fixtures)
		.set({
			policyOverrides: Object.keys(rest).length ? rest : null,
			repeatabilitySpec_um: repeatabilitySpec_um ?? null,
			ratedLifeCycles: ratedLifeCycles ?? null,
			updatedAt: now
		})
		.where(eq(schema.fixtures.id, f.id));
	return reevaluateFlags([f.id], { now });
}
