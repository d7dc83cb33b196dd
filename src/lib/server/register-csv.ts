/**
 * The register's CSV export and import (supervisor or admin). The file format itself (columns,
 * parsing, writing) is $lib/schemas/fixture-csv; this module checks rows against the register
 * and writes them, all rows in one transaction or none.
 */
import { asc, inArray } from 'drizzle-orm';
import { generateFixtureCode } from '$lib/domain/fixture-code';
import type { RegisterQuery } from '$lib/schemas/fixture-form';
import { parseFixtureCsv, toFixtureCsv, type CsvRecord } from '$lib/schemas/fixture-csv';
import { db, type Db } from './db';
import { areas, fixtures, locations, sites } from './db/schema';
import { assertCan, type Actor } from './guard';
import { placeResolver, type LocationPath } from './places';
import {
	CODE_ATTEMPTS,
	duplicateKey,
	filters,
	fixtureValues,
	isCodeKey,
	recordColumns,
	withPlace,
	type Tx
} from './register-rows';
import type { ImportPreview, ImportPreviewRow } from '../schemas/register-views';

export type { ImportPreview, ImportPreviewRow };

/** The register (optionally filtered like the list) as CSV, in code order. */
export async function exportCsv(query: Partial<RegisterQuery> = {}): Promise<string> {
	const rows = await withPlace(
		db
			.select({
				...recordColumns,
				site: sites.name,
				area: areas.name,
				location: locations.name
			})
			.from(fixtures)
			.$dynamic()
	)
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
