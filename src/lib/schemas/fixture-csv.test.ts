import { describe, expect, it } from 'vitest';
import { checkCharacter } from '$lib/domain/fixture-code';
import {
	CSV_COLUMNS,
	MAX_IMPORT_BYTES,
	MAX_IMPORT_ROWS,
	parseFixtureCsv,
	toFixtureCsv,
	type CsvRecord
} from './fixture-csv';

const HEADER = 'code,name,type,site,area,location,status,repeatability_spec_um,mass_kg';
const CODE = 'NM-4K7Q' + checkCharacter('4K7Q');

function csv(...lines: string[]) {
	return [HEADER, ...lines].join('\n');
}

describe('parseFixtureCsv', () => {
	it('reads a plain file into typed rows, numbered as a spreadsheet shows them', () => {
		const r = parseFixtureCsv(
			csv(
				`${CODE},Pallet A,three-vee,Main,Bay,Lathe 1,in-service,0.5,18`,
				',Rack B,other,Main,Lab,Shelf 2,,,'
			)
		);
		expect(r.fileErrors).toEqual([]);
		expect(r.rows.map((x) => x.row)).toEqual([2, 3]);
		expect(r.rows[0].errors).toEqual([]);
		expect(r.rows[0].value).toMatchObject({
			code: CODE,
			name: 'Pallet A',
			type: 'three-vee',
			site: 'Main',
			area: 'Bay',
			location: 'Lathe 1',
			repeatabilitySpec_um: 0.5,
			mass_kg: 18
		});
		expect(r.rows[1].value).toMatchObject({ code: null, status: 'in-service', mass_kg: null });
	});

	it('handles a BOM, CRLF line ends, quoted commas, quotes and line breaks inside cells', () => {
		const text =
			'\uFEFFname,type,site,area,location,notes\r\n' +
			'"Plate, 300 × 300",plate,Main,Lab,Bench,"Says ""keep dry""\r\nsecond line"\r\n';
		const r = parseFixtureCsv(text);
		expect(r.fileErrors).toEqual([]);
		expect(r.rows).toHaveLength(1);
		expect(r.rows[0].value).toMatchObject({
			name: 'Plate, 300 × 300',
			notes: 'Says "keep dry"\r\nsecond line'
		});
	});

	it('accepts semicolon-separated files and headers in any case with spaces', () => {
		const r = parseFixtureCsv(
			'Name;Type;Site;Area;Location;Mass kg\nVise 1;vise;Main;Bay;M1;4.5\n'
		);
		expect(r.fileErrors).toEqual([]);
		expect(r.rows[0].value).toMatchObject({ name: 'Vise 1', type: 'vise', mass_kg: 4.5 });
	});

	it('skips blank lines, including ones made of separators only', () => {
		const r = parseFixtureCsv(csv('', ',,,,,,,,', ',Rack,other,Main,Lab,Shelf,,,', '   '));
		expect(r.rows).toHaveLength(1);
	});

	it('reports bad units, unknown types and impossible values per row and column', () => {
		const r = parseFixtureCsv(
			csv(
				',Mount 1,three-vee,Main,Bay,L1,,2 µm,',
				',Mount 2,spindle,Main,Bay,L1,,,',
				',,pallet,Main,Bay,L1,,,-3'
			)
		);
		expect(r.rows[0].errors).toEqual([
			{
				column: 'repeatability_spec_um',
				message: 'Enter the number only: the unit is already µm (got "2 µm").'
			}
		]);
		expect(r.rows[0].value).toBeNull();
		expect(r.rows[1].errors[0].column).toBe('type');
		expect(r.rows[2].errors.map((e) => e.column).sort()).toEqual(['mass_kg', 'name']);
	});

	it('rejects codes with ambiguous characters or a failed check, and codes repeated in the file', () => {
		const other = 'NM-9XYZ' + checkCharacter('9XYZ');
		const r = parseFixtureCsv(
			csv(
				`${CODE},A,other,S,A,L,,,`,
				'NM-4K7OX,B,other,S,A,L,,,',
				`${other.slice(0, -1)}${other.endsWith('2') ? '3' : '2'},C,other,S,A,L,,,`,
				`${CODE.toLowerCase()},D,other,S,A,L,,,`
			)
		);
		expect(r.rows[0].errors).toEqual([]);
		expect(r.rows[1].errors[0]).toMatchObject({
			column: 'code',
			message: expect.stringMatching(/letter O/)
		});
		expect(r.rows[2].errors[0].message).toMatch(/check character/);
		expect(r.rows[3].errors).toEqual([
			{ column: 'code', message: `Code ${CODE} is already used in row 2.` }
		]);
	});

	it('flags rows with too few or too many cells', () => {
		const r = parseFixtureCsv(
			'name,type,site,area,location\nA,other,S,A\nB,other,S,A,L,extra\nC,other,S,A,L\n'
		);
		expect(r.rows[0].errors.some((e) => /number of cells/.test(e.message))).toBe(true);
		expect(r.rows[1].errors.some((e) => /number of cells/.test(e.message))).toBe(true);
		expect(r.rows[2].errors).toEqual([]);
	});

	it('rejects the whole file for missing, unknown or repeated columns, or no rows', () => {
		expect(parseFixtureCsv('').fileErrors).toEqual(['The file is empty.']);
		expect(parseFixtureCsv('name,type,site,area\nA,other,S,A\n').fileErrors[0]).toMatch(
			/Missing column: location/
		);
		expect(
			parseFixtureCsv('name,type,site,area,location,colour\nA,other,S,A,L,red\n').fileErrors[0]
		).toMatch(/Unknown column: colour/);
		expect(
			parseFixtureCsv('name,type,site,area,location,name\nA,other,S,A,L,B\n').fileErrors
		).toContain('Column given twice: name.');
		expect(parseFixtureCsv('name,type,site,area,location\n').fileErrors).toEqual([
			'The file has a header line but no fixtures.'
		]);
	});

	it('limits the size of one import, counting bytes rather than characters', () => {
		const notes = 'µ'.repeat((MAX_IMPORT_BYTES - 100) / 2); // two bytes each in UTF-8
		const ok = parseFixtureCsv(`name,type,site,area,location,notes\nA,other,S,A,L,${notes}\n`);
		expect(ok.fileErrors).toEqual([]);
		const big = parseFixtureCsv(
			`name,type,site,area,location,notes\nA,other,S,A,L,${notes}µµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµµ\n`
		);
		expect(big.fileErrors[0]).toMatch(/larger than 400 KB/);
	});

	it('limits the number of rows in one import', () => {
		const line = ',R,other,S,A,L,,,';
		const r = parseFixtureCsv(csv(...Array.from({ length: MAX_IMPORT_ROWS + 1 }, () => line)));
		expect(r.fileErrors[0]).toMatch(/import at most 2000/);
		expect(r.rows).toEqual([]);
	});
});

describe('toFixtureCsv', () => {
	it('writes every column, and reads back to the same values', () => {
		const record = {
			code: CODE,
			name: 'Mount, "reference" flat',
			type: 'trihedral-vee-flat',
			site: 'Main',
			area: 'Interferometry room',
			location: 'Table 1',
			status: 'breaking-in',
			repeatability_spec_um: 0.5,
			rated_life_cycles: 20000,
			ball_material: 'Si3N4',
			seat_material: 'Carbide',
			ball_diameter_mm: 12.7,
			preload_n: 150,
			mass_kg: 2.4,
			commissioned_on: '2024-05-02',
			notes: '=SUM(A1) is a note, not a formula'
		};
		const text = toFixtureCsv([record]);
		expect(text.split('\r\n')[0]).toBe(CSV_COLUMNS.join(','));
		// A spreadsheet must not run the note as a formula (OWASP "CSV injection").
		expect(text).toContain(`"'=SUM(A1) is a note, not a formula"`);
		const back = parseFixtureCsv(text);
		expect(back.fileErrors).toEqual([]);
		expect(back.rows[0].errors).toEqual([]);
		expect(back.rows[0].value).toEqual({
			code: CODE,
			name: record.name,
			type: 'trihedral-vee-flat',
			site: 'Main',
			area: 'Interferometry room',
			location: 'Table 1',
			status: 'breaking-in',
			repeatabilitySpec_um: 0.5,
			ratedLifeCycles: 20000,
			ballMaterial: 'Si3N4',
			seatMaterial: 'Carbide',
			ballDiameter_mm: 12.7,
			preload_N: 150,
			mass_kg: 2.4,
			commissionedOn: '2024-05-02',
			notes: record.notes
		});
	});

	it('writes blanks for missing values', () => {
		const text = toFixtureCsv([Object.fromEntries(CSV_COLUMNS.map((c) => [c, null])) as CsvRecord]);
		expect(text.split('\r\n')[1]).toBe(','.repeat(CSV_COLUMNS.length - 1));
		expect(text.endsWith('\r\n')).toBe(true);
	});
});
