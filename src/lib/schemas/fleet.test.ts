import { describe, expect, it } from 'vitest';
import { fleetQueryString, parseFleetQuery, safeParseFleetQuery } from './fleet';

const params = (s: string) => new URLSearchParams(s);

describe('the fleet query', () => {
	it('reads every filter, and blanks as not given', () => {
		const r = safeParseFleetQuery(
			params('area=3&kind=drift&type=pallet&status=on-hold&q=%20lathe%20')
		);
		expect(r).toEqual({
			ok: true,
			query: { area: 3, kind: 'drift', type: 'pallet', status: 'on-hold', q: 'lathe', page: 1 }
		});
		expect(safeParseFleetQuery(params('area=&kind=&q=%20&page=3'))).toEqual({
			ok: true,
			query: { page: 3 }
		});
	});

	it('names each bad field', () => {
		const r = safeParseFleetQuery(params('area=abc&kind=broken&type=x&status=y&page=0'));
		expect(r.ok).toBe(false);
		if (r.ok) return;
		expect(Object.keys(r.errors).sort()).toEqual(['area', 'kind', 'page', 'status', 'type']);
		expect(r.errors.kind[0]).toMatch(/^kind must be one of: break-in-due/);
		expect(r.errors.area).toEqual(['area must be a numeric area id.']);
	});

	it('drops a bad filter leniently and keeps the rest', () => {
		const { query, errors } = parseFleetQuery(params('area=0&kind=drift'));
		expect(query).toEqual({ kind: 'drift', page: 1 });
		expect(Object.keys(errors ?? {})).toEqual(['area']);
	});

	it('writes only the filters that are set', () => {
		expect(fleetQueryString({ area: 2, kind: undefined, q: 'a b', page: 1 })).toBe('?area=2&q=a+b');
		expect(fleetQueryString({ page: 2 })).toBe('?page=2');
		expect(fleetQueryString({})).toBe('');
	});
});
