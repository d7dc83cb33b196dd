import { afterAll, beforeEach, describe, expect, it } from 'vitest';
import { count, sql } from 'drizzle-orm';
import { generateFixtureCode, isValidFixtureCode, seededRandom } from '$lib/domain/fixture-code';
import { CSV_COLUMNS } from '$lib/schemas/fixture-csv';
import { registerQuerySchema } from '$lib/schemas/fixture-form';
import * as fixtures from '$lib/server/fixtures';
import { ForbiddenError } from '$lib/server/guard';
import type { Actor } from '$lib/server/guard';
import {
	closeDb,
	db,
	makeArea,
	makeFixture,
	makeLocation,
	makeSite,
	makeUser,
	resetDb,
	schema
} from '../helpers/db';

const HEADER = 'code,name,type,site,area,location,status,repeatability_spec_um,mass_kg';
const file = (...rows: string[]) => [HEADER, ...rows].join('\n');
const fixtureCount = async () => (await db.select({ n: count() }).from(schema.fixtures))[0].n;

let sup: Actor;
let existingCode: string;

async function places() {
	const site = await makeSite({ name: 'Larch Test' });
	const bay = await makeArea({ siteId: site.id, name: 'Bay' });
	await makeArea({ siteId: site.id, name: 'Empty room' });
	const lathe = await makeLocation({ areaId: bay.id, name: 'Lathe 2' });
	return { site, bay, lathe };
}

beforeEach(async () => {
	await resetDb();
	sup = await makeUser({ roles: ['supervisor'] });
	const { lathe } = await places();
	existingCode = (await makeFixture({ locationId: lathe.id, name: 'Already here' })).code;
});
afterAll(closeDb);

describe('import preview', () => {
	it('resolves places by name in any case and writes nothing', async () => {
		const p = await fixtures.previewImport(
			sup,
			file(
				',New pallet,three-vee,larch test,BAY,lathe 2,,0.5,',
				',New plate,plate,Larch Test,Bay,Lathe 2,,,'
			)
		);
		expect(p.fileErrors).toEqual([]);
		expect(p.errorRows).toBe(0);
		expect(p.ready).toBe(true);
		expect(p.rows[0].place).toMatchObject({ site: 'Larch Test', area: 'Bay', location: 'Lathe 2' });
		expect(await fixtureCount()).toBe(1);
	});

	it('reports per row: unknown site, area and location, bad unit, codes already used', async () => {
		const dupInFile = generateFixtureCode(seededRandom(3));
		const p = await fixtures.previewImport(
			sup,
			file(
				',A,other,Nowhere,Bay,Lathe 2,,,',
				',B,other,Larch Test,Basement,Lathe 2,,,',
				',C,other,Larch Test,Empty room,Lathe 2,,,',
				',D,other,Larch Test,Bay,Lathe 2,,2 µm,',
				`${existingCode},E,other,Larch Test,Bay,Lathe 2,,,`,
				`${dupInFile},F,other,Larch Test,Bay,Lathe 2,,,`,
				`${dupInFile},G,other,Larch Test,Bay,Lathe 2,,,`,
				',H,other,Larch Test,Bay,Lathe 2,,,'
			)
		);
		const errs = p.rows.map((r) => r.errors);
		expect(errs[0]).toEqual([{ column: 'site', message: 'There is no site named "Nowhere".' }]);
		expect(errs[1]).toEqual([
			{ column: 'area', message: 'Larch Test has no area named "Basement".' }
		]);
		expect(errs[2]).toEqual([
			{ column: 'location', message: 'Larch Test / Empty room has no location named "Lathe 2".' }
		]);
		expect(errs[3]).toEqual([
			{
				column: 'repeatability_spec_um',
				message: 'Enter the number only: the unit is already µm (got "2 µm").'
			}
		]);
		expect(errs[4]).toEqual([
			{ column: 'code', message: `Code ${existingCode} is already in the register (Already here).` }
		]);
		expect(errs[5]).toEqual([]);
		expect(errs[6]).toEqual([
			{ column: 'code', message: `Code ${dupInFile} is already used in row 7.` }
		]);
		expect(errs[7]).toEqual([]);
		expect(p.errorRows).toBe(6);
		expect(p.ready).toBe(false);
	});

	it('is for supervisors and admins only', async () => {
		const op = await makeUser({ roles: ['operator'] });
		await expect(
			fixtures.previewImport(op, file(',A,other,Larch Test,Bay,Lathe 2,,,'))
		).rejects.toBeInstanceOf(ForbiddenError);
	});
});

describe('import commit', () => {
	it('imports every row in one go, keeping given codes and generating the rest', async () => {
		const given = generateFixtureCode(seededRandom(11));
		const r = await fixtures.commitImport(
			sup,
			file(
				`${given},Kept code,three-vee,Larch Test,Bay,Lathe 2,breaking-in,0.5,18`,
				',New code 1,plate,Larch Test,Bay,Lathe 2,,,',
				',New code 2,vise,Larch Test,Bay,Lathe 2,,,'
			)
		);
		if (!r.ok) throw new Error(JSON.stringify(r.preview));
		expect(r.codes[0]).toBe(given);
		expect(r.codes.every(isValidFixtureCode)).toBe(true);
		expect(new Set(r.codes).size).toBe(3);
		expect(await fixtureCount()).toBe(4);
		const kept = (await fixtures.getRecord(given))!;
		expect(kept).toMatchObject({
			name: 'Kept code',
			status: 'breaking-in',
			mass_kg: 18,
			repeatabilitySpec_um: 0.5
		});
	});

	it('imports nothing when one row is bad, and says which', async () => {
		const r = await fixtures.commitImport(
			sup,
			file(
				',Good 1,three-vee,Larch Test,Bay,Lathe 2,,,',
				',Bad,three-vee,Larch Test,Bay,Lathe 9,,,',
				',Good 2,three-vee,Larch Test,Bay,Lathe 2,,,'
			)
		);
		expect(r.ok).toBe(false);
		if (!r.ok) {
			expect(r.preview.rows[1].errors[0].column).toBe('location');
			expect(r.preview.errorRows).toBe(1);
		}
		expect(await fixtureCount()).toBe(1);
	});

	it('rolls back the rows already written when an insert fails part-way', async () => {
		// Rows are inserted in batches of 250; a trigger makes row 280 fail in the second batch,
		// after the first batch is written, as a lost connection or a full disk would.
		await db.execute(sql`DROP TRIGGER IF EXISTS nm_test_boom`);
		await db.execute(
			sql.raw(`CREATE TRIGGER nm_test_boom BEFORE INSERT ON fixtures FOR EACH ROW
				BEGIN IF NEW.name = 'Row 280' THEN SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'boom'; END IF; END`)
		);
		try {
			const rows = Array.from(
				{ length: 300 },
				(_, i) => `,Row ${i},other,Larch Test,Bay,Lathe 2,,,`
			);
			const failed = await fixtures.commitImport(sup, file(...rows)).catch((e: Error) => e);
			expect(failed).toBeInstanceOf(Error);
			expect(String((failed as Error & { cause?: Error }).cause?.message)).toMatch(/boom/);
			expect(await fixtureCount()).toBe(1);
		} finally {
			await db.execute(sql`DROP TRIGGER IF EXISTS nm_test_boom`);
		}
		const rows = Array.from({ length: 300 }, (_, i) => `,Row ${i},other,Larch Test,Bay,Lathe 2,,,`);
		expect((await fixtures.commitImport(sup, file(...rows))).ok).toBe(true);
		expect(await fixtureCount()).toBe(301);
	});

	it('generates codes that avoid codes already in the register', async () => {
		const taken = generateFixtureCode(seededRandom(21));
		await makeFixture({
			code: taken,
			locationId: (await fixtures.getRecord(existingCode))!.locationId
		});
		const r = await fixtures.commitImport(sup, file(',Fresh,other,Larch Test,Bay,Lathe 2,,,'), {
			random: seededRandom(21)
		});
		if (!r.ok) throw new Error('import refused');
		expect(r.codes[0]).not.toBe(taken);
		expect(isValidFixtureCode(r.codes[0])).toBe(true);
	});

	it('is for supervisors and admins only, and writes nothing for others', async () => {
		const planner = await makeUser({ roles: ['planner'] });
		await expect(
			fixtures.commitImport(planner, file(',A,other,Larch Test,Bay,Lathe 2,,,'))
		).rejects.toBeInstanceOf(ForbiddenError);
		expect(await fixtureCount()).toBe(1);
	});
});

describe('export', () => {
	it('writes a file that imports again into an empty register', async () => {
		const loc = (await fixtures.getRecord(existingCode))!.locationId;
		await makeFixture({
			locationId: loc,
			name: 'Trihedral mount, "flat" B',
			type: 'trihedral-vee-flat',
			status: 'breaking-in',
			repeatabilitySpec_um: 0.5,
			ratedLifeCycles: 20000,
			ballMaterial: 'Si3N4',
			seatMaterial: 'Carbide',
			ballDiameter_mm: 12.7,
			preload_N: 150,
			mass_kg: 2.4,
			commissionedOn: '2024-05-02',
			notes: '-first line\nsecond line'
		});
		const csv = await fixtures.exportCsv();
		const before = (await fixtures.list(registerQuerySchema.parse({}))).items;
		const records = await Promise.all(before.map((i) => fixtures.getRecord(i.code)));

		// Empty the register but keep the places, then import the export.
		await db.delete(schema.fixtures);
		const r = await fixtures.commitImport(sup, csv);
		if (!r.ok) throw new Error(JSON.stringify(r.preview.rows.map((x) => x.errors)));
		for (const rec of records) {
			const back = (await fixtures.getRecord(rec!.code))!;
			const strip = (x: typeof back) => ({ ...x, id: 0, createdAt: '', updatedAt: '' });
			expect(strip(back)).toEqual(strip(rec!));
		}
	});

	it('exports only what the filters select', async () => {
		const csv = await fixtures.exportCsv({ q: 'no such fixture' });
		expect(csv).toBe(`${CSV_COLUMNS.join(',')}\r\n`);
	});
});
