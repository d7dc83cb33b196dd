import { describe, expect, it } from 'vitest';
import { calendarHref, calendarMoveSchema, parseCalendarQuery } from './calendar';

const TODAY = '2026-12-05';

describe('the calendar’s URL', () => {
	it('defaults to this month, everyone, any work', () => {
		expect(parseCalendarQuery(new URLSearchParams(), TODAY)).toEqual({
			query: { view: 'month', date: TODAY },
			errors: null
		});
	});

	it('reads a week view with filters', () => {
		const { query, errors } = parseCalendarQuery(
			new URLSearchParams(
				'view=week&date=2026-12-14&assignee=Tomas@Larchmere.example&area=3&action=clean'
			),
			TODAY
		);
		expect(errors).toBeNull();
		expect(query).toEqual({
			view: 'week',
			date: '2026-12-14',
			assignee: 'tomas@larchmere.example',
			area: 3,
			action: 'clean'
		});
	});

	it('drops and names a bad value, keeping the rest', () => {
		const { query, errors } = parseCalendarQuery(
			new URLSearchParams('view=year&date=2026-02-30&action=clean'),
			TODAY
		);
		expect(query).toEqual({ view: 'month', date: TODAY, action: 'clean' });
		expect(Object.keys(errors ?? {}).sort()).toEqual(['date', 'view']);
	});

	it('writes links with the defaults left out', () => {
		expect(calendarHref({ view: 'month', date: TODAY }, TODAY)).toBe('/plan/calendar');
		expect(calendarHref({ view: 'week', date: '2026-12-14', area: 2 }, TODAY)).toBe(
			'/plan/calendar?view=week&date=2026-12-14&area=2'
		);
	});
});

describe('the move form', () => {
	it('takes an id, a new date and the date the page showed', () => {
		expect(calendarMoveSchema.parse({ id: '7', dueOn: '2026-12-09', from: '' })).toEqual({
			id: 7,
			dueOn: '2026-12-09',
			from: ''
		});
		expect(calendarMoveSchema.safeParse({ id: '7', dueOn: '2026-12-32' }).success).toBe(false);
		expect(calendarMoveSchema.safeParse({ id: '0', dueOn: '2026-12-09' }).success).toBe(false);
		expect(calendarMoveSchema.safeParse({ id: '7', dueOn: '2026-12-09', from: 'x' }).success).toBe(
			false
		);
	});
});
