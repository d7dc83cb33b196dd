import { describe, expect, it } from 'vitest';
import {
	completionHref,
	dayWords,
	orderRefFrom,
	startNoteText,
	withOrder
} from './work-order-links';

// Nestmark's own routing rules (issue 12); expected values written by hand.
const url = (q: string) => new URL(`http://x/f/NM-1?${q}`);

describe('completionHref', () => {
	it('leads each action to its form', () => {
		const o = { id: 12, fixtureCode: 'NM-4K7QX' };
		expect(completionHref({ ...o, action: 'replace-balls' })).toBe(
			'/f/NM-4K7QX?wo=12&do=part-swap&parts=balls'
		);
		expect(completionHref({ ...o, action: 're-break-in' })).toBe('/f/NM-4K7QX/break-in?wo=12');
		expect(completionHref({ ...o, action: 'inspect' })).toBe('/f/NM-4K7QX?wo=12&do=inspection');
		expect(completionHref({ ...o, action: 'clean' })).toBe('/f/NM-4K7QX?wo=12&do=cleaning');
		expect(completionHref({ ...o, action: 'other' })).toBe('/f/NM-4K7QX?wo=12');
	});
});

describe('orderRefFrom', () => {
	it('reads a whole positive id and a known kind', () => {
		expect(orderRefFrom(url('wo=12&do=part-swap&parts=balls,bogus'))).toEqual({
			workOrderId: 12,
			kind: 'part-swap',
			parts: ['balls']
		});
		expect(orderRefFrom(url('wo=12&do=move'))).toEqual({ workOrderId: 12, kind: null, parts: [] });
	});
	it('ignores anything else', () => {
		for (const q of ['', 'wo=0', 'wo=-1', 'wo=1.5', 'wo=abc', 'wo=99999999999'])
			expect(orderRefFrom(url(q))).toBeNull();
	});
});

describe('withOrder', () => {
	it('tags only the entry that carries the order out', () => {
		const ref = { workOrderId: 5, kind: 'part-swap' as const, parts: [] };
		expect(withOrder(ref, 'part-swap', { replaced: ['balls'] })).toEqual({
			replaced: ['balls'],
			workOrderId: 5
		});
		expect(withOrder(ref, 'note', { text: 'x' })).toEqual({ text: 'x' });
		expect(withOrder(null, 'part-swap', { replaced: ['balls'] })).toEqual({ replaced: ['balls'] });
	});
	it('for "other" work tags any completing kind', () => {
		const ref = { workOrderId: 5, kind: null, parts: [] };
		expect(withOrder(ref, 'cleaning', {})).toEqual({ workOrderId: 5 });
		expect(withOrder(ref, 'reseat', {})).toEqual({});
	});
});

it('startNoteText names the order and its action', () => {
	expect(startNoteText({ id: 12, action: 'replace-balls' })).toBe(
		'Started work order #12: replace balls'
	);
	expect(startNoteText({ id: 3, action: 'other', actionText: 'New label' })).toBe(
		'Started work order #3: New label'
	);
});

it('dayWords says a date in words', () => {
	expect(dayWords('2026-03-02')).toBe('2 March 2026');
});
