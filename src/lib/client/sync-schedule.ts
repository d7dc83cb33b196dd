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

/**
 * The wait before the next automatic sync, given how many entries wait, how many tries failed in a
 * row and, when the server said so (503 or 429 with Retry-After), how long it asked to be left
 * alone. The device never comes back before the server asked; the spread goes only later, so a
 * room of phones told the same time do not all return in the same second.
 */
export function nextSyncDelayMs(
	state: { pending: number; failures: number; retryAfterMs?: number | null },
	options: BackoffOptions = {}
): number {
	const { maxMs = SYNC_MAX_DELAY_MS, jitter = 0.2, random = Math.random } = options;
	if (state.failures > 0 && state.retryAfterMs != null) {
		const asked = Math.min(maxMs, state.retryAfterMs);
		const spread = asked * (1 + jitter * random());
		return Math.round(Math.min(maxMs, Math.max(spread, retryDelayMs(state.failures, options))));
	}
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

/**
 * How long a Retry-After header asks to wait, in ms: delay-seconds or an HTTP date (RFC 9110
 * §10.2.3). Null when absent or unreadable; a date in the past is 0.
 */
export function parseRetryAfter(value: string | null | undefined, nowMs: number): number | null {
	if (value == null) return null;
	const v = value.trim();
	if (/^\d+$/.test(v)) return Number(v) * 1000;
	if (!/[a-z]/i.test(v)) return null; // "-5", "1.5": neither form
	const at = Date.parse(v);
	if (Number.isNaN(at)) return null;
	return Math.max(0, at - nowMs);
}

/**
 * What the sync loop does with an answer to a batch of `size` entries that was not a success
 * (401 aside, which means signed out):
 * - `split`: send the halves on their own, so one entry the server cannot take is found and set
 *   aside while the rest go through — for 400 and 413 (the request was refused) and for a failure
 *   inside the server (500 and the other 5xx), which one bad entry can cause;
 * - `reject`: a single entry the server refused (400, 413): set it aside for a person;
 * - `suspect`: a single entry the server failed on: set it aside only when other entries went
 *   through in the same pass (the server works, this entry is the trouble), else wait and retry;
 * - `wait`: keep everything and try again later — the server is busy or not reached (502, 503,
 *   504 from a proxy or an overloaded server, 429) or refused for another reason (403, 404, …).
 */
export type RefusalAction = 'split' | 'reject' | 'suspect' | 'wait';

/** The action for HTTP `status` on a batch of `size` entries (see RefusalAction). */
export function refusalAction(status: number, size: number): RefusalAction {
	if (status === 400 || status === 413) return size > 1 ? 'split' : 'reject';
	if (status >= 500 && status <= 599 && ![502, 503, 504].includes(status)) {
		return size > 1 ? 'split' : 'suspect';
	}
	return 'wait';
}

/** The two halves of a batch being split (the first one the larger when the size is odd). */
export function halves<T>(items: readonly T[]): [T[], T[]] {
	const mid = Math.ceil(items.length / 2);
	return [items.slice(0, mid), items.slice(mid)];
}
