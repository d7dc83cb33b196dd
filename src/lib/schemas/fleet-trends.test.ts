import { describe, expect, it } from 'vitest';
import { dateMs, readFleetTrendsQuery } from './fleet-trends';

const NOW = new Date('2026-12-05T08:00:00Z');
const read = (search: string, now = NOW) => readFleetTrendsQuery(new URLSearchParams(search), now);

describe('fleet trends query', () => {
	it('defaults to the last 12 months up to today (UTC), all areas', () => {
		expect(read('').data).toEqual({ from: '2025-12-05', to: '2026-12-05', area: undefined });
		expect(read('to=2024-02-29').data).toMatchObject({ from: '2023-02-28', to: '2024-02-29' });
		expect(read('from=&to=&area=').data).toMatchObject({ from: '2025-12-05', area: undefined });
	});

	it('reads dates and an area id', () => {
		expect(read('from=2026-01-01&to=2026-03-31&area=7').data).toEqual({
			from: '2026-01-01',
			to: '2026-03-31',
			area: 7
		});
	});

	it('refuses dates that do not exist, a backwards range and more than three years', () => {
		const fields = (search: string) =>
			(read(search).error?.issues ?? []).map((i) => [i.path[0], i.message]);
		expect(fields('from=2026-02-29')).toEqual([
			['from', 'from must be a date as YYYY-MM-DD (for example 2026-01-31).']
		]);
		expect(fields('to=5 December')[0][0]).toBe('to');
		expect(fields('from=2026-06-02&to=2026-06-01')).toEqual([
			['from', 'from must not be after to.']
		]);
		// 2023-01-01 … 2025-12-31 is 1,096 days, both ends included; one more day is too many [calendar].
		expect(read('from=2023-01-01&to=2025-12-31').success).toBe(true);
		expect(fields('from=2023-01-01&to=2026-01-01')[0][1]).toMatch(/at most three years/);
		expect(fields('area=-1')).toEqual([['area', 'area must be a numeric area id.']]);
	});

	it('knows a calendar date from an impossible one', () => {
		expect(dateMs('2024-02-29')).toBe(Date.UTC(2024, 1, 29));
		expect(dateMs('2023-02-29')).toBeNaN();
		expect(dateMs('2023-2-28')).toBeNaN();
	});
});
