import { describe, expect, it } from 'vitest';
import {
	clearedByWords,
	finalRWords,
	openForWords,
	runOutcome,
	wholeDays,
	type BreakInFlagSpan
} from './audit-words';

// The outcome follows the register's own break-in-due flags (computed cases); R = 4s is the
// ISO 230-2 style repeatability the fold uses, compared with the spec as the flag rules do.

const T = Date.parse('2026-11-01T10:00:00Z');
const H = 3_600_000;

describe('runOutcome', () => {
	const run = { id: 'run-2', receivedAtMs: T };
	it('is settled when the run cleared the break-in-due flag', () => {
		const flags: BreakInFlagSpan[] = [
			{ raisedAtMs: T - 48 * H, clearedAtMs: T, clearedByEventId: 'run-2' }
		];
		expect(runOutcome(run, flags)).toBe('settled');
	});

	it('is not settled while a flag raised before it stays open past it', () => {
		expect(
			runOutcome(run, [{ raisedAtMs: T - H, clearedAtMs: null, clearedByEventId: null }])
		).toBe('not-settled');
		expect(
			runOutcome(run, [{ raisedAtMs: T - H, clearedAtMs: T + H, clearedByEventId: 'run-3' }])
		).toBe('not-settled');
		// Raised by the same batch (a part swap sent with the run): open at the run's arrival.
		expect(runOutcome(run, [{ raisedAtMs: T, clearedAtMs: null, clearedByEventId: null }])).toBe(
			'not-settled'
		);
	});

	it('needed no break-in when no flag was open at its arrival', () => {
		expect(runOutcome(run, [])).toBe('not-required');
		expect(
			runOutcome(run, [{ raisedAtMs: T - 9 * H, clearedAtMs: T - H, clearedByEventId: 'run-1' }])
		).toBe('not-required');
		expect(
			runOutcome(run, [{ raisedAtMs: T + H, clearedAtMs: null, clearedByEventId: null }])
		).toBe('not-required');
	});
});

describe('words', () => {
	it('gives the final R against the spec, or why there is none', () => {
		expect(finalRWords(0.4213, 1, 30, 10)).toBe('0.421 µm (within the 1 µm spec)');
		expect(finalRWords(1, 1, 30, 10)).toBe('1 µm (within the 1 µm spec)');
		expect(finalRWords(1.25, 1, 30, 10)).toBe('1.25 µm (over the 1 µm spec)');
		expect(finalRWords(null, 1, 0, 10)).toBe('no readings');
		expect(finalRWords(null, 1, 4, 10)).toBe('4 readings, too few for a window of 10');
	});

	it('counts whole days a flag has been open', () => {
		expect(wholeDays(T, T + 23 * H)).toBe(0);
		expect(wholeDays(T, T + 25 * H)).toBe(1);
		expect(wholeDays(T, T - H)).toBe(0);
		expect(openForWords(T, T + 5 * H)).toBe('open less than a day');
		expect(openForWords(T, T + 24 * H)).toBe('open 1 day');
		expect(openForWords(T, T + 12 * 24 * H)).toBe('open 12 days');
	});

	it('names what cleared a flag', () => {
		expect(clearedByWords({ kind: 'cleaning', by: 'Tessa' })).toBe(
			'Cleared by a cleaning logged by Tessa'
		);
		expect(clearedByWords({ kind: 'inspection', by: 'Tessa' })).toBe(
			'Cleared by an inspection logged by Tessa'
		);
		expect(clearedByWords(null)).toMatch(/judged it again/);
	});
});
