import { describe, expect, it } from 'vitest';
import { FLAG_KINDS } from './flag-kinds';
import {
	ACTION_FOR_FLAG,
	WORK_ORDER_STATUSES,
	addDays,
	dueOnForFlag,
	isOverdue,
	orderAnswersFlag,
	statusForPlan,
	transitionRefusal,
	workOrderEffect
} from './work-orders';

describe('statusForPlan', () => {
	it('is scheduled with a date and an assignee, planned without either', () => {
		expect(statusForPlan('planned', '2026-12-10', 'u1')).toBe('scheduled');
		expect(statusForPlan('scheduled', null, 'u1')).toBe('planned');
		expect(statusForPlan('scheduled', '2026-12-10', null)).toBe('planned');
	});
	it('leaves later statuses alone', () => {
		expect(statusForPlan('underway', null, null)).toBe('underway');
		expect(statusForPlan('done', '2026-12-10', 'u1')).toBe('done');
		expect(statusForPlan('cancelled', '2026-12-10', 'u1')).toBe('cancelled');
	});
});

describe('transitionRefusal', () => {
	it('allows the forward moves and cancelling an open order', () => {
		for (const [a, b] of [
			['planned', 'underway'],
			['scheduled', 'underway'],
			['underway', 'done'],
			['scheduled', 'done'],
			['planned', 'cancelled'],
			['underway', 'cancelled']
		] as const)
			expect(transitionRefusal(a, b), `${a} → ${b}`).toBeNull();
	});
	it('refuses done → planned with a message, and every move out of done or cancelled', () => {
		expect(transitionRefusal('done', 'planned')).toMatch(/done: it cannot become planned/);
		for (const to of WORK_ORDER_STATUSES) {
			if (to !== 'done') expect(transitionRefusal('done', to)).toMatch(/Make a new work order/);
			if (to !== 'cancelled') expect(transitionRefusal('cancelled', to)).toMatch(/cancelled/);
		}
	});
	it('refuses going back from underway', () => {
		expect(transitionRefusal('underway', 'scheduled')).toMatch(/cannot go back/);
	});
});

describe('orders from flags', () => {
	it('has an action for every flag kind, as the plan names them', () => {
		expect(Object.keys(ACTION_FOR_FLAG).sort()).toEqual([...FLAG_KINDS].sort());
		expect(ACTION_FOR_FLAG['replace-now']).toBe('replace-balls');
		expect(ACTION_FOR_FLAG['break-in-due']).toBe('re-break-in');
		expect(ACTION_FOR_FLAG['inspection-due']).toBe('inspect');
		expect(ACTION_FOR_FLAG['cleaning-due']).toBe('clean');
		expect(ACTION_FOR_FLAG.drift).toBe('inspect');
		expect(ACTION_FOR_FLAG['out-of-spec']).toBe('inspect');
	});
	it('is due today for replace now, at the end of the horizon otherwise', () => {
		expect(dueOnForFlag('replace-now', '2026-12-05', 14)).toBe('2026-12-05');
		expect(dueOnForFlag('cleaning-due', '2026-12-05', 14)).toBe('2026-12-19');
		expect(dueOnForFlag('drift', '2026-12-30', 3)).toBe('2027-01-02');
	});
	it('adds days across month and leap-year ends (Gregorian calendar)', () => {
		expect(addDays('2028-02-28', 1)).toBe('2028-02-29');
		expect(addDays('2027-02-28', 1)).toBe('2027-03-01');
		expect(() => addDays('not a date', 1)).toThrow(RangeError);
	});
	it('links a new flag to an order that answers it', () => {
		expect(orderAnswersFlag('replace-balls', 'replace-now')).toBe(true);
		expect(orderAnswersFlag('replace-seats', 'drift')).toBe(true);
		expect(orderAnswersFlag('replace-balls', 'break-in-due')).toBe(false);
		expect(orderAnswersFlag('clean', 'cleaning-due')).toBe(true);
		expect(orderAnswersFlag('clean', 'inspection-due')).toBe(false);
	});
});

describe('workOrderEffect', () => {
	it('completes with the event the action asks for, starts with any other', () => {
		expect(workOrderEffect('replace-balls', 'scheduled', 'part-swap')).toBe('complete');
		expect(workOrderEffect('re-break-in', 'underway', 'break-in')).toBe('complete');
		expect(workOrderEffect('inspect', 'planned', 'inspection')).toBe('complete');
		expect(workOrderEffect('clean', 'scheduled', 'cleaning')).toBe('complete');
		expect(workOrderEffect('clean', 'scheduled', 'note')).toBe('start');
		expect(workOrderEffect('clean', 'underway', 'note')).toBe('none');
	});
	it('leaves done and cancelled orders as they are', () => {
		expect(workOrderEffect('clean', 'cancelled', 'cleaning')).toBe('none');
		expect(workOrderEffect('clean', 'done', 'cleaning')).toBe('none');
	});
});

describe('isOverdue', () => {
	it('is open with a due date before today', () => {
		expect(isOverdue({ status: 'scheduled', dueOn: '2026-12-04' }, '2026-12-05')).toBe(true);
		expect(isOverdue({ status: 'scheduled', dueOn: '2026-12-05' }, '2026-12-05')).toBe(false);
		expect(isOverdue({ status: 'done', dueOn: '2026-12-01' }, '2026-12-05')).toBe(false);
		expect(isOverdue({ status: 'planned', dueOn: null }, '2026-12-05')).toBe(false);
	});
});
