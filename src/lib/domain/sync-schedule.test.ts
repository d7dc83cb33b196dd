import { describe, expect, it } from 'vitest';
import {
	batches,
	formatAgo,
	nextSyncDelayMs,
	retryDelayMs,
	SYNC_IDLE_POLL_MS,
	SYNC_MAX_DELAY_MS
} from './sync-schedule';

const mid = () => 0.5; // jitter factor exactly 1

describe('retryDelayMs', () => {
	it('doubles from the base delay after each failure', () => {
		const d = [1, 2, 3, 4].map((n) => retryDelayMs(n, { baseMs: 1000, random: mid }));
		expect(d).toEqual([1000, 2000, 4000, 8000]);
	});

	it('never waits longer than the cap, even after many failures', () => {
		expect(retryDelayMs(10, { baseMs: 1000, maxMs: 60_000, random: mid })).toBe(60_000);
		expect(retryDelayMs(5000, { random: () => 0.999 })).toBe(SYNC_MAX_DELAY_MS);
	});

	it('spreads the delay by the jitter fraction either way', () => {
		expect(retryDelayMs(1, { baseMs: 1000, jitter: 0.2, random: () => 0 })).toBe(800);
		expect(retryDelayMs(1, { baseMs: 1000, jitter: 0.2, random: () => 0.99999 })).toBe(1200);
	});

	it('treats zero or fractional failure counts as the first retry', () => {
		expect(retryDelayMs(0, { baseMs: 1000, random: mid })).toBe(1000);
		expect(retryDelayMs(2.7, { baseMs: 1000, random: mid })).toBe(2000);
	});
});

describe('nextSyncDelayMs', () => {
	it('backs off after failures, retries soon while entries wait, and polls slowly when idle', () => {
		expect(nextSyncDelayMs({ pending: 3, failures: 3 }, { baseMs: 1000, random: mid })).toBe(4000);
		expect(nextSyncDelayMs({ pending: 3, failures: 0 }, { baseMs: 1000 })).toBe(1000);
		expect(nextSyncDelayMs({ pending: 0, failures: 0 })).toBe(SYNC_IDLE_POLL_MS);
	});
});

describe('formatAgo', () => {
	const now = new Date('2026-03-02T12:00:00Z');
	const ago = (s: number) => formatAgo(new Date(now.getTime() - s * 1000), now);

	it('reads like a person would say it', () => {
		expect(ago(5)).toBe('just now');
		expect(ago(120)).toBe('2 min ago');
		expect(ago(3 * 3600)).toBe('3 h ago');
		expect(ago(26 * 3600)).toBe('yesterday');
		expect(ago(4 * 86400)).toBe('4 days ago');
	});
});

describe('batches', () => {
	it('splits into consecutive batches of at most the size, keeping order', () => {
		const items = Array.from({ length: 250 }, (_, i) => i);
		const b = batches(items, 100);
		expect(b.map((x) => x.length)).toEqual([100, 100, 50]);
		expect(b.flat()).toEqual(items);
		expect(batches([], 100)).toEqual([]);
	});

	it('refuses a size below one', () => {
		expect(() => batches([1], 0)).toThrow(RangeError);
	});
});
