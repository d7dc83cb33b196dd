import { createHash } from 'node:crypto';
import { asc, eq, isNull } from 'drizzle-orm';
import type { FixtureState } from '$lib/domain/health';
import { inspectionContactNames } from '$lib/domain/inspection-contacts';
import type { Policy } from '$lib/domain/policy';
import type { SnapshotFixture, SnapshotWorkOrder } from '$lib/schemas/register-snapshot';
import type { Actor } from './guard';
import { indexPolicyRows, policyValues, resolvePolicy } from './policies';
import { db, schema } from './db';
import { withPlace } from './db/place-join';
import { plannedWorkByFlag } from './register-snapshot-work';
import { initialStateFor } from './state-store';

export { myOpenWorkOrders } from './register-snapshot-work';

/*
 * The copy of the register a phone keeps for offline use: per fixture, what the card shows
 * (identity, place, status, open flags with the work planned for them, caution inputs, policy
 * figures, counters), and the open work orders of the person it is for. Its ETag is a
 * hash of the content itself, so it changes exactly when something a device shows changes.
 */

const { fixtures, locations, areas, sites, fixtureState, flags, policies, couplingGeometries } =
	schema;

type PolicyFigures = SnapshotFixture['policy'];

const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);

/**
 * The register entries `actor` may see (every fixture for now; scoping by site comes with the
 * admin issue), in code order; only the one with `code` when given.
 */
export async function snapshotFixtures(_actor: Actor, code?: string): Promise<SnapshotFixture[]> {
	const base = db
		.select({
			f: fixtures,
			site: sites.name,
			area: areas.name,
			location: locations.name,
			state: fixtureState
		})
		.from(fixtures)
		.$dynamic();
	const withState = withPlace(base).leftJoin(fixtureState, eq(fixtureState.fixtureId, fixtures.id));
	const [rows, policyRows, openFlags, planned] = await Promise.all([
		(code ? withState.where(eq(fixtures.code, code)) : withState).orderBy(asc(fixtures.code)),
		db.select().from(policies),
		db
			.select({
				id: flags.id,
				fixtureId: flags.fixtureId,
				kind: flags.kind,
				reason: flags.reason,
				raisedAt: flags.raisedAt
			})
			.from(flags)
			.where(isNull(flags.clearedAt))
			.orderBy(asc(flags.raisedAt), asc(flags.id)),
		plannedWorkByFlag()
	]);

	const contactsOf = await geometryContacts(rows.map((r) => r.f.id));
	const policyIndex = indexPolicyRows(policyRows);
	const flagsOf = new Map<number, SnapshotFixture['flags']>();
	for (const fl of openFlags) {
		const list = flagsOf.get(fl.fixtureId) ?? [];
		const plannedWork = planned.get(fl.id);
		list.push({
			kind: fl.kind,
			reason: fl.reason,
			raisedAt: fl.raisedAt.toISOString(),
			...(plannedWork ? { plannedWork } : {})
		});
		flagsOf.set(fl.fixtureId, list);
	}

	return rows.map(({ f, site, area, location, state }) => {
		// Resolved exactly as the server's health rules resolve it, so the card's figures and the
		// phone's own break-in verdict agree with the server's.
		const policy = policyValues(resolvePolicy(f, policyIndex));
		return {
			code: f.code,
			name: f.name,
			type: f.type,
			status: f.status,
			location: { site, area, name: location },
			flags: flagsOf.get(f.id) ?? [],
			mass_kg: f.mass_kg,
			policy: policy as PolicyFigures,
			state: {
				totalCycles: state?.totalCycles ?? 0,
				cyclesSinceCleaning: state?.cyclesSinceCleaning ?? 0,
				cyclesSinceInspection: state?.cyclesSinceInspection ?? 0,
				repeatability_um: state?.repeatability_um ?? null,
				lastEventAt: iso(state?.lastEventAt),
				lastCleaningAt: iso(state?.lastCleaningAt),
				lastInspectionAt: iso(state?.lastInspectionAt)
			},
			breakIn: breakInOf(f, state?.data as FixtureState | undefined, policy),
			inspectionContacts: contactsOf.get(f.id) ?? null,
			updatedAt: f.updatedAt.toISOString()
		};
	});
}

/** The fixture's break-in progress (a fixture with no events yet starts as ingest would) and rule. */
function breakInOf(
	f: { commissionedOn: string | null },
	state: FixtureState | undefined,
	policy: Policy
): NonNullable<SnapshotFixture['breakIn']> {
	const b = state?.breakIn ?? initialStateFor(f).breakIn;
	return {
		required: b.required,
		reason: b.reason,
		cycles: b.cycles,
		acc: b.acc,
		windows: b.windows,
		rule: {
			repeatabilitySpec_um: policy.repeatabilitySpec_um,
			breakInMinCycles: policy.breakInMinCycles,
			settleWindow: policy.settleWindow,
			settleTolerance_um: policy.settleTolerance_um
		}
	};
}

/** Per fixture, the inspection contacts named by its latest saved geometry (if it has one). */
async function geometryContacts(fixtureIds: number[]): Promise<Map<number, string[]>> {
	const out = new Map<number, string[]>();
	if (!fixtureIds.length) return out;
	const rows = await db
		.select({
			fixtureId: couplingGeometries.fixtureId,
			version: couplingGeometries.version,
			contacts: couplingGeometries.contacts
		})
		.from(couplingGeometries)
		.where(fixtureIds.length === 1 ? eq(couplingGeometries.fixtureId, fixtureIds[0]) : undefined)
		.orderBy(asc(couplingGeometries.fixtureId), asc(couplingGeometries.version));
	const wanted = new Set(fixtureIds);
	for (const r of rows) {
		if (!wanted.has(r.fixtureId)) continue;
		const names = inspectionContactNames(r.contacts.map((c) => c.label));
		if (names.length) out.set(r.fixtureId, names);
		else out.delete(r.fixtureId);
	}
	return out;
}

/**
 * A strong ETag over the content: same entries (and work orders, which are the person's own),
 * same tag, on any server.
 */
export function snapshotEtag(entries: SnapshotFixture[], workOrders?: SnapshotWorkOrder[]): string {
	const content = workOrders ? { entries, workOrders } : entries;
	const hash = createHash('sha256').update(JSON.stringify(content)).digest('base64url');
	return `"${hash.slice(0, 32)}"`;
}

/** True when an If-None-Match header names `etag` (or is `*`); weak forms compare equal, as RFC 9110 §13.1.2 says for this header. */
export function etagMatches(ifNoneMatch: string | null, etag: string): boolean {
	if (!ifNoneMatch) return false;
	const strip = (t: string) => t.trim().replace(/^W\//, '');
	return ifNoneMatch.split(',').some((t) => t.trim() === '*' || strip(t) === strip(etag));
}
