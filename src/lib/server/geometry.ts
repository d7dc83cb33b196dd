/**
 * Saved coupling geometry: one row per version per fixture, with the generated contacts and the
 * constraint status cached at save time (the register's warning badge reads only that column).
 */
import { and, desc, eq, inArray, max, ne, sql } from 'drizzle-orm';
import { analyzeConstraints } from '$lib/domain/constraints';
import { geometryInput, type GeometryForm } from '$lib/schemas/geometry';
import { db } from './db';
import { couplingGeometries, fixtures, users } from './db/schema';
import { type Actor, assertCan } from './guard';

/** A stored version as the page shows it. */
export interface GeometryVersion {
	version: number;
	kind: string;
	params: Record<string, number> | null;
	contacts: { point: number[]; normal: number[]; label?: string }[];
	ballDiameter_mm: number | null;
	preload_N: number | null;
	ballMaterial: { name?: string; E_GPa: number; nu: number } | null;
	seatMaterial: { name?: string; E_GPa: number; nu: number } | null;
	constraintStatus: string | null;
	createdAt: Date;
	createdBy: string | null;
}

const columns = {
	version: couplingGeometries.version,
	kind: couplingGeometries.kind,
	params: couplingGeometries.params,
	contacts: couplingGeometries.contacts,
	ballDiameter_mm: couplingGeometries.ballDiameter_mm,
	preload_N: couplingGeometries.preload_N,
	ballMaterial: couplingGeometries.ballMaterial,
	seatMaterial: couplingGeometries.seatMaterial,
	constraintStatus: couplingGeometries.constraintStatus,
	createdAt: couplingGeometries.createdAt,
	createdBy: sql<string | null>`coalesce(${users.name}, ${users.email})`
};

/** Every saved version of a fixture's geometry, newest first. */
export async function versions(fixtureId: number): Promise<GeometryVersion[]> {
	return db
		.select(columns)
		.from(couplingGeometries)
		.leftJoin(users, eq(users.id, couplingGeometries.createdBy))
		.where(eq(couplingGeometries.fixtureId, fixtureId))
		.orderBy(desc(couplingGeometries.version));
}

/** The newest saved version, or null. */
export async function latest(fixtureId: number): Promise<GeometryVersion | null> {
	const [row] = await db
		.select(columns)
		.from(couplingGeometries)
		.leftJoin(users, eq(users.id, couplingGeometries.createdBy))
		.where(eq(couplingGeometries.fixtureId, fixtureId))
		.orderBy(desc(couplingGeometries.version))
		.limit(1);
	return row ?? null;
}

/** Saves the form as the fixture's next version; returns its number and constraint status. */
export async function save(
	actor: Actor,
	fixtureId: number,
	form: GeometryForm
): Promise<{ version: number; status: string }> {
	assertCan(actor, 'geometry.edit');
	const input = geometryInput(form);
	const status = analyzeConstraints(input.contacts).status;
	return db.transaction(async (tx) => {
		// Lock the fixture row so two saves cannot take the same version number.
		await tx
			.select({ id: fixtures.id })
			.from(fixtures)
			.where(eq(fixtures.id, fixtureId))
			.for('update');
		const [top] = await tx
			.select({ v: max(couplingGeometries.version) })
			.from(couplingGeometries)
			.where(eq(couplingGeometries.fixtureId, fixtureId));
		const version = (top?.v ?? 0) + 1;
		await tx.insert(couplingGeometries).values({
			fixtureId,
			version,
			kind: form.kind,
			params: input.params,
			contacts: input.contacts.map((c) => ({
				point: [...c.point],
				normal: [...c.normal],
				label: c.label
			})),
			ballDiameter_mm: input.ballDiameter_mm,
			preload_N: input.preload_N,
			ballMaterial: input.ball,
			seatMaterial: input.seat,
			constraintStatus: status,
			createdBy: actor.id
		});
		return { version, status };
	});
}

/** Of the given fixtures, the ids whose latest saved geometry is not exactly constrained. */
export async function notExact(fixtureIds: number[]): Promise<Set<number>> {
	if (fixtureIds.length === 0) return new Set();
	const latestVersion = db
		.select({ fixtureId: couplingGeometries.fixtureId, v: max(couplingGeometries.version).as('v') })
		.from(couplingGeometries)
		.where(inArray(couplingGeometries.fixtureId, fixtureIds))
		.groupBy(couplingGeometries.fixtureId)
		.as('lv');
	const rows = await db
		.select({ fixtureId: couplingGeometries.fixtureId })
		.from(couplingGeometries)
		.innerJoin(
			latestVersion,
			and(
				eq(latestVersion.fixtureId, couplingGeometries.fixtureId),
				eq(latestVersion.v, couplingGeometries.version)
			)
		)
		.where(ne(couplingGeometries.constraintStatus, 'exact'));
	return new Set(rows.map((r) => r.fixtureId));
}
