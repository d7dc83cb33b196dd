import ICAL from 'ical.js';
import { describe, expect, it } from 'vitest';
import { addDays } from './work-orders';
import {
	calendarGrid,
	dayLoads,
	isIsoDate,
	isOverCapacity,
	isOverdue,
	isoWeekday,
	isoWeekLabel,
	monthEnd,
	moveRefusal,
	stepTarget
} from './calendar';

const dates = (g: ReturnType<typeof calendarGrid>) =>
	g.weeks.flatMap((w) => w.days.map((d) => d.date));

describe('weekdays and ISO weeks against a reference', () => {
	// ISO 8601-1:2019 week dates, examples of Wikipedia's "ISO week date" article (from memory);
	// the weekdays are those of any printed calendar (2026-12-05 is a Saturday).
	it.each([
		['2026-12-05', 6, '2026-W49'],
		['2008-12-29', 1, '2009-W01'],
		['2010-01-03', 7, '2009-W53'],
		['2005-01-01', 6, '2004-W53'],
		['2021-01-03', 7, '2020-W53'],
		['2021-01-04', 1, '2021-W01']
	])('%s is weekday %i of %s', (date, weekday, label) => {
		expect(isoWeekday(date)).toBe(weekday);
		expect(isoWeekLabel(date)).toBe(label);
	});

	it('agrees with ical.js (a general-purpose RFC 5545 library) on every day of 1999–2032', () => {
		const T = ICAL.Time;
		for (let d = '1999-01-01'; d <= '2032-12-31'; d = addDays(d, 1)) {
			const t = T.fromDateString(d);
			// ical.js: dayOfWeek(MONDAY) counts Monday as 1; weekNumber(MONDAY) is the ISO week.
			expect(isoWeekday(d), d).toBe(t.dayOfWeek(T.MONDAY));
			expect(Number(isoWeekLabel(d).slice(6)), d).toBe(t.weekNumber(T.MONDAY));
		}
	});

	it('knows the length of months, leap years included', () => {
		// Gregorian rule (ISO 8601): 2024 is a leap year, 2100 is not, 2000 is.
		expect(monthEnd('2024-02-10')).toBe('2024-02-29');
		expect(monthEnd('2100-02-01')).toBe('2100-02-28');
		expect(monthEnd('2000-02-01')).toBe('2000-02-29');
		expect(monthEnd('2026-12-31')).toBe('2026-12-31');
		expect(isIsoDate('2026-02-29')).toBe(false);
		expect(isIsoDate('2026-2-1')).toBe(false);
	});
});

describe('month view', () => {
	it('pads December 2026 to whole weeks from Monday 30 November to Sunday 3 January', () => {
		// A printed calendar: 1 December 2026 is a Tuesday, 31 December a Thursday.
		const g = calendarGrid('month', '2026-12-05');
		expect(g.from).toBe('2026-11-30');
		expect(g.to).toBe('2027-01-03');
		expect(g.weeks).toHaveLength(5);
		expect(g.weeks.map((w) => w.label)).toEqual([
			'2026-W49',
			'2026-W50',
			'2026-W51',
			'2026-W52',
			'2026-W53'
		]);
		const all = g.weeks.flatMap((w) => w.days);
		expect(all.filter((d) => d.inPeriod)).toHaveLength(31);
		expect(all[0]).toEqual({ date: '2026-11-30', weekday: 1, inPeriod: false });
		expect(all[1]).toEqual({ date: '2026-12-01', weekday: 2, inPeriod: true });
		expect(all.at(-1)).toEqual({ date: '2027-01-03', weekday: 7, inPeriod: false });
		expect(g.periodStart).toBe('2026-12-01');
		expect(g.periodEnd).toBe('2026-12-31');
		expect(g.previous).toBe('2026-11-01');
		expect(g.next).toBe('2027-01-01');
	});

	it('has four rows when the month starts on a Monday and has 28 days (February 2021)', () => {
		// 1 February 2021 was a Monday (printed calendar; ical.js agrees above).
		const g = calendarGrid('month', '2021-02-14');
		expect(g.weeks).toHaveLength(4);
		expect(g.from).toBe('2021-02-01');
		expect(g.to).toBe('2021-02-28');
		expect(g.weeks.flatMap((w) => w.days).every((d) => d.inPeriod)).toBe(true);
	});

	it('has six rows when a 31-day month starts on a Saturday (August 2026)', () => {
		const g = calendarGrid('month', '2026-08-31');
		expect(g.weeks).toHaveLength(6);
		expect(g.from).toBe('2026-07-27');
		expect(g.to).toBe('2026-09-06');
	});

	it('pages across years, from any day of the month', () => {
		expect(calendarGrid('month', '2027-01-31').previous).toBe('2026-12-01');
		expect(calendarGrid('month', '2026-12-31').next).toBe('2027-01-01');
	});

	it('shows every day once, in order', () => {
		const d = dates(calendarGrid('month', '2026-03-15'));
		for (let i = 1; i < d.length; i++) expect(d[i]).toBe(addDays(d[i - 1], 1));
	});

	it('refuses a date that is not on the calendar', () => {
		expect(() => calendarGrid('month', '2026-02-30')).toThrow(RangeError);
	});
});

describe('week view', () => {
	it('is the ISO week of the date, Monday to Sunday, across a year end', () => {
		// 2021-01-03 (a Sunday) is in 2020-W53, which began on Monday 2020-12-28.
		const g = calendarGrid('week', '2021-01-03');
		expect(dates(g)).toEqual([
			'2020-12-28',
			'2020-12-29',
			'2020-12-30',
			'2020-12-31',
			'2021-01-01',
			'2021-01-02',
			'2021-01-03'
		]);
		expect(g.weeks[0].label).toBe('2020-W53');
		expect(g.previous).toBe('2020-12-21');
		expect(g.next).toBe('2021-01-04');
		expect(g.weeks[0].days.every((d) => d.inPeriod)).toBe(true);
	});
});

describe('keyboard target', () => {
	const shown = { from: '2026-11-30', to: '2027-01-03' };
	it('moves a day left and right and a week up and down', () => {
		expect(stepTarget('2026-12-09', 'ArrowLeft', shown)).toBe('2026-12-08');
		expect(stepTarget('2026-12-09', 'ArrowRight', shown)).toBe('2026-12-10');
		expect(stepTarget('2026-12-09', 'ArrowUp', shown)).toBe('2026-12-02');
		expect(stepTarget('2026-12-09', 'ArrowDown', shown)).toBe('2026-12-16');
	});
	it('does not leave the days shown', () => {
		expect(stepTarget('2026-11-30', 'ArrowLeft', shown)).toBeNull();
		expect(stepTarget('2026-12-02', 'ArrowUp', shown)).toBeNull();
		expect(stepTarget('2027-01-03', 'ArrowRight', shown)).toBeNull();
		expect(stepTarget('2026-12-28', 'ArrowDown', shown)).toBeNull();
	});
});

describe('capacity', () => {
	it('counts open orders per technician per day and marks more than the capacity', () => {
		const loads = dayLoads(
			[
				{ status: 'scheduled', dueOn: '2026-12-07', assignee: 'tomas' },
				{ status: 'underway', dueOn: '2026-12-07', assignee: 'tomas' },
				{ status: 'planned', dueOn: '2026-12-07', assignee: 'tomas' },
				{ status: 'scheduled', dueOn: '2026-12-07', assignee: 'ines' },
				// Not counted: finished, unassigned, undated.
				{ status: 'done', dueOn: '2026-12-07', assignee: 'tomas' },
				{ status: 'cancelled', dueOn: '2026-12-07', assignee: 'tomas' },
				{ status: 'planned', dueOn: '2026-12-07', assignee: null },
				{ status: 'planned', dueOn: null, assignee: 'tomas' },
				{ status: 'scheduled', dueOn: '2026-12-08', assignee: 'tomas' }
			],
			2
		);
		expect(loads.get('2026-12-07')).toEqual([
			{ assignee: 'ines', count: 1, over: false },
			{ assignee: 'tomas', count: 3, over: true }
		]);
		expect(loads.get('2026-12-08')).toEqual([{ assignee: 'tomas', count: 1, over: false }]);
		expect(loads.has('2026-12-09')).toBe(false);
	});

	it('is over only past the capacity, not at it', () => {
		expect(isOverCapacity(4, 4)).toBe(false);
		expect(isOverCapacity(5, 4)).toBe(true);
	});
});

describe('overdue and moving', () => {
	const today = '2026-12-05';
	it('is overdue when open and due before today', () => {
		expect(isOverdue({ status: 'scheduled', dueOn: '2026-12-04' }, today)).toBe(true);
		expect(isOverdue({ status: 'underway', dueOn: '2026-12-04' }, today)).toBe(true);
		expect(isOverdue({ status: 'planned', dueOn: '2026-12-04' }, today)).toBe(true);
		expect(isOverdue({ status: 'scheduled', dueOn: today }, today)).toBe(false);
		expect(isOverdue({ status: 'done', dueOn: '2026-12-01' }, today)).toBe(false);
		expect(isOverdue({ status: 'cancelled', dueOn: '2026-12-01' }, today)).toBe(false);
		expect(isOverdue({ status: 'planned', dueOn: null }, today)).toBe(false);
	});

	it('moves open orders only, and says why not', () => {
		expect(moveRefusal('planned')).toBeNull();
		expect(moveRefusal('scheduled')).toBeNull();
		expect(moveRefusal('underway')).toBeNull();
		expect(moveRefusal('done')).toMatch(/^Done/);
		expect(moveRefusal('cancelled')).toMatch(/^Cancelled/);
	});
});
