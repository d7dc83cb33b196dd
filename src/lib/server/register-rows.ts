/**
 * What the register's services share: its input error, the row ↔ record mapping,
 * the list filters and the fixture → location → area → site join. Used by ./fixtures.ts (the
 * register) and ./register-csv.ts (its CSV export and import).
 */
import { and, eq, exists, isNull, like, notExists, or, sql, type SQL } from 'drizzle-orm';
import { normaliseFixtureCode } from '$lib/domain/fixture-code';
import type { FlagKind } from '$lib/schemas/fixture';
import type { FixtureCreateInput, RegisterQuery } from '$lib/schemas/fixture-form';
import { db, type Db } from './db';
import { areas, fixtures, flags, locations } from './db/schema';
export { withPlace } from './db/place-join';
import type { FixtureRecord } from '../schemas/register-views';

export type { FixtureRecord };

/** A Drizzle transaction of the register's services. */
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

/** Input the register refused, with messages per field (form field names). */
export class FixtureInputError extends Error {
	constructor(readonly fields: Record<string, string[]>) {
		super(Object.values(fields).flat().join(' '));
		this.name = 'FixtureInputError';
	}
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

export function filters(query: Partial<RegisterQuery>): SQL | undefined {
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

export const recordColumns = {
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

export type RecordRow = {
	[K in keyof typeof recordColumns]: (typeof recordColumns)[K]['_']['data'] | null;
};

export function toRecord(r: RecordRow): FixtureRecord {
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

/** MariaDB's duplicate-key error, and which unique key it hit. */
export function duplicateKey(err: unknown): string | null {
	const e = (err as { cause?: unknown })?.cause ?? err;
	const x = e as { code?: string; errno?: number; sqlMessage?: string; message?: string };
	if (x?.code !== 'ER_DUP_ENTRY' && x?.errno !== 1062) return null;
	const m = /for key '([^']+)'/.exec(x.sqlMessage ?? x.message ?? '');
	return m ? m[1] : '';
}

export const isCodeKey = (key: string | null) => key !== null && /code/.test(key);

export async function assertLocation(locationId: number, q: Db | Tx = db): Promise<void> {
	const [loc] = await q
		.select({ id: locations.id })
		.from(locations)
		.where(eq(locations.id, locationId))
		.limit(1);
	if (!loc) throw new FixtureInputError({ locationId: ['That location does not exist.'] });
}

/** Draws of a generated code before giving up. */
export const CODE_ATTEMPTS = 12;

/** The stored columns a create or patch input sets. */
export function fixtureValues(input: Partial<FixtureCreateInput>) {
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
