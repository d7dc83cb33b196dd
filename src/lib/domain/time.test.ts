import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { isoMs } from './time';

describe('isoMs', () => {
	it('agrees with Date.parse on normalised times (fast-check)', () => {
		fc.assert(
			fc.property(
				fc.date({ min: new Date('2000-01-01'), max: new Date('2099-12-31'), noInvalidDate: true }),
				(d) => {
					const iso = d.toISOString();
					expect(isoMs(iso)).toBe(Date.parse(iso));
				}
			)
		);
	});

	it('falls back to Date.parse for other forms and gives NaN for non-times', () => {
		expect(isoMs('2025-03-04T05:06:07Z')).toBe(Date.parse('2025-03-04T05:06:07Z'));
		expect(isoMs('2025-03-04T07:06:07+02:00')).toBe(Date.parse('2025-03-04T05:06:07Z'));
		expect(isoMs('2025-02-30T00:00:00.000Z')).toBe(Date.parse('2025-02-30T00:00:00.000Z'));
		expect(isoMs('2025-0x-04T05:06:07.000Z')).toBeNaN();
		expect(isoMs('2025-13-04T05:06:07.000Z')).toBe(Date.parse('2025-13-04T05:06:07.000Z'));
		expect(isoMs('2024-02-29T23:59:59.999Z')).toBe(Date.parse('2024-02-29T23:59:59.999Z'));
		expect(isoMs('soon')).toBeNaN();
	});
});
