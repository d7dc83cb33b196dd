import { describe, expect, it } from 'vitest';
import { FLAG_KINDS } from './flag-kinds';
import { byUrgency, DUE_WORK_KINDS, FLAG_URGENCY, urgencyRank } from './flag-urgency';

// The order is Nestmark's own (the fleet board's definition), not a published one.
describe('flag urgency', () => {
	it('ranks every flag kind exactly once', () => {
		expect([...FLAG_URGENCY].sort()).toEqual([...FLAG_KINDS].sort());
	});

	it('puts replace now first and cleaning due last', () => {
		expect(urgencyRank('replace-now')).toBe(0);
		expect(urgencyRank('out-of-spec')).toBeLessThan(urgencyRank('drift'));
		expect(urgencyRank('drift')).toBeLessThan(urgencyRank('replace-soon'));
		expect(urgencyRank('replace-soon')).toBeLessThan(urgencyRank('break-in-due'));
		expect(urgencyRank('inspection-due')).toBeLessThan(urgencyRank('cleaning-due'));
		expect(urgencyRank('cleaning-due')).toBe(FLAG_KINDS.length - 1);
	});

	it('lists the due-work kinds in urgency order', () => {
		const ranks = DUE_WORK_KINDS.map(urgencyRank);
		expect(ranks).toEqual([...ranks].sort((a, b) => a - b));
	});

	it('sorts by urgency, then oldest first', () => {
		const flags = [
			{ kind: 'cleaning-due' as const, raisedAt: '2026-01-01T00:00:00.000Z' },
			{ kind: 'drift' as const, raisedAt: '2026-03-01T00:00:00.000Z' },
			{ kind: 'drift' as const, raisedAt: '2026-02-01T00:00:00.000Z' }
		];
		expect(byUrgency(flags).map((f) => `${f.kind} ${f.raisedAt.slice(5, 7)}`)).toEqual([
			'drift 02',
			'drift 03',
			'cleaning-due 01'
		]);
		expect(flags[0].kind).toBe('cleaning-due');
	});
});
