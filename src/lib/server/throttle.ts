import { and, eq, inArray, isNull, lt, or, sql } from 'drizzle-orm';
import { db } from './db';
import { signInThrottle } from './db/schema';

/** How many failures within `windowMs` lock a key, and for how long. */
export interface ThrottleLimit {
	failures: number;
	windowMs: number;
	lockMs: number;
}

const MINUTE = 60_000;

/** Per account: a person mistyping a few times is fine; guessing is not (common practice). */
export const ACCOUNT_LIMIT: ThrottleLimit = {
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

/** The throttle key of an account. */
export const accountKey = (email: string) => `acct:${email}`.slice(0, 320);
/** The throttle key of a network address. */
export const addressKey = (address: string) => `addr:${address}`.slice(0, 320);
/** The keys that count sign-in link requests (apart from password failures). */
const linkKeys = (a: Attempt) => [`link:${accountKey(a.email)}`, `link:${addressKey(a.address)}`];

const minutesUntil = (until: number, now: Date) =>
	until > now.getTime() ? Math.ceil((until - now.getTime()) / MINUTE) : 0;

/**
 * Whole minutes until the attempt may be tried again (0 = not locked). Checked before the
 * password, so a locked account costs no hashing and says nothing about whether it exists.
 */
export async function minutesLocked(attempt: Attempt, now = new Date()): Promise<number> {
	const rows = await db
		.select({ lockedUntil: signInThrottle.lockedUntil })
		.from(signInThrottle)
		.where(inArray(signInThrottle.key, [accountKey(attempt.email), addressKey(attempt.address)]));
	const until = Math.max(0, ...rows.map((r) => r.lockedUntil?.getTime() ?? 0));
	return minutesUntil(until, now);
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
	const windowOpenSince = new Date(now.getTime() - limit.windowMs);
	const lockEnd = new Date(now.getTime() + limit.lockMs);
	const firstLock = limit.failures <= 1 ? lockEnd : null;
	for (let attempt = 1; ; attempt++) {
		try {
			await db.execute(sql`
				INSERT INTO sign_in_throttle (throttle_key, failures, window_started_at, locked_until)
				VALUES (${key}, 1, ${now}, ${firstLock})
				ON DUPLICATE KEY UPDATE
					failures = IF(window_started_at > ${windowOpenSince}, failures + 1, 1),
					window_started_at = IF(failures = 1, ${now}, window_started_at),
					locked_until = IF(failures >= ${limit.failures}, ${lockEnd}, NULL)`);
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
 * Records a failed attempt against the account and the address; returns whole minutes of the
 * lock this failure started (0 if none).
 */
export async function recordFailure(attempt: Attempt, now = new Date()): Promise<number> {
	const locks = await Promise.all([
		countFailure(accountKey(attempt.email), ACCOUNT_LIMIT, now),
		countFailure(addressKey(attempt.address), ADDRESS_LIMIT, now)
	]);
	const until = Math.max(0, ...locks.map((d) => d?.getTime() ?? 0));
	return minutesUntil(until, now);
}

/**
 * A successful sign-in clears the account's count. The address count stays: one valid account
 * must not reset the budget of someone guessing at others from the same address.
 */
export async function recordSuccess(attempt: Attempt): Promise<void> {
	await db.delete(signInThrottle).where(eq(signInThrottle.key, accountKey(attempt.email)));
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
		now.getTime() - Math.max(ACCOUNT_LIMIT.windowMs, ADDRESS_LIMIT.windowMs)
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
