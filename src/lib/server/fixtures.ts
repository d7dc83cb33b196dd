import { createHash, randomUUID } from 'node:crypto';
import {
	and,
	asc,
	count,
	desc,
	eq,
	exists,
	inArray,
	isNull,
	like,
	notExists,
	or,
	sql,
	type SQL
} from 'drizzle-orm';
import { generateFixtureCode, normaliseFixtureCode } from '$lib/domain/fixture-code';
import type { FixtureStatus, FixtureType, FlagKind } from '$lib/schemas/fixture';
import type { FixtureCreateInput, FixturePatch, RegisterQuery } from '$lib/schemas/fixture-form';
import {
	parseFixtureCsv,
	toFixtureCsv,
	type CsvRecord,
	type CsvRowError,
	type CsvColumn
} from '$lib/schemas/fixture-csv';
import { db, type Db } from './db';
import { areas, events, fixtureState, fixtures, flags, locations, sites, users } from './db/schema';
import { assertCan, type Actor } from './guard';
import * as history from './history';
import { effectivePolicy, type EffectivePolicyEntry } from './policies';
import { locationPath, placeResolver, type LocationPath } from './places';

/*
 * The fixture register: plain async functions that the pages, the API, the CSV import and the
 * demo seed all call, so each rule is enforced in one place.
 */

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

/** Input the register refused, with messages per field (form field names). */
export class FixtureInputError extends Error {
	constructor(readonly fields: Record<string, string[]>) {
		super(Object.values(fields).flat().join(' '));
		this.name = 'FixtureInputError';
	}
}

/** One row of the register list. */
export interface FixtureListItem {
	id: number;
	code: string;
	name: string;
	type: FixtureType;
	status: FixtureStatus;
	place: LocationPath;
	openFlags: FlagKind[];
	updatedAt: string;
}

/** One page of the register, and how many fixtures match in all. */
export interface RegisterPage {
	items: FixtureListItem[];
	total: number;
	page: number;
	pageSize: number;
}

/** Backslash-escapes LIKE wildcards so a search for "50%" means the characters typed. */
function escapeLike(s: string): string {
	return s.replace(/[\\%_]/g, (c) => `\\${c}`);
}

const openFlagOf = (kind?: FlagKind) =>
	db
		.select({ one: sql`1` })
		.from(flags)
		.where(
			and(
				eq(flags.fixtureId, fixtures.id),
				isNull(flags.clearedAt),
				kind ? eq(flags.kind, kind) : undefined
			)
		);

function filters(query: Partial<RegisterQuery>): SQL | undefined {
	const conds: (SQL | undefined)[] = [];
	if (query.q) {
		const q = query.q.trim();
		const code = normaliseFixtureCode(q);
		const compact = q.toUpperCase().replace(/[\s-]+/g, '');
		conds.push(
			or(
				like(fixtures.name, `%${escapeLike(q)}%`),
				like(fixtures.code, `%${escapeLike(q.toUpperCase())}%`),
				// "4k7q" or "NM4K7" find NM-4K7QX: the code without its dash.
				compact
					? like(sql`REPLACE(${fixtures.code}, '-', '')`, `%${escapeLike(compact)}%`)
					: undefined,
				code.ok ? eq(fixtures.code, code.code) : undefined
			)
		);
	}
	if (query.site) conds.push(eq(areas.siteId, query.site));
	if (query.area) conds.push(eq(locations.areaId, query.area));
	if (query.location) conds.push(eq(fixtures.locationId, query.location));
	if (query.type) conds.push(eq(fixtures.type, query.type));
	if (query.status) conds.push(eq(fixtures.status, query.status));
	if (query.flag === 'any') conds.push(exists(openFlagOf()));
	else if (query.flag === 'none') conds.push(notExists(openFlagOf()));
	else if (query.flag) conds.push(exists(openFlagOf(query.flag)));
	return and(...conds);
}

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
		db
			.select(listColumns)
			.from(fixtures)
			.innerJoin(locations, eq(locations.id, fixtures.locationId))
			.innerJoin(areas, eq(areas.id, locations.areaId))
			.innerJoin(sites, eq(sites.id, areas.siteId))
			.where(where)
			.orderBy(...ordering(query))
			.limit(query.pageSize)
			.offset((query.page - 1) * query.pageSize),
		db
			.select({ total: count() })
			.from(fixtures)
			.innerJoin(locations, eq(locations.id, fixtures.locationId))
			.innerJoin(areas, eq(areas.id, locations.areaId))
			.innerJoin(sites, eq(sites.id, areas.siteId))
			.where(where)
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

/** All stored fields of a fixture, as the edit form and the API show them. */
export interface FixtureRecord {
	id: number;
	code: string;
	name: string;
	type: FixtureType;
	status: FixtureStatus;
	locationId: number;
	repeatabilitySpec_um: number | null;
	ratedLifeCycles: number | null;
	ballMaterial: string | null;
	seatMaterial: string | null;
	ballDiameter_mm: number | null;
	preload_N: number | null;
	mass_kg: number | null;
	commissionedOn: string | null;
	notes: string | null;
	createdAt: string;
	updatedAt: string;
}

/** Everything the fixture page shows. */
export interface FixtureDetail extends FixtureRecord {
	place: LocationPath;
	createdBy: string | null;
	policy: EffectivePolicyEntry[];
	state: {
		eventCount: number;
		totalCycles: number;
		cyclesSinceCleaning: number;
		cyclesSinceInspection: number;
		cyclesSincePartSwap: number;
		repeatability_um: number | null;
		wearGrade: number | null;
		lastEventAt: string | null;
		lastCleaningAt: string | null;
		lastInspectionAt: string | null;
		updatedAt: string;
	} | null;
	openFlags: { id: number; kind: FlagKind; reason: string; raisedAt: string }[];
	recentEvents: history.HistoryEntry[];
}

const recordColumns = {
	id: fixtures.id,
	code: fixtures.code,
	name: fixtures.name,
	type: fixtures.type,
	status: fixtures.status,
	locationId: fixtures.locationId,
	policyId: fixtures.policyId,
	policyOverrides: fixtures.policyOverrides,
	repeatabilitySpec_um: fixtures.repeatabilitySpec_um,
	ratedLifeCycles: fixtures.ratedLifeCycles,
	ballMaterial: fixtures.ballMaterial,
	seatMaterial: fixtures.seatMaterial,
	ballDiameter_mm: fixtures.ballDiameter_mm,
	preload_N: fixtures.preload_N,
	mass_kg: fixtures.mass_kg,
	commissionedOn: fixtures.commissionedOn,
	notes: fixtures.notes,
	createdAt: fixtures.createdAt,
	updatedAt: fixtures.updatedAt,
	createdBy: fixtures.createdBy
};

type RecordRow = {
	[K in keyof typeof recordColumns]: (typeof recordColumns)[K]['_']['data'] | null;
};

function toRecord(r: RecordRow): FixtureRecord {
	return {
		id: r.id!,
		code: r.code!,
		name: r.name!,
		type: r.type!,
		status: r.status!,
		locationId: r.locationId!,
		repeatabilitySpec_um: r.repeatabilitySpec_um,
		ratedLifeCycles: r.ratedLifeCycles,
		ballMaterial: r.ballMaterial,
		seatMaterial: r.seatMaterial,
		ballDiameter_mm: r.ballDiameter_mm,
		preload_N: r.preload_N,
		mass_kg: r.mass_kg,
		commissionedOn: r.commissionedOn,
		notes: r.notes,
		createdAt: r.createdAt!.toISOString(),
		updatedAt: r.updatedAt!.toISOString()
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

/** MariaDB's duplicate-key error, and which unique key it hit. */
function duplicateKey(err: unknown): string | null {
	const e = (err as { cause?: unknown })?.cause ?? err;
	const x = e as { code?: string; errno?: number; sqlMessage?: string; message?: string };
	if (x?.code !== 'ER_DUP_ENTRY' && x?.errno !== 1062) return null;
	const m = /for key '([^']+)'/.exec(x.sqlMessage ?? x.message ?? '');
	return m ? m[1] : '';
}

const isCodeKey = (key: string | null) => key !== null && /code/.test(key);

async function assertLocation(locationId: number, q: Db | Tx = db): Promise<void> {
	const [loc] = await q
		.select({ id: locations.id })
		.from(locations)
		.where(eq(locations.id, locationId))
		.limit(1);
	if (!loc) throw new FixtureInputError({ locationId: ['That location does not exist.'] });
}

const CODE_ATTEMPTS = 12;

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

function fixtureValues(input: Partial<FixtureCreateInput>) {
	const keys = [
		'name',
		'type',
		'status',
		'locationId',
		'repeatabilitySpec_um',
		'ratedLifeCycles',
		'ballMaterial',
		'seatMaterial',
		'ballDiameter_mm',
		'preload_N',
		'mass_kg',
		'commissionedOn',
		'notes'
	] as const;
	const out: Record<string, unknown> = {};
	for (const k of keys) if (input[k] !== undefined) out[k] = input[k];
	return out as Omit<typeof fixtures.$inferInsert, 'code'>;
}

/** Canonical JSON (sorted keys, no spaces), so equal content always hashes alike. */
export function canonicalJson(value: unknown): string {
	if (value === null || typeof value !== 'object') return JSON.stringify(value);
	if (value instanceof Date) return JSON.stringify(value.toISOString());
	if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
	const obj = value as Record<string, unknown>;
	return `{${Object.keys(obj)
		.filter((k) => obj[k] !== undefined)
		.sort()
		.map((k) => `${JSON.stringify(k)}:${canonicalJson(obj[k])}`)
		.join(',')}}`;
}

/** Fixture fields the derived state or the effective policy depend on. */
const FOLD_INPUTS = ['commissionedOn', 'type', 'repeatabilitySpec_um', 'ratedLifeCycles'] as const;

/**
 * Changes a fixture (supervisor or admin). Moving it to another location also appends a `move`
 * event attributed to the actor, in the same transaction. Returns null when there is no such code.
 */
export async function update(
	actor: Actor,
	code: string,
	patch: FixturePatch
): Promise<{ code: string; moved: boolean } | null> {
	assertCan(actor, 'fixture.edit');
	const result = await db.transaction(async (tx) => {
		const reading = normaliseFixtureCode(code);
		if (!reading.ok) return null;
		// Locked, so two edits that both move the fixture record the right "from" each time.
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
		if (moved) {
			const id = randomUUID();
			const payload = { fromLocationId: row.locationId, toLocationId: patch.locationId! };
			// The same envelope a device sends (schemas/events.ts), so hashes compare alike.
			const content = {
				id,
				fixtureCode: row.code,
				kind: 'move',
				occurredAt: now.toISOString(),
				payload
			};
			await tx.insert(events).values({
				id,
				fixtureId: row.id,
				kind: 'move',
				occurredAt: now,
				receivedAt: now,
				userId: actor.id,
				deviceId: 'server',
				payload,
				contentHash: createHash('sha256').update(canonicalJson(content)).digest('hex')
			});
		}
		return { code: row.code, moved, fixtureId: row.id };
	});
	if (!result) return null;
	if (result.moved || FOLD_INPUTS.some((k) => patch[k] !== undefined)) {
		// The derived state is a fold of the history from the commissioning date under the
		// fixture's policy: a move, a new commissioning date or a change to what picks the
		// policy refolds it and re-evaluates its flags, so the stored state always equals a
		// rebuild. Imported lazily: the health module imports this one.
		const { rebuildStates, reevaluateFlags } = await import('./health');
		await rebuildStates({ fix: true, ids: [result.fixtureId] });
		await reevaluateFlags([result.fixtureId]);
	}
	return { code: result.code, moved: result.moved };
}

/* ---------------------------------------------------------------------------------------- */
/* CSV export and import                                                                     */

/** The register (optionally filtered like the list) as CSV, in code order. */
export async function exportCsv(query: Partial<RegisterQuery> = {}): Promise<string> {
	const rows = await db
		.select({
			...recordColumns,
			site: sites.name,
			area: areas.name,
			location: locations.name
		})
		.from(fixtures)
		.innerJoin(locations, eq(locations.id, fixtures.locationId))
		.innerJoin(areas, eq(areas.id, locations.areaId))
		.innerJoin(sites, eq(sites.id, areas.siteId))
		.where(filters(query))
		.orderBy(asc(fixtures.code));
	const records: CsvRecord[] = rows.map((r) => ({
		code: r.code,
		name: r.name,
		type: r.type,
		site: r.site,
		area: r.area,
		location: r.location,
		status: r.status,
		repeatability_spec_um: r.repeatabilitySpec_um,
		rated_life_cycles: r.ratedLifeCycles,
		ball_material: r.ballMaterial,
		seat_material: r.seatMaterial,
		ball_diameter_mm: r.ballDiameter_mm,
		preload_n: r.preload_N,
		mass_kg: r.mass_kg,
		commissioned_on: r.commissionedOn,
		notes: r.notes
	}));
	return toFixtureCsv(records);
}

/** One row of an import preview. */
export interface ImportPreviewRow {
	row: number;
	cells: Record<CsvColumn, string>;
	errors: CsvRowError[];
	/** Where the fixture will go, once the row is valid. */
	place: LocationPath | null;
}

/** What an import would do: nothing is written until `commitImport`. */
export interface ImportPreview {
	fileErrors: string[];
	rows: ImportPreviewRow[];
	/** Rows with at least one error. */
	errorRows: number;
	/** True when every row is valid and the file can be imported as a whole. */
	ready: boolean;
}

async function checkImport(text: string, q: Db | Tx) {
	const parsed = parseFixtureCsv(text);
	const resolve = await placeResolver(q);
	const givenCodes = parsed.rows.flatMap((r) => (r.value?.code ? [r.value.code] : []));
	const existing = new Map<string, string>();
	for (let i = 0; i < givenCodes.length; i += 500) {
		const chunk = givenCodes.slice(i, i + 500);
		const found = await q
			.select({ code: fixtures.code, name: fixtures.name })
			.from(fixtures)
			.where(inArray(fixtures.code, chunk));
		for (const f of found) existing.set(f.code, f.name);
	}
	const rows = parsed.rows.map((r) => {
		const errors = [...r.errors];
		let place: LocationPath | null = null;
		if (r.value) {
			const found = resolve(r.value.site, r.value.area, r.value.location);
			if (found.ok) place = found.path;
			else errors.push({ column: found.column, message: found.message });
			const code = r.value.code;
			if (code && existing.has(code)) {
				errors.push({
					column: 'code',
					message: `Code ${code} is already in the register (${existing.get(code)}).`
				});
			}
		}
		return { ...r, errors, place };
	});
	return { fileErrors: parsed.fileErrors, rows };
}

function toPreview(checked: Awaited<ReturnType<typeof checkImport>>): ImportPreview {
	const errorRows = checked.rows.filter((r) => r.errors.length).length;
	return {
		fileErrors: checked.fileErrors,
		rows: checked.rows.map(({ row, cells, errors, place }) => ({ row, cells, errors, place })),
		errorRows,
		ready: checked.fileErrors.length === 0 && checked.rows.length > 0 && errorRows === 0
	};
}

/** Checks an import file row by row against the schema and the register; writes nothing. */
export async function previewImport(actor: Actor, text: string): Promise<ImportPreview> {
	assertCan(actor, 'fixture.edit');
	return toPreview(await checkImport(text, db));
}

/**
 * Imports a file: all rows in one transaction, or none. The file is checked again inside the
 * transaction (it may have been previewed minutes ago); any error leaves the register unchanged
 * and comes back as a preview.
 */
export async function commitImport(
	actor: Actor,
	text: string,
	opts: { random?: () => number } = {}
): Promise<{ ok: true; codes: string[] } | { ok: false; preview: ImportPreview }> {
	assertCan(actor, 'fixture.edit');
	class Refused extends Error {
		constructor(readonly preview: ImportPreview) {
			super('import refused');
		}
	}
	try {
		return await db.transaction(async (tx) => {
			const checked = await checkImport(text, tx);
			const preview = toPreview(checked);
			if (!preview.ready) throw new Refused(preview);

			const taken = new Set(checked.rows.flatMap((r) => (r.value?.code ? [r.value.code] : [])));
			const now = new Date();
			const values = checked.rows.map((r) => {
				const v = r.value!;
				let code = v.code;
				while (!code || (v.code === null && taken.has(code)))
					code = generateFixtureCode(opts.random);
				taken.add(code);
				return {
					...fixtureValues({ ...v, locationId: r.place!.locationId }),
					code,
					createdBy: actor.id,
					createdAt: now,
					updatedAt: now
				};
			});
			// Generated codes can still collide with codes already in the register: draw again.
			for (let attempt = 0; ; attempt++) {
				const generated = values.filter((v, i) => checked.rows[i].value!.code === null);
				const clash = new Set<string>();
				for (let i = 0; i < generated.length; i += 500) {
					const found = await tx
						.select({ code: fixtures.code })
						.from(fixtures)
						.where(
							inArray(
								fixtures.code,
								generated.slice(i, i + 500).map((v) => v.code)
							)
						);
					for (const f of found) clash.add(f.code);
				}
				if (!clash.size) break;
				if (attempt >= CODE_ATTEMPTS) throw new Error('No free fixture codes for the import.');
				for (const v of generated) {
					if (!clash.has(v.code)) continue;
					let code = generateFixtureCode(opts.random);
					while (taken.has(code)) code = generateFixtureCode(opts.random);
					taken.add(code);
					v.code = code;
				}
			}
			for (let i = 0; i < values.length; i += 250) {
				await tx.insert(fixtures).values(values.slice(i, i + 250));
			}
			return { ok: true as const, codes: values.map((v) => v.code) };
		});
	} catch (err) {
		if (err instanceof Refused) return { ok: false, preview: err.preview };
		if (isCodeKey(duplicateKey(err))) {
			// Someone added one of the file's codes between the check and the insert.
			return commitImport(actor, text, opts);
		}
		throw err;
	}
}
