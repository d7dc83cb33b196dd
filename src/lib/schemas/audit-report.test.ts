import { describe, expect, it } from 'vitest';
import { parseReportQuery, reportCursor, reportSearch } from './audit-report';

const TODAY = '2026-12-05';
const read = (q: string) => parseReportQuery(new URLSearchParams(q), TODAY);

describe('parseReportQuery', () => {
	it('defaults to the last 90 days and all areas', () => {
		expect(read('')).toMatchObject({
			ok: true,
			query: { from: '2026-09-07', to: TODAY, area: null, section: null, after: null }
		});
		// Only an end: the 90 days before it; only a start: up to today.
		expect(read('to=2026-06-30')).toMatchObject({
			query: { from: '2026-04-02', to: '2026-06-30' }
		});
		expect(read('from=2026-01-01')).toMatchObject({ query: { from: '2026-01-01', to: TODAY } });
		expect(read('from=%202026-01-01%20&to=&area=')).toMatchObject({ ok: true });
	});

	it('reads an area and a section page', () => {
		const cursor = reportCursor({
			at: '2026-10-12T13:14:00.000Z',
			id: 'f7724c03-270d-5755-bd53-ae9fdc42ecf0'
		});
		expect(read(`area=3&section=inspections&after=${cursor}`)).toMatchObject({
			ok: true,
			query: { area: 3, section: 'inspections', after: cursor }
		});
		expect(read('section=flags-raised&after=2026-10-12T13:14:00.000Z~42')).toMatchObject({
			ok: true
		});
	});

	it('refuses what does not hold, with messages a person can act on', () => {
		const bad = (q: string) => {
			const r = read(q);
			if (r.ok) throw new Error(`accepted ${q}`);
			return r.fields;
		};
		expect(bad('from=2026-02-30').from).toEqual([
			'The start date must be a date written YYYY-MM-DD, such as 2026-09-01.'
		]);
		expect(bad('to=yesterday').to?.[0]).toMatch(/end date must be a date/);
		expect(bad('from=2026-11-02&to=2026-11-01').from?.[0]).toMatch(/after the end date/);
		expect(bad('to=2026-12-06').to?.[0]).toMatch(/after today/);
		expect(bad('from=2023-12-04').from?.[0]).toMatch(/at most 1096 days/);
		expect(bad('area=north').area).toEqual(['Choose an area from the list, or all areas.']);
		expect(bad('area=0').area).toBeDefined();
		expect(bad('section=everything').section?.[0]).toMatch(/must be one of/);
		expect(bad('section=inspections&after=nope').after?.[0]).toMatch(/page link is not valid/);
		expect(bad('after=2026-10-12T13:14:00.000Z~42').after?.[0]).toMatch(/needs its section/);
	});

	it('gives the values back to fill the form in again', () => {
		expect(read('from=2026-02-30&to=2026-03-01&area=2').values).toEqual({
			from: '2026-02-30',
			to: '2026-03-01',
			area: '2'
		});
	});
});

describe('reportSearch', () => {
	it('writes the range, the area and a section page into a query string', () => {
		expect(reportSearch({ from: '2026-09-07', to: TODAY, area: null })).toBe(
			'?from=2026-09-07&to=2026-12-05'
		);
		expect(
			reportSearch({ from: '2026-09-07', to: TODAY, area: 3 }, { section: 'holds', after: 'x~1' })
		).toBe('?from=2026-09-07&to=2026-12-05&area=3&section=holds&after=x%7E1');
	});
});
