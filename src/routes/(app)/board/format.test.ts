import { describe, expect, it } from 'vitest';
import { age, figureList } from './format';

const now = Date.parse('2026-12-05T12:00:00Z');

describe('board wording', () => {
	it('says how long ago, shortly', () => {
		expect(age('2026-12-05T11:59:30Z', now)).toBe('just now');
		expect(age('2026-12-05T11:35:00Z', now)).toBe('25 min');
		expect(age('2026-12-05T07:00:00Z', now)).toBe('5 h');
		expect(age('2026-12-02T12:00:00Z', now)).toBe('3 d');
		expect(age('2026-06-01T12:00:00Z', now)).toBe('26 wk');
		// A clock a little ahead never shows a negative age.
		expect(age('2026-12-05T12:01:00Z', now)).toBe('just now');
	});

	it('lists the figures with words and units, leaving out empty ones', () => {
		expect(
			figureList({
				R_um: 1.234,
				axis: 'x',
				cyclesSince: 250,
				lastAt: '2026-11-01T08:00:00.000Z',
				daysSince: null
			})
		).toEqual(['R 1.23 µm', 'axis x', 'cycles since 250', 'last at 2026-11-01']);
		expect(figureList(null)).toEqual([]);
	});
});
