import { randomUUID } from 'node:crypto';
import { and, asc, count, desc, eq, inArray, isNull, type SQL } from 'drizzle-orm';
import type { PoolConnection } from 'mysql2/promise';
import { generateFixtureCode, normaliseFixtureCode } from '$lib/domain/fixture-code';
import type { FlagKind } from '$lib/schemas/fixture';
import type { FixtureCreateInput, FixturePatch, RegisterQuery } from '$lib/schemas/fixture-form';
import { db, type Db } from './db';
import { fixtureState, fixtures, flags, locations, sites, areas, users } from './db/schema';
import { drizzleOn, inTransaction } from './db/transaction';
import { assertCan, type Actor } from './guard';
import { refoldOn } from './health';
import * as history from './history';
import { ingestOn } from './ingest';
import { effectivePolicy } from './policies';
import { locationPath } from './places';
import {
	assertLocation,
	FixtureInputError,
	CODE_ATTEMPTS,
	duplicateKey,
	filters,
	fixtureValues,
	isCodeKey,
	recordColumns,
	withPlace,
	toRecord,
	type Tx
} from './register-rows';
import type {
	FixtureDetail,
	FixtureListItem,
	FixtureRecord,
	RegisterPage
} from '../schemas/register-views';

/*
 * The fixture register: plain async functions that the pages, the API, the CSV import and the
 * demo seed all call, so each rule is enforced in one place. The CSV export and import are in
 * ./register-csv.ts, what both share in ./register-rows.ts; both are re-exported here.
 */

export { FixtureInputError } from './register-rows';
export type { FixtureDetail, FixtureListItem, FixtureRecord, RegisterPage };
export {
	commitImport,
	exportCsv,
	previewImport,
	type ImportPreview,
	type ImportPreviewRow
} from './register-csv';

/** The device id of events the server itself logs (a move made in the register). */
export const SERVER_DEVICE = 'server';

function ordering(query: Pick<RegisterQuery, 'sort' | 'dir'>): SQL[] {
	const d = query.dir === 'desc' ? desc : asc;
	const cols = {
		code: [fixtures.code],
		name: [fixtures.name],
		// Enum columns sort in declaration order, which is the order the app lists them in.
		type: [fixtures.type, fixtures.name],
		status: [fixtures.status, fixtures.name],
		location: [sites.name, areas.name, locations.name, fixtures.name],
		updated: [fixtures.updatedAt]
	}[query.sort];
	// The id breaks ties, so paging never shows a fixture twice or skips one.
	return [...cols.map((c) => d(c)), d(fixtures.id)];
}

const listColumns = {
	id: fixtures.id,
	code: fixtures.code,
	name: fixtures.name,
	type: fixtures.type,
	status: fixtures.status,
	updatedAt: fixtures.updatedAt,
	siteId: sites.id,
	site: sites.name,
	areaId: areas.id,
	area: areas.name,
	locationId: locations.id,
	location: locations.name
};

/** Open flag kinds per fixture id. */
async function openFlagsFor(ids: number[]): Promise<Map<number, FlagKind[]>> {
	const map = new Map<number, FlagKind[]>();
	if (!ids.length) return map;
	const rows = await db
		.select({ fixtureId: flags.fixtureId, kind: flags.kind })
		.from(flags)
		.where(and(inArray(flags.fixtureId, ids), isNull(flags.clearedAt)))
		.orderBy(asc(flags.raisedAt));
	for (const r of rows) {
		const kinds = map.get(r.fixtureId) ?? [];
		if (!kinds.includes(r.kind)) kinds.push(r.kind);
		map.set(r.fixtureId, kinds);
	}
	return map;
}

/** Searches, filters, sorts and pages the register (server-side), with the total match count. */
export async function list(query: RegisterQuery): Promise<RegisterPage> {
	const where = filters(query);
	const [rows, [{ total }]] = await Promise.all([
		withPlace(db.select(listColumns).from(fixtures).$dynamic())
			.where(where)
			.orderBy(...ordering(query))
			.limit(query.pageSize)
			.offset((query.page - 1) * query.pageSize),
		withPlace(db.select({ total: count() }).from(fixtures).$dynamic()).where(where)
	]);
	const flagMap = await openFlagsFor(rows.map((r) => r.id));
	return {
		items: rows.map((r) => ({
			id: r.id,
			code: r.code,
			name: r.name,
			type: r.type,
			status: r.status,
			updatedAt: r.updatedAt.toISOString(),
			place: {
				siteId: r.siteId,
				site: r.site,
				areaId: r.areaId,
				area: r.area,
				locationId: r.locationId,
				location: r.location
			},
			openFlags: flagMap.get(r.id) ?? []
		})),
		total: Number(total),
		page: query.page,
		pageSize: query.pageSize
	};
}

async function findRow(code: string, q: Db | Tx = db) {
	const reading = normaliseFixtureCode(code);
	if (!reading.ok) return undefined;
	const [row] = await q
		.select(recordColumns)
		.from(fixtures)
		.where(eq(fixtures.code, reading.code))
		.limit(1);
	return row;
}

/** The stored fields of one fixture (any spelling of its code), or null. */
export async function getRecord(code: string): Promise<FixtureRecord | null> {
	const row = await findRow(code);
	return row ? toRecord(row) : null;
}

/** One fixture with its place, effective policy, state, open flags and recent events, or null. */
export async function getByCode(code: string, recent = 10): Promise<FixtureDetail | null> {
	const row = await findRow(code);
	if (!row) return null;
	const [place, policy, [state], openFlags, hist, [creator]] = await Promise.all([
		locationPath(row.locationId),
		effectivePolicy(row),
		db.select().from(fixtureState).where(eq(fixtureState.fixtureId, row.id)).limit(1),
		db
			.select({ id: flags.id, kind: flags.kind, reason: flags.reason, raisedAt: flags.raisedAt })
			.from(flags)
			.where(and(eq(flags.fixtureId, row.id), isNull(flags.clearedAt)))
			.orderBy(asc(flags.raisedAt)),
		history.fixtureEvents(row.code, recent),
		row.createdBy
			? db
					.select({ name: users.name, email: users.email })
					.from(users)
					.where(eq(users.id, row.createdBy))
			: Promise.resolve([])
	]);
	const iso = (d: Date | null) => (d ? d.toISOString() : null);
	return {
		...toRecord(row),
		place: place!,
		createdBy: creator ? (creator.name ?? creator.email) : null,
		policy,
		state: state
			? {
					eventCount: state.eventCount,
					totalCycles: state.totalCycles,
					cyclesSinceCleaning: state.cyclesSinceCleaning,
					cyclesSinceInspection: state.cyclesSinceInspection,
					cyclesSincePartSwap: state.cyclesSincePartSwap,
					repeatability_um: state.repeatability_um,
					wearGrade: state.wearGrade,
					lastEventAt: iso(state.lastEventAt),
					lastCleaningAt: iso(state.lastCleaningAt),
					lastInspectionAt: iso(state.lastInspectionAt),
					updatedAt: state.updatedAt.toISOString()
				}
			: null,
		openFlags: openFlags.map((f) => ({ ...f, raisedAt: f.raisedAt.toISOString() })),
		recentEvents: hist?.events ?? []
	};
}

/**
 * Adds a fixture (supervisor or admin). The server makes the code unless `opts.code` gives one
 * (import and demo seed); a generated code that collides is drawn again.
 */
export async function create(
	actor: Actor,
	input: FixtureCreateInput,
	opts: { code?: string; random?: () => number } = {}
): Promise<{ id: number; code: string }> {
	assertCan(actor, 'fixture.edit');
	await assertLocation(input.locationId);
	let given: string | undefined;
	if (opts.code !== undefined) {
		const r = normaliseFixtureCode(opts.code);
		if (!r.ok) throw new FixtureInputError({ code: [r.error] });
		given = r.code;
	}
	const now = new Date();
	for (let attempt = 0; attempt < CODE_ATTEMPTS; attempt++) {
		const code = given ?? generateFixtureCode(opts.random);
		try {
			const [res] = await db
				.insert(fixtures)
				.values({
					...fixtureValues(input),
					code,
					createdBy: actor.id,
					createdAt: now,
					updatedAt: now
				})
				.$returningId();
			return { id: res.id, code };
		} catch (err) {
			if (!isCodeKey(duplicateKey(err))) throw err;
			if (given)
				throw new FixtureInputError({ code: [`Code ${given} is already in the register.`] });
		}
	}
	throw new Error(
		`No free fixture code after ${CODE_ATTEMPTS} attempts; the code space is crowded.`
	);
}

/** Fixture fields the derived state or the effective policy depend on. */
const FOLD_INPUTS = ['commissionedOn', 'type', 'repeatabilitySpec_um', 'ratedLifeCycles'] as const;

/**
 * Changes a fixture (supervisor or admin), in one transaction: the row, and when it moves to
 * another location a `move` event attributed to the actor. The move goes through ingest
 * (ingestOn) like a phone's: same content hash, fold and flag diff. A change to what the fold or
 * the policy depends on refolds the state and re-evaluates the flags in the same transaction, so
 * the stored state always equals a rebuild. Returns null when there is no such code.
 */
export async function update(
	actor: Actor,
	code: string,
	patch: FixturePatch
): Promise<{ code: string; moved: boolean } | null> {
	assertCan(actor, 'fixture.edit');
	const reading = normaliseFixtureCode(code);
	if (!reading.ok) return null;
	// One connection: the row, the event, the fold and the flags all go through it.
	return inTransaction(async (conn) => {
		const tx = drizzleOn(conn);
		// Locked, so two edits that both move the fixture see each other's location.
		const [row] = await tx
			.select({ id: fixtures.id, code: fixtures.code, locationId: fixtures.locationId })
			.from(fixtures)
			.where(eq(fixtures.code, reading.code))
			.for('update');
		if (!row) return null;
		const moved = patch.locationId !== undefined && patch.locationId !== row.locationId;
		if (moved) await assertLocation(patch.locationId!, tx);
		const now = new Date();
		await tx
			.update(fixtures)
			.set({ ...fixtureValues(patch), updatedAt: now })
			.where(eq(fixtures.id, row.id));
		if (moved)
			await logMove(conn, actor, row.code, { from: row.locationId, to: patch.locationId! }, now);
		if (FOLD_INPUTS.some((k) => patch[k] !== undefined)) await refoldOn(conn, row.id, now);
		return { code: row.code, moved };
	});
}

/**
 * The register's move as a phone would send it (the sync schema's payload: the new location's
 * id as text, and where it was, which the register knows), ingested inside the caller's
 * transaction from the device "server".
 */
async function logMove(
	conn: PoolConnection,
	actor: Actor,
	fixtureCode: string,
	move: { from: number; to: number },
	now: Date
): Promise<void> {
	const event = {
		id: randomUUID(),
		fixtureCode,
		kind: 'move',
		occurredAt: now.toISOString(),
		payload: { locationId: String(move.to), fromLocationId: String(move.from) }
	};
	const [result] = await ingestOn(conn, actor, SERVER_DEVICE, [event], { now });
	if (result.status !== 'accepted') {
		throw new Error(`The move of ${fixtureCode} was not logged: ${result.error ?? result.status}`);
	}
}
