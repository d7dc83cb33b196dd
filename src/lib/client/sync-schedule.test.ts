import { describe, expect, it } from 'vitest';
import {
	batches,
	formatAgo,
	halves,
	nextSyncDelayMs,
	parseRetryAfter,
	refusalAction,
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

describe('Retry-After', () => {
	const now = Date.parse('2026-12-04T12:00:00Z');

	it('reads delay-seconds and HTTP dates (RFC 9110 §10.2.3)', () => {
		expect(parseRetryAfter('120', now)).toBe(120_000);
		expect(parseRetryAfter(' 0 ', now)).toBe(0);
		expect(parseRetryAfter('Fri, 04 Dec 2026 12:00:30 GMT', now)).toBe(30_000);
		// A date already past means "now", not a negative wait.
		expect(parseRetryAfter('Fri, 04 Dec 2026 11:59:00 GMT', now)).toBe(0);
	});

	it('ignores a missing or unreadable header', () => {
		for (const v of [null, undefined, '', '-5', '1.5', 'soon']) {
			expect(parseRetryAfter(v, now)).toBeNull();
		}
	});

	it('never comes back before the server asked, spreads later only, and keeps the cap', () => {
		const base = { baseMs: 1000, jitter: 0.2 };
		const state = { pending: 3, failures: 1, retryAfterMs: 30_000 };
		expect(nextSyncDelayMs(state, { ...base, random: () => 0 })).toBe(30_000);
		expect(nextSyncDelayMs(state, { ...base, random: () => 0.99999 })).toBe(36_000);
		// A short Retry-After does not undercut the back-off after many failures.
		expect(
			nextSyncDelayMs({ pending: 3, failures: 4, retryAfterMs: 1000 }, { ...base, random: mid })
		).toBe(8000);
		// An hour is more than the cap: the device tries again at the cap.
		expect(
			nextSyncDelayMs({ pending: 3, failures: 1, retryAfterMs: 3_600_000 }, { random: mid })
		).toBe(SYNC_MAX_DELAY_MS);
		// Without failures a stale Retry-After is not used.
		expect(nextSyncDelayMs({ pending: 3, failures: 0, retryAfterMs: 30_000 }, base)).toBe(1000);
	});
});

describe('refusalAction', () => {
	it('splits a refused batch and sets a single refused entry aside (400, 413)', () => {
		expect(refusalAction(400, 100)).toBe('split');
		expect(refusalAction(413, 2)).toBe('split');
		expect(refusalAction(400, 1)).toBe('reject');
		expect(refusalAction(413, 1)).toBe('reject');
	});

	it('splits a batch the server failed on (500 and the like) and suspects a single entry', () => {
		for (const status of [500, 501, 507, 599]) {
			expect(refusalAction(status, 50)).toBe('split');
			expect(refusalAction(status, 1)).toBe('suspect');
		}
	});

	it('waits without splitting when the server is busy or not reached (503, 502, 504, 429)', () => {
		for (const status of [503, 502, 504, 429, 403, 404, 408]) {
			expect(refusalAction(status, 100)).toBe('wait');
			expect(refusalAction(status, 1)).toBe('wait');
		}
	});

	it('halves a batch so one bad entry in 100 is found in a handful of requests', () => {
		expect(halves([1, 2, 3, 4, 5])).toEqual([
			[1, 2, 3],
			[4, 5]
		]);
		expect(halves([1])).toEqual([[1], []]);
		// Bisecting 100 entries down to the one at fault: two requests per level.
		let size = 100;
		let requests = 1;
		while (size > 1) {
			size = halves(Array.from({ length: size }))[0].length;
			requests += 2;
		}
		expect(requests).toBe(15);
	});
});
