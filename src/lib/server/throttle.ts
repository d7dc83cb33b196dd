import { and, eq, inArray, isNull, lt, or, sql, type SQL } from 'drizzle-orm';
import { db } from './db';
import { signInThrottle } from './db/schema';

/** How many failures within `windowMs` lock a key, and for how long. */
export interface ThrottleLimit {
	failures: number;
	windowMs: number;
	lockMs: number;
}

const MINUTE = 60_000;

/**
 * Per account *and* network address: a person mistyping a few times is fine; guessing is not
 * (common practice). Keyed by the pair, so failures from one place never lock the account
 * for its owner somewhere else.
 */
export const PAIR_LIMIT: ThrottleLimit = {
	failures: 5,
	windowMs: 15 * MINUTE,
	lockMs: 15 * MINUTE
};
/** Per address: higher, because a whole shop floor may share one address behind NAT. */
export const ADDRESS_LIMIT: ThrottleLimit = {
	failures: 20,
	windowMs: 15 * MINUTE,
	lockMs: 15 * MINUTE
};

/**
 * Per account from everywhere: guessing spread over many addresses. This limit only delays —
 * after `freeFailures` within the window each attempt waits a while after the last failure,
 * doubling from `firstDelayMs` up to `maxDelayMs` — so nobody can lock an account's owner out,
 * at worst make them wait a minute, while a spread-out guesser gets about one try a minute
 * (common practice: exponential back-off with a cap).
 */
export const ACCOUNT_DELAY = {
	freeFailures: 10,
	windowMs: 60 * MINUTE,
	firstDelayMs: 1_000,
	maxDelayMs: 60_000
} as const;

/**
 * Sign-in link requests per e-mail address: each one sends mail, so a handful per quarter hour is
 * plenty for a person and stops anyone filling an inbox through the form (common practice).
 */
export const LINK_ACCOUNT_LIMIT: ThrottleLimit = {
	failures: 5,
	windowMs: 15 * MINUTE,
	lockMs: 15 * MINUTE
};
/** Sign-in link requests per network address (a shop floor may share one). */
export const LINK_ADDRESS_LIMIT: ThrottleLimit = {
	failures: 20,
	windowMs: 15 * MINUTE,
	lockMs: 15 * MINUTE
};

/** Who is trying to sign in: the address typed (normalised) and the client's network address. */
export interface Attempt {
	email: string;
	address: string;
}

/** The throttle key of an account (its delay, counted from every address). */
export const accountKey = (email: string) => `acct:${email}`.slice(0, 320);
/** The throttle key of an account tried from one network address (its lock). */
export const pairKey = (a: Attempt) => `pair:${a.address}|${a.email}`.slice(0, 320);
/** The throttle key of a network address. */
export const addressKey = (address: string) => `addr:${address}`.slice(0, 320);
/** The keys that count sign-in link requests (apart from password failures). */
const linkKeys = (a: Attempt) => [`link:${accountKey(a.email)}`, `link:${addressKey(a.address)}`];

const minutesUntil = (until: number, now: Date) =>
	until > now.getTime() ? Math.ceil((until - now.getTime()) / MINUTE) : 0;

/** Whether a password attempt may be checked now, and if not, how long to wait. */
export type Admission =
	{ kind: 'open' } | { kind: 'locked'; minutes: number } | { kind: 'wait'; seconds: number };

/**
 * Whether the attempt may be tried now: a lock of the (account, address) pair or of the address
 * (whole minutes), or the account's delay (seconds). Checked before the password, so a refused
 * attempt costs no hashing and says nothing about whether the account exists.
 */
export async function admission(attempt: Attempt, now = new Date()): Promise<Admission> {
	const rows = await db
		.select({ key: signInThrottle.key, lockedUntil: signInThrottle.lockedUntil })
		.from(signInThrottle)
		.where(
			inArray(signInThrottle.key, [
				pairKey(attempt),
				addressKey(attempt.address),
				accountKey(attempt.email)
			])
		);
	const until = (keys: string[]) =>
		Math.max(
			0,
			...rows.filter((r) => keys.includes(r.key)).map((r) => r.lockedUntil?.getTime() ?? 0)
		);
	const locked = minutesUntil(until([pairKey(attempt), addressKey(attempt.address)]), now);
	if (locked) return { kind: 'locked', minutes: locked };
	const delayedUntil = until([accountKey(attempt.email)]);
	if (delayedUntil > now.getTime()) {
		return { kind: 'wait', seconds: Math.ceil((delayedUntil - now.getTime()) / 1000) };
	}
	return { kind: 'open' };
}

/** Whole minutes until the attempt may be tried again for a lock (0 = not locked). */
export async function minutesLocked(attempt: Attempt, now = new Date()): Promise<number> {
	const a = await admission(attempt, now);
	return a.kind === 'locked' ? a.minutes : 0;
}

/** True for MariaDB's "deadlock, try again" answer. */
function isDeadlock(e: unknown): boolean {
	for (let c: unknown = e; c; c = (c as { cause?: unknown }).cause) {
		if ((c as { code?: string }).code === 'ER_LOCK_DEADLOCK') return true;
	}
	return false;
}

/**
 * Counts one failure against `key` in one atomic statement (several app processes may count at
 * once); returns the lock end if this failure set one. MariaDB applies the assignments left to
 * right, so `window_started_at` and `locked_until` see the new `failures`.
 */
async function countFailure(key: string, limit: ThrottleLimit, now: Date): Promise<Date | null> {
	const lockEnd = new Date(now.getTime() + limit.lockMs);
	return upsertFailure(
		key,
		limit.windowMs,
		limit.failures <= 1 ? lockEnd : null,
		sql`IF(failures >= ${limit.failures}, ${lockEnd}, NULL)`,
		now
	);
}

/**
 * Counts one failure against the account from any address and sets its delay: none for the
 * first ACCOUNT_DELAY.freeFailures, then firstDelayMs × 2^(n − free), at most maxDelayMs.
 */
async function countAccountFailure(email: string, now: Date): Promise<void> {
	const d = ACCOUNT_DELAY;
	const delay = sql`LEAST(${d.firstDelayMs} * POW(2, failures - ${d.freeFailures}), ${d.maxDelayMs})`;
	await upsertFailure(
		accountKey(email),
		d.windowMs,
		d.freeFailures <= 0 ? new Date(now.getTime() + d.firstDelayMs) : null,
		sql`IF(failures >= ${d.freeFailures}, ${now} + INTERVAL (${delay} * 1000) MICROSECOND, NULL)`,
		now
	);
}

/**
 * The one atomic statement behind every counter: insert the key, or add one failure (starting a
 * new window when the old one has passed) and set locked_until from `lockedUntil`, an SQL
 * expression that sees the new `failures`. Returns the key's lock end if it lies ahead.
 */
async function upsertFailure(
	key: string,
	windowMs: number,
	firstLock: Date | null,
	lockedUntil: SQL,
	now: Date
): Promise<Date | null> {
	const windowOpenSince = new Date(now.getTime() - windowMs);
	for (let attempt = 1; ; attempt++) {
		try {
			await db.execute(sql`
				INSERT INTO sign_in_throttle (throttle_key, failures, window_started_at, locked_until)
				VALUES (${key}, 1, ${now}, ${firstLock})
				ON DUPLICATE KEY UPDATE
					failures = IF(window_started_at > ${windowOpenSince}, failures + 1, 1),
					window_started_at = IF(failures = 1, ${now}, window_started_at),
					locked_until = ${lockedUntil}`);
			break;
		} catch (e) {
			// Two first failures for a new key can deadlock on the unique check; once more is enough.
			if (!isDeadlock(e) || attempt >= 3) throw e;
		}
	}
	const [row] = await db
		.select({ lockedUntil: signInThrottle.lockedUntil })
		.from(signInThrottle)
		.where(eq(signInThrottle.key, key));
	return row?.lockedUntil && row.lockedUntil > now ? row.lockedUntil : null;
}

/**
 * Records a failed attempt against the (account, address) pair, the address and the account;
 * returns whole minutes of the lock this failure started (0 if none). The account's delay is
 * read by the next attempt's admission.
 */
export async function recordFailure(attempt: Attempt, now = new Date()): Promise<number> {
	const [pair, address] = await Promise.all([
		countFailure(pairKey(attempt), PAIR_LIMIT, now),
		countFailure(addressKey(attempt.address), ADDRESS_LIMIT, now),
		countAccountFailure(attempt.email, now)
	]);
	return minutesUntil(Math.max(pair?.getTime() ?? 0, address?.getTime() ?? 0), now);
}

/**
 * A successful sign-in clears the pair's count. The address count stays (one valid account must
 * not reset the budget of someone guessing at others from the same address), and so does the
 * account's: its owner signing in must not hand a spread-out guesser a fresh set of free tries.
 */
export async function recordSuccess(attempt: Attempt): Promise<void> {
	await db.delete(signInThrottle).where(eq(signInThrottle.key, pairKey(attempt)));
	await pruneThrottle();
}

/**
 * Counts a request for a sign-in link by e-mail and by network address. Returns 0 when the link
 * may be sent, or the whole minutes until the next one may be asked for. The request that reaches
 * a limit is still sent; the ones after it wait. Every address is counted alike, known or not, so
 * the answer says nothing about who has an account.
 */
export async function countLinkRequest(attempt: Attempt, now = new Date()): Promise<number> {
	const rows = await db
		.select({ lockedUntil: signInThrottle.lockedUntil })
		.from(signInThrottle)
		.where(inArray(signInThrottle.key, linkKeys(attempt)));
	const locked = minutesUntil(Math.max(0, ...rows.map((r) => r.lockedUntil?.getTime() ?? 0)), now);
	if (locked) return locked;
	const [byEmail, byAddress] = linkKeys(attempt);
	await Promise.all([
		countFailure(byEmail, LINK_ACCOUNT_LIMIT, now),
		countFailure(byAddress, LINK_ADDRESS_LIMIT, now)
	]);
	return 0;
}

/** Deletes rows whose window and lock are both long over (housekeeping; safe at any time). */
export async function pruneThrottle(now = new Date()): Promise<void> {
	const horizon = new Date(
		now.getTime() - Math.max(PAIR_LIMIT.windowMs, ADDRESS_LIMIT.windowMs, ACCOUNT_DELAY.windowMs)
	);
	await db
		.delete(signInThrottle)
		.where(
			and(
				lt(signInThrottle.windowStartedAt, horizon),
				or(isNull(signInThrottle.lockedUntil), lt(signInThrottle.lockedUntil, now))
			)
		);
}
