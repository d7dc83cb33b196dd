import { and, eq, isNotNull, isNull, lt, ne, or } from 'drizzle-orm';
import { db, type Db } from './db';
import { signInSessions } from './db/schema';

/** How long a session lives without being used (Auth.js refreshes the cookie on every visit). */
export const SESSION_MAX_AGE_S = 30 * 24 * 60 * 60;

/**
 * last_seen_at is written at most this often per session: once per request would be a write on
 * every page view and every sync batch, for a figure nobody needs to the second.
 */
export const LAST_SEEN_STEP_MS = 5 * 60_000;

type Executor = Pick<Db, 'insert' | 'update' | 'delete'>;

/** Records a new sign-in of `userId` and returns the session id the JWT will carry. */
export async function startSession(userId: string, now = new Date()): Promise<string> {
	const id = crypto.randomUUID();
	await db.insert(signInSessions).values({ id, userId, createdAt: now, lastSeenAt: now });
	await pruneSessions(userId, now);
	return id;
}

/** Ends one session (signing out on one device); the person's other devices stay signed in. */
export async function revokeSession(id: string, now = new Date()): Promise<void> {
	await db
		.update(signInSessions)
		.set({ revokedAt: now })
		.where(and(eq(signInSessions.id, id), isNull(signInSessions.revokedAt)));
}

/**
 * Ends every session of a person (password or role change, deactivation), except `keep` (the
 * session of the person making their own change, if any). Pass the transaction that makes the
 * change, so the change and the sign-out happen together.
 */
export async function revokeUserSessions(
	userId: string,
	executor: Executor = db,
	opts: { keep?: string; now?: Date } = {}
): Promise<void> {
	const open = and(eq(signInSessions.userId, userId), isNull(signInSessions.revokedAt));
	await executor
		.update(signInSessions)
		.set({ revokedAt: opts.now ?? new Date() })
		.where(opts.keep ? and(open, ne(signInSessions.id, opts.keep)) : open);
}

/** Moves last_seen_at forward when it is older than LAST_SEEN_STEP_MS (a cheap keyed update). */
export async function touchSession(id: string, lastSeenAt: Date, now = new Date()): Promise<void> {
	if (now.getTime() - lastSeenAt.getTime() < LAST_SEEN_STEP_MS) return;
	await db
		.update(signInSessions)
		.set({ lastSeenAt: now })
		.where(and(eq(signInSessions.id, id), lt(signInSessions.lastSeenAt, now)));
}

/** The oldest last_seen_at a live session may have at `now`. */
export const liveSince = (now: Date) => new Date(now.getTime() - SESSION_MAX_AGE_S * 1000);

/** Deletes a person's sessions that are revoked or expired (housekeeping at each sign-in). */
async function pruneSessions(userId: string, now: Date): Promise<void> {
	await db
		.delete(signInSessions)
		.where(
			and(
				eq(signInSessions.userId, userId),
				or(isNotNull(signInSessions.revokedAt), lt(signInSessions.lastSeenAt, liveSince(now)))
			)
		);
}
