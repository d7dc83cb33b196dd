import { describe, expect, it } from 'vitest';
import { parseReading } from './run-reading';

const texts = (dx: string | null, dy: string | null = '', dz: string | null = '') => ({
	dx,
	dy,
	dz
});

describe('parseReading', () => {
	it('gives no reading when every field is empty', () => {
		expect(parseReading(texts('', ' ', ''))).toEqual({ ok: true, reading: null });
	});

	it('keeps the measured axes, with a decimal comma accepted', () => {
		expect(parseReading(texts('0.12', '-0,3', ''))).toEqual({
			ok: true,
			reading: { dx: 0.12, dy: -0.3 }
		});
	});

	it('names the axis that is not a number or out of range (shared schema)', () => {
		expect(parseReading(texts('abc', null, '20000'))).toEqual({
			ok: false,
			errors: {
				dx: 'dx must be a number of micrometres',
				dy: 'dy must be a number of micrometres'
			}
		});
		expect(parseReading(texts('1', '', '20000'))).toEqual({
			ok: false,
			errors: { dz: 'dz must be between −10000 and 10000 µm' }
		});
	});
});
