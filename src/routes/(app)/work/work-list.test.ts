import { describe, expect, it } from 'vitest';
import type { SnapshotFixture, SnapshotWorkOrder } from '$lib/schemas/register-snapshot';
import { alsoDue, dueWords, localToday, orderProgress } from './work-list';

// Nestmark's own list rules (issue 12); expected values counted by hand on the calendar.
const order: SnapshotWorkOrder = {
	id: 4,
	fixtureCode: 'NM-1',
	fixtureName: 'Vee block',
	action: 'replace-balls',
	actionText: null,
	status: 'scheduled',
	dueOn: '2026-03-02',
	parts: [],
	notes: null,
	flagReasons: []
};
const entry = (kind: string, workOrderId: number, state: 'waiting' | 'rejected' = 'waiting') => ({
	id: `${kind}-${workOrderId}-${state}`,
	kind,
	payload: { workOrderId },
	state,
	error: state === 'rejected' ? 'Work order #4 does not exist.' : undefined
});

describe('orderProgress', () => {
	it('tells a waiting start from a waiting completion, and lists refusals', () => {
		expect(orderProgress(order, [entry('note', 4)])).toEqual({
			startWaiting: true,
			doneWaiting: false,
			refused: []
		});
		expect(orderProgress(order, [entry('part-swap', 4), entry('note', 9)])).toEqual({
			startWaiting: false,
			doneWaiting: true,
			refused: []
		});
		expect(orderProgress(order, [entry('part-swap', 4, 'rejected')])).toEqual({
			startWaiting: false,
			doneWaiting: false,
			refused: ['Work order #4 does not exist.']
		});
	});
});

describe('dueWords', () => {
	it('says overdue in words', () => {
		expect(dueWords('2026-03-02', '2026-03-05')).toEqual({
			text: 'Overdue by 3 days (due 2 March 2026)',
			overdue: true
		});
		expect(dueWords('2026-03-04', '2026-03-05').text).toBe('Overdue by 1 day (due 4 March 2026)');
		expect(dueWords('2026-03-05', '2026-03-05')).toEqual({
			text: 'Due today (5 March 2026)',
			overdue: false
		});
		expect(dueWords('2026-03-06', '2026-03-05').text).toBe('Due tomorrow (6 March 2026)');
		// Across the end of February 2026 (28 days).
		expect(dueWords('2026-03-03', '2026-02-27').text).toBe('Due in 4 days (3 March 2026)');
		expect(dueWords(null, '2026-03-05')).toEqual({ text: 'No due date yet', overdue: false });
	});
	it('localToday reads the phone calendar', () => {
		expect(localToday(new Date(2026, 0, 9, 23, 30))).toBe('2026-01-09');
	});
});

describe('alsoDue', () => {
	const fixture = (code: string, flags: SnapshotFixture['flags'], status = 'in-service') =>
		({
			code,
			name: `Fixture ${code}`,
			status,
			location: { site: 'S', area: 'A', name: 'L' },
			flags
		}) as unknown as SnapshotFixture;
	it('lists routine work with no order planned, longest due first', () => {
		const rows = alsoDue([
			fixture('NM-A', [{ kind: 'cleaning-due', reason: 'c', raisedAt: '2026-02-02T00:00:00Z' }]),
			fixture('NM-B', [
				{ kind: 'inspection-due', reason: 'i', raisedAt: '2026-02-01T00:00:00Z' },
				{ kind: 'replace-now', reason: 'r', raisedAt: '2026-01-01T00:00:00Z' }
			]),
			fixture('NM-C', [
				{
					kind: 'break-in-due',
					reason: 'b',
					raisedAt: '2026-01-01T00:00:00Z',
					plannedWork: { workOrderId: 1, dueOn: null, assignee: null }
				}
			]),
			fixture(
				'NM-D',
				[{ kind: 'cleaning-due', reason: 'c', raisedAt: '2026-01-01T00:00:00Z' }],
				'retired'
			)
		]);
		expect(rows.map((r) => [r.code, r.flags.map((f) => f.kind), r.place])).toEqual([
			['NM-B', ['inspection-due'], 'S / A / L'],
			['NM-A', ['cleaning-due'], 'S / A / L']
		]);
	});
});
