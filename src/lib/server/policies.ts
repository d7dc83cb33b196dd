import { eq, or } from 'drizzle-orm';
import { DEFAULT_POLICY, POLICY_SOURCES, type Policy } from '$lib/domain/policy';
import { FIXTURE_TYPES, FIXTURE_TYPE_LABELS, type FixtureType } from '$lib/schemas/fixture';
import { db } from './db';
import { policies } from './db/schema';
import { assertCan, type Actor } from './guard';
import type { EffectivePolicyEntry, PolicySourceKind } from '../schemas/policy-views';

export type { EffectivePolicyEntry, PolicySourceKind };

/*
 * Which health-rule settings apply to a fixture, and where each one comes from. The most specific
 * wins: the fixture's own figure, then its named policy class, then its type's policy, then
 * Nestmark's built-in default.
 */

type PolicyField = keyof Policy;

/** How each policy value is named and measured on screen. */
export const POLICY_FIELD_INFO: Record<PolicyField, { label: string; unit: string }> = {
	repeatabilitySpec_um: { label: 'Repeatability spec (R = 4s)', unit: 'µm' },
	repeatabilityWindow: { label: 'Reseats per repeatability window', unit: 'reseats' },
	breakInMinCycles: { label: 'Minimum break-in cycles', unit: 'cycles' },
	settleWindow: { label: 'Settling window', unit: 'reseats' },
	settleTolerance_um: { label: 'Settling tolerance', unit: 'µm' },
	cleaningIntervalCycles: { label: 'Cleaning interval', unit: 'cycles' },
	cleaningIntervalDays: { label: 'Cleaning interval', unit: 'days' },
	inspectionIntervalCycles: { label: 'Inspection interval', unit: 'cycles' },
	inspectionIntervalDays: { label: 'Inspection interval', unit: 'days' },
	ratedLifeCycles: { label: 'Rated seating life', unit: 'cycles' },
	wearLimitGrade: { label: 'Wear grade limit', unit: 'grade' },
	forecastHorizonCycles: { label: 'Forecast horizon', unit: 'cycles' },
	planningHorizonDays: { label: 'Planning horizon', unit: 'days' }
};
const FIELDS = Object.keys(POLICY_FIELD_INFO) as PolicyField[];

function pickPolicy(row: PolicyRow): Policy {
	return Object.fromEntries(FIELDS.map((f) => [f, row[f]])) as unknown as Policy;
}

/** The fields of a fixture that bear on its policy. */
export interface PolicySubject {
	type: FixtureType;
	policyId: number | null;
	policyOverrides: Record<string, number | null> | null;
	repeatabilitySpec_um: number | null;
	ratedLifeCycles: number | null;
}

/** The policy rows that may bear on fixtures: by id (classes) and by fixture type. */
export interface PolicyRows {
	byId: ReadonlyMap<number, PolicyRow>;
	byType: ReadonlyMap<string, PolicyRow>;
}

type PolicyRow = typeof policies.$inferSelect;

/** Indexes policy rows for resolvePolicy. */
export function indexPolicyRows(rows: readonly PolicyRow[]): PolicyRows {
	return {
		byId: new Map(rows.map((r) => [r.id, r])),
		byType: new Map(rows.filter((r) => r.fixtureType).map((r) => [r.fixtureType!, r]))
	};
}

/**
 * Resolves a fixture's effective policy from rows already read, value by value with its source.
 * The one place the order of precedence lives: the server's health rules and the phone's copy of
 * the register both come from here, so they cannot disagree.
 */
export function resolvePolicy(f: PolicySubject, rows: PolicyRows): EffectivePolicyEntry[] {
	const classRow = f.policyId ? rows.byId.get(f.policyId) : undefined;
	const typeRow = rows.byType.get(f.type);

	let base: Policy;
	let source: EffectivePolicyEntry['source'];
	if (classRow) {
		base = pickPolicy(classRow);
		source = { kind: 'class', label: `Policy “${classRow.name}”` };
	} else if (typeRow) {
		base = pickPolicy(typeRow);
		source = { kind: 'type', label: `Policy for ${FIXTURE_TYPE_LABELS[f.type].toLowerCase()}s` };
	} else {
		base = DEFAULT_POLICY;
		source = { kind: 'default', label: 'Nestmark default' };
	}
	const own: Partial<Record<PolicyField, number | null>> = {
		...(f.policyOverrides ?? {}),
		...(f.repeatabilitySpec_um !== null ? { repeatabilitySpec_um: f.repeatabilitySpec_um } : {}),
		...(f.ratedLifeCycles !== null ? { ratedLifeCycles: f.ratedLifeCycles } : {})
	};
	return FIELDS.map((field) => {
		const fromFixture = field in own;
		return {
			field,
			...POLICY_FIELD_INFO[field],
			value: fromFixture ? (own[field] ?? null) : ((base[field] as number | null) ?? null),
			source: fromFixture ? { kind: 'fixture', label: 'Set on this fixture' } : source,
			note: !fromFixture && source.kind === 'default' ? POLICY_SOURCES[field] : null
		};
	});
}

/** The values of resolved entries as a Policy (null where a rule is switched off). */
export function policyValues(entries: readonly EffectivePolicyEntry[]): Policy {
	return Object.fromEntries(entries.map((e) => [e.field, e.value])) as unknown as Policy;
}

/** The effective policy of a fixture, value by value, with each value's source. */
export async function effectivePolicy(f: PolicySubject): Promise<EffectivePolicyEntry[]> {
	const rows = await db
		.select()
		.from(policies)
		.where(
			or(eq(policies.fixtureType, f.type), f.policyId ? eq(policies.id, f.policyId) : undefined)
		);
	return resolvePolicy(f, indexPolicyRows(rows));
}

/**
 * Makes sure every fixture type has its policy row, filled from the built-in defaults (admin).
 * Existing rows are left as the shop set them. Returns how many rows were added.
 */
export async function ensureTypePolicies(actor: Actor): Promise<number> {
	assertCan(actor, 'policy.defaults');
	const existing = await db.select({ type: policies.fixtureType }).from(policies);
	const have = new Set(existing.map((r) => r.type));
	let added = 0;
	for (const type of FIXTURE_TYPES) {
		if (have.has(type)) continue;
		const p = DEFAULT_POLICY;
		await db.insert(policies).values({
			name: `${FIXTURE_TYPE_LABELS[type]} — default`,
			fixtureType: type,
			...Object.fromEntries(FIELDS.map((f) => [f, p[f] ?? null])),
			notes: 'Created from Nestmark’s built-in defaults; adjust to your shop’s experience.',
			updatedBy: actor.id
		} as typeof policies.$inferInsert);
		added++;
	}
	return added;
}
