import {
	boolean,
	datetime,
	index,
	int,
	mysqlEnum,
	mysqlTable,
	primaryKey,
	timestamp,
	varchar
} from 'drizzle-orm/mysql-core';
import { ROLES } from '../../../schemas/roles';

/**
 * People who sign in. The first five columns are the shape the Auth.js Drizzle adapter expects;
 * the rest are Nestmark's. Users are deactivated, never deleted, so their entries stay attributed.
 */
export const users = mysqlTable('users', {
	id: varchar('id', { length: 255 })
		.primaryKey()
		.$defaultFn(() => crypto.randomUUID()),
	name: varchar('name', { length: 255 }),
	email: varchar('email', { length: 255 }).unique(),
	emailVerified: timestamp('email_verified', { mode: 'date', fsp: 3 }),
	image: varchar('image', { length: 255 }),
	/** bcrypt hash; null for people who only sign in by e-mail link. */
	passwordHash: varchar('password_hash', { length: 255 }),
	active: boolean('active').notNull().default(true),
	invitedAt: datetime('invited_at', { mode: 'date', fsp: 3 }),
	invitedBy: varchar('invited_by', { length: 255 }),
	deactivatedAt: datetime('deactivated_at', { mode: 'date', fsp: 3 }),
	createdAt: datetime('created_at', { mode: 'date', fsp: 3 })
		.notNull()
		.$defaultFn(() => new Date())
});

/** Roles a user holds; a person may hold several. */
export const userRoles = mysqlTable(
	'user_roles',
	{
		userId: varchar('user_id', { length: 255 })
			.notNull()
			.references(() => users.id, { onDelete: 'cascade' }),
		role: mysqlEnum('role', ROLES).notNull(),
		grantedAt: datetime('granted_at', { mode: 'date', fsp: 3 })
			.notNull()
			.$defaultFn(() => new Date()),
		grantedBy: varchar('granted_by', { length: 255 })
	},
	(t) => [primaryKey({ columns: [t.userId, t.role] })]
);

/** Auth.js: linked sign-in accounts (one per provider). */
export const accounts = mysqlTable(
	'auth_accounts',
	{
		userId: varchar('user_id', { length: 255 })
			.notNull()
			.references(() => users.id, { onDelete: 'cascade' }),
		type: varchar('type', { length: 255 })
			.$type<'email' | 'oidc' | 'oauth' | 'webauthn'>()
			.notNull(),
		provider: varchar('provider', { length: 255 }).notNull(),
		providerAccountId: varchar('provider_account_id', { length: 255 }).notNull(),
		refresh_token: varchar('refresh_token', { length: 255 }),
		access_token: varchar('access_token', { length: 255 }),
		expires_at: int('expires_at'),
		token_type: varchar('token_type', { length: 255 }),
		scope: varchar('scope', { length: 255 }),
		id_token: varchar('id_token', { length: 2048 }),
		session_state: varchar('session_state', { length: 255 })
	},
	(t) => [primaryKey({ columns: [t.provider, t.providerAccountId] })]
);

/** Auth.js: database sessions (unused with JWT sessions, but the adapter requires the table). */
export const sessions = mysqlTable('auth_sessions', {
	sessionToken: varchar('session_token', { length: 255 }).primaryKey(),
	userId: varchar('user_id', { length: 255 })
		.notNull()
		.references(() => users.id, { onDelete: 'cascade' }),
	expires: timestamp('expires', { mode: 'date' }).notNull()
});

/** Auth.js: one-time tokens of e-mail sign-in links (and invitations). */
export const verificationTokens = mysqlTable(
	'auth_verification_tokens',
	{
		identifier: varchar('identifier', { length: 255 }).notNull(),
		token: varchar('token', { length: 255 }).notNull(),
		expires: timestamp('expires', { mode: 'date' }).notNull()
	},
	(t) => [primaryKey({ columns: [t.identifier, t.token] })]
);

/**
 * Failed sign-in counters, keyed per account ("acct:<email>") and per address ("addr:<ip>").
 * Kept in the database so several app processes share one limit.
 */
export const signInThrottle = mysqlTable(
	'sign_in_throttle',
	{
		key: varchar('throttle_key', { length: 320 }).primaryKey(),
		failures: int('failures').notNull().default(0),
		windowStartedAt: datetime('window_started_at', { mode: 'date', fsp: 3 }).notNull(),
		lockedUntil: datetime('locked_until', { mode: 'date', fsp: 3 })
	},
	(t) => [index('sign_in_throttle_locked_idx').on(t.lockedUntil)]
);

/**
 * One row per sign-in (a phone, a laptop, a browser): its id travels in the session JWT and is
 * checked on every request in the same query that loads the person. A table rather than one
 * "session version" per person, so signing out on one phone ends that phone's session only,
 * while a password change, a role change or a deactivation ends all of the person's sessions.
 * Rows are kept after revocation until they are long expired (see $lib/server/sessions).
 */
export const signInSessions = mysqlTable(
	'sign_in_sessions',
	{
		id: varchar('id', { length: 36 }).primaryKey(),
		userId: varchar('user_id', { length: 255 })
			.notNull()
			.references(() => users.id, { onDelete: 'cascade' }),
		createdAt: datetime('created_at', { mode: 'date', fsp: 3 }).notNull(),
		/** Updated at most every few minutes, not on every request (see touchSession). */
		lastSeenAt: datetime('last_seen_at', { mode: 'date', fsp: 3 }).notNull(),
		revokedAt: datetime('revoked_at', { mode: 'date', fsp: 3 })
	},
	(t) => [index('sign_in_sessions_user_idx').on(t.userId)]
);
