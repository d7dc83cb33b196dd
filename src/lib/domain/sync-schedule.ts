/**
 * When the device tries the sync again. Pure timing rules, so they can be tested without a
 * browser: exponential back-off after failures (with jitter, so a room of phones coming back on
 * the network do not all call at once), a short delay while entries wait, and a slow idle poll.
 */

export interface BackoffOptions {
	/** Delay after the first failure. */
	baseMs?: number;
	/** Longest delay, however many failures. */
	maxMs?: number;
	/** Spread as a fraction of the delay: 0.2 gives ±20 %. */
	jitter?: number;
	/** A [0, 1) generator; pass a fixed one in tests. */
	random?: () => number;
}

/** Events per sync request (the API takes up to 500; smaller batches fail and retry cheaply). */
export const SYNC_BATCH_SIZE = 100;
export const SYNC_BASE_DELAY_MS = 5_000;
export const SYNC_MAX_DELAY_MS = 5 * 60_000;
/** Check for register changes this often when nothing is waiting. */
export const SYNC_IDLE_POLL_MS = 5 * 60_000;

/** Delay before retry number `failures` (1 = after the first failure): base · 2^(failures−1), capped, with jitter. */
export function retryDelayMs(failures: number, options: BackoffOptions = {}): number {
	const {
		baseMs = SYNC_BASE_DELAY_MS,
		maxMs = SYNC_MAX_DELAY_MS,
		jitter = 0.2,
		random = Math.random
	} = options;
	const n = Math.max(1, Math.floor(failures));
	// 2^(n−1) overflows to Infinity long after the cap is reached; min() keeps it finite.
	const raw = Math.min(maxMs, baseMs * 2 ** (n - 1));
	const spread = 1 - jitter + 2 * jitter * random();
	return Math.round(Math.min(maxMs, raw * spread));
}

/** The wait before the next automatic sync, given how many entries wait and how many tries failed in a row. */
export function nextSyncDelayMs(
	state: { pending: number; failures: number },
	options: BackoffOptions = {}
): number {
	if (state.failures > 0) return retryDelayMs(state.failures, options);
	if (state.pending > 0) return options.baseMs ?? SYNC_BASE_DELAY_MS;
	return SYNC_IDLE_POLL_MS;
}

/** "just now", "2 min ago", "3 h ago", "yesterday", "4 days ago" — how long ago `then` was, at `now`. */
export function formatAgo(then: Date, now: Date): string {
	const s = Math.round((now.getTime() - then.getTime()) / 1000);
	if (s < 45) return 'just now';
	const min = Math.round(s / 60);
	if (min < 60) return `${min} min ago`;
	const h = Math.round(min / 60);
	if (h < 24) return `${h} h ago`;
	const d = Math.round(h / 24);
	return d === 1 ? 'yesterday' : `${d} days ago`;
}

/** Splits `items` into consecutive batches of at most `size` (the sync API takes up to 500; we send 100). */
export function batches<T>(items: readonly T[], size: number): T[][] {
	if (!(size >= 1)) throw new RangeError('batch size must be at least 1');
	const out: T[][] = [];
	for (let i = 0; i < items.length; i += size) out.push(items.slice(i, i + size));
	return out;
}
