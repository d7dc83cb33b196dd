import { describe, expect, it } from 'vitest';
import {
	REPORT_MAX_DAYS,
	addDays,
	dayWords,
	daysInRange,
	defaultRange,
	isCalendarDate,
	rangeInstants,
	rangeProblems,
	rangeWords
} from './report-range';

// Calendar facts checked against the Gregorian calendar (ISO 8601 dates); "computed" otherwise.

describe('calendar dates', () => {
	it('accepts real dates only, leap days included', () => {
		expect(isCalendarDate('2026-12-05')).toBe(true);
		// 2024 is a leap year, 2026 and 2100 are not (Gregorian rule: ÷4, not ÷100 unless ÷400).
		expect(isCalendarDate('2024-02-29')).toBe(true);
		expect(isCalendarDate('2026-02-29')).toBe(false);
		expect(isCalendarDate('2100-02-29')).toBe(false);
		expect(isCalendarDate('2000-02-29')).toBe(true);
		expect(isCalendarDate('2026-13-01')).toBe(false);
		expect(isCalendarDate('2026-1-5')).toBe(false);
		expect(isCalendarDate('5 December 2026')).toBe(false);
	});

	it('counts days across month and year ends', () => {
		expect(addDays('2026-12-05', -89)).toBe('2026-09-07');
		expect(addDays('2026-12-31', 1)).toBe('2027-01-01');
		expect(addDays('2024-03-01', -1)).toBe('2024-02-29');
		expect(daysInRange('2026-09-07', '2026-12-05')).toBe(90);
		expect(daysInRange('2026-12-05', '2026-12-05')).toBe(1);
		// 2024-01-01 to 2026-12-31: 366 + 365 + 365 days.
		expect(daysInRange('2024-01-01', '2026-12-31')).toBe(1096);
	});

	it('defaults to the last 90 days, today included', () => {
		expect(defaultRange('2026-12-05')).toEqual({ from: '2026-09-07', to: '2026-12-05' });
	});

	it('covers whole UTC days, the end day included', () => {
		expect(rangeInstants('2026-09-01', '2026-09-30')).toEqual({
			startMs: Date.parse('2026-09-01T00:00:00Z'),
			endMs: Date.parse('2026-10-01T00:00:00Z')
		});
	});
});

describe('rangeProblems', () => {
	const today = '2026-12-05';
	it('accepts a range up to three years that ends today or earlier', () => {
		expect(rangeProblems('2026-09-07', today, today)).toEqual({});
		expect(rangeProblems(addDays(today, -(REPORT_MAX_DAYS - 1)), today, today)).toEqual({});
		expect(rangeProblems(today, today, today)).toEqual({});
	});

	it('refuses an end in the future, a start after the end, and a range too long', () => {
		expect(rangeProblems('2026-12-01', '2026-12-06', today).to).toMatch(
			/after today \(2026-12-05\)/
		);
		expect(rangeProblems('2026-11-02', '2026-11-01', today).from).toMatch(
			/start date \(2026-11-02\) is after the end date \(2026-11-01\)/
		);
		const long = rangeProblems(addDays(today, -REPORT_MAX_DAYS), today, today);
		expect(long.from).toMatch(/covers 1097 days; one report covers at most 1096 days/);
		expect(long.from).toContain(`Start on ${addDays(today, -(REPORT_MAX_DAYS - 1))} or later`);
	});
});

describe('words', () => {
	it('names days and ranges', () => {
		expect(dayWords('2026-09-07')).toBe('7 September 2026');
		expect(rangeWords('2026-09-07', '2026-12-05')).toBe(
			'7 September 2026 to 5 December 2026 (90 days)'
		);
		expect(rangeWords('2026-12-05', '2026-12-05')).toBe('5 December 2026 (1 day)');
	});
});
