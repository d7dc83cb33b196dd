import bcrypt from 'bcryptjs';
import { and, asc, eq, gt, inArray, isNull, ne } from 'drizzle-orm';
import type { z } from 'zod';
import type { Role } from '../schemas/roles';
import { ROLES } from '../schemas/roles';
import {
	inviteSchema,
	newPasswordSchema,
	newUserSchema,
	rolesSchema,
	type NewUser
} from '../schemas/users';
import { inviteMail } from './auth-mail';
import { db, type Db } from './db';
import { signInSessions, userRoles, users } from './db/schema';
import { assertCan, type Actor } from './guard';
import { sendMail } from './mail';
import { liveSince, revokeUserSessions, touchSession } from './sessions';
import { createSignInLink, INVITE_LINK_MAX_AGE_S } from './sign-in-link';

/** bcrypt cost: about a quarter of a second per hash on a small server (measured, 2 cores). */
export const BCRYPT_ROUNDS = 12;

/** A rule of the user register was broken; `field` names the form field it belongs to. */
export class UserRuleError extends Error {
	constructor(
		message: string,
		readonly field?: string
	) {
		super(message);
		this.name = 'UserRuleError';
	}
}

/** A person as the admin list shows them. */
export interface UserSummary {
	id: string;
	email: string;
	name: string;
	roles: Role[];
	active: boolean;
	hasPassword: boolean;
	invitedAt: Date | null;
	/** Invited, and has not yet followed a sign-in link. */
	invitationPending: boolean;
	/** When last deactivated (kept after reactivation). */
	deactivatedAt: Date | null;
	createdAt: Date;
}

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];

/** Hashes a password with bcrypt. */
export function hashPassword(password: string): Promise<string> {
	return bcrypt.hash(password, BCRYPT_ROUNDS);
}

let dummyHash: Promise<string> | undefined;

/**
 * Compares a password with a stored hash. Without a hash it still spends one comparison, so an
 * unknown address takes as long as a known one and timing does not tell them apart.
 */
export async function verifyPassword(password: string, hash: string | null): Promise<boolean> {
	if (hash) return bcrypt.compare(password, hash);
	dummyHash ??= bcrypt.hash('nestmark-timing-equaliser', BCRYPT_ROUNDS);
	await bcrypt.compare(password, await dummyHash);
	return false;
}

const sortRoles = (roles: Role[]) => ROLES.filter((r) => roles.includes(r));

async function rolesOf(userIds: string[], q: Db | Tx = db): Promise<Map<string, Role[]>> {
	const map = new Map<string, Role[]>();
	if (!userIds.length) return map;
	const rows = await q
		.select({ userId: userRoles.userId, role: userRoles.role })
		.from(userRoles)
		.where(inArray(userRoles.userId, userIds));
	for (const { userId, role } of rows) map.set(userId, [...(map.get(userId) ?? []), role]);
	for (const [id, roles] of map) map.set(id, sortRoles(roles));
	return map;
}

/** What the sign-in check needs about an address, or undefined when nobody has it. */
export async function findForSignIn(email: string) {
	const [row] = await db
		.select({
			id: users.id,
			email: users.email,
			name: users.name,
			passwordHash: users.passwordHash,
			active: users.active
		})
		.from(users)
		.where(eq(users.email, email))
		.limit(1);
	return row;
}

/** True when an active person has this address (the e-mail link is sent only then). */
export async function isActiveEmail(email: string): Promise<boolean> {
	const row = await findForSignIn(email);
	return !!row?.active;
}

/**
 * The signed-in person for this request, read fresh from the database so that deactivation and
 * role changes take effect at once; null when the session is unknown, revoked or expired, or
 * the person is unknown or deactivated. One query: the session row, the person and their roles.
 * A session without an id (a JWT from before sessions were recorded) counts as signed out.
 */
export async function loadSessionUser(
	id: string,
	sessionId: string | undefined,
	now = new Date()
): Promise<Actor | null> {
	if (!sessionId) return null;
	const rows = await db
		.select({
			id: users.id,
			email: users.email,
			name: users.name,
			role: userRoles.role,
			lastSeenAt: signInSessions.lastSeenAt
		})
		.from(signInSessions)
		.innerJoin(users, eq(users.id, signInSessions.userId))
		.leftJoin(userRoles, eq(userRoles.userId, users.id))
		.where(
			and(
				eq(signInSessions.id, sessionId),
				eq(signInSessions.userId, id),
				isNull(signInSessions.revokedAt),
				gt(signInSessions.lastSeenAt, liveSince(now)),
				eq(users.active, true)
			)
		);
	const row = rows[0];
	if (!row?.email) return null;
	await touchSession(sessionId, row.lastSeenAt, now);
	const roles = sortRoles(rows.flatMap((r) => (r.role ? [r.role] : [])));
	return { id: row.id, email: row.email, name: row.name || row.email, roles, sessionId };
}

function toSummary(row: typeof users.$inferSelect, roles: Role[]): UserSummary {
	return {
		id: row.id,
		email: row.email ?? '',
		name: row.name || row.email || '',
		roles,
		active: row.active,
		hasPassword: !!row.passwordHash,
		invitedAt: row.invitedAt,
		invitationPending: !!row.invitedAt && !row.emailVerified,
		deactivatedAt: row.deactivatedAt,
		createdAt: row.createdAt
	};
}

/** Everyone, active first, then by name. */
export async function listUsers(): Promise<UserSummary[]> {
	const rows = await db.select().from(users).orderBy(asc(users.name), asc(users.email));
	const roles = await rolesOf(rows.map((r) => r.id));
	return rows
		.map((r) => toSummary(r, roles.get(r.id) ?? []))
		.sort((a, b) => Number(b.active) - Number(a.active));
}

/** One person, or undefined. */
export async function getUser(id: string): Promise<UserSummary | undefined> {
	const [row] = await db.select().from(users).where(eq(users.id, id)).limit(1);
	if (!row) return undefined;
	return toSummary(row, (await rolesOf([id])).get(id) ?? []);
}

/** Finds a person by e-mail address (normalised), or undefined. */
export async function getUserByEmail(email: string): Promise<UserSummary | undefined> {
	const [row] = await db
		.select({ id: users.id })
		.from(users)
		.where(eq(users.email, email.trim().toLowerCase()))
		.limit(1);
	return row ? getUser(row.id) : undefined;
}

async function insertUser(
	tx: Tx,
	input: z.output<typeof newUserSchema>,
	actor: Actor | undefined,
	invited: boolean
): Promise<string> {
	const [taken] = await tx
		.select({ id: users.id })
		.from(users)
		.where(eq(users.email, input.email))
		.limit(1);
	if (taken) {
		throw new UserRuleError('Someone with this e-mail address already has an account.', 'email');
	}
	const id = crypto.randomUUID();
	const now = new Date();
	await tx.insert(users).values({
		id,
		email: input.email,
		name: input.name,
		passwordHash: input.password ? await hashPassword(input.password) : null,
		active: true,
		invitedAt: invited ? now : null,
		invitedBy: invited ? (actor?.id ?? null) : null,
		createdAt: now
	});
	await tx
		.insert(userRoles)
		.values(
			input.roles.map((role) => ({ userId: id, role, grantedAt: now, grantedBy: actor?.id }))
		);
	return id;
}

/**
 * Creates a person with roles (and a password, if given). With an actor, the actor must be an
 * admin; without one the caller is trusted (the seed script).
 */
export async function createUser(input: NewUser, actor?: Actor): Promise<UserSummary> {
	if (actor) assertCan(actor, 'user.admin');
	const data = newUserSchema.parse(input);
	const id = await db.transaction((tx) => insertUser(tx, data, actor, false));
	return (await getUser(id))!;
}

/**
 * Creates the person and e-mails them a one-time sign-in link (valid for a week). All or
 * nothing: if the mail cannot be sent, the person is not created.
 */
export async function inviteUser(
	input: z.input<typeof inviteSchema>,
	actor: Actor,
	opts: { origin: string }
): Promise<UserSummary> {
	assertCan(actor, 'user.admin');
	const data = inviteSchema.parse(input);
	const id = await db.transaction(async (tx) => {
		const id = await insertUser(tx, data, actor, true);
		await mailInvitation(tx, data, actor, opts.origin);
		return id;
	});
	return (await getUser(id))!;
}

/** Sends a fresh invitation link to someone already on the list (lost or expired mail). */
export async function resendInvitation(
	userId: string,
	actor: Actor,
	opts: { origin: string }
): Promise<UserSummary> {
	assertCan(actor, 'user.admin');
	const user = await getUser(userId);
	if (!user) throw new UserRuleError('There is nobody with that id.');
	if (!user.active) throw new UserRuleError(`${user.name} is deactivated; reactivate them first.`);
	await db.transaction(async (tx) => {
		await tx
			.update(users)
			.set({ invitedAt: new Date(), invitedBy: actor.id })
			.where(eq(users.id, userId));
		await mailInvitation(tx, user, actor, opts.origin);
	});
	return (await getUser(userId))!;
}

async function mailInvitation(
	tx: Tx,
	user: { email: string; name: string; roles: readonly Role[] },
	actor: Actor,
	origin: string
): Promise<void> {
	const link = await createSignInLink(
		{ email: user.email, origin, maxAgeS: INVITE_LINK_MAX_AGE_S },
		tx
	);
	const mail = inviteMail({
		url: link.url,
		name: user.name,
		inviter: actor.name,
		roles: user.roles,
		maxAgeS: INVITE_LINK_MAX_AGE_S
	});
	await sendMail({ to: user.email, ...mail });
}

/**
 * Refuses a change that would leave Nestmark without an active admin. Locks the admin rows so
 * two admins demoting each other at the same moment cannot both succeed.
 */
async function assertAnotherAdmin(tx: Tx, userId: string, what: string): Promise<void> {
	const others = await tx
		.select({ userId: userRoles.userId })
		.from(userRoles)
		.innerJoin(users, eq(users.id, userRoles.userId))
		.where(and(eq(userRoles.role, 'admin'), eq(users.active, true), ne(userRoles.userId, userId)))
		.for('update');
	if (!others.length) {
		throw new UserRuleError(
			`You cannot ${what}: Nestmark needs at least one active admin. Make someone else an admin first.`,
			'roles'
		);
	}
}

async function requireUserRow(tx: Tx, userId: string) {
	const [row] = await tx.select().from(users).where(eq(users.id, userId)).limit(1).for('update');
	if (!row) throw new UserRuleError('There is nobody with that id.');
	return row;
}

/** The actor's own session, when they change something about themselves. */
const keepOwn = (actor: Actor, userId: string) =>
	actor.id === userId ? actor.sessionId : undefined;

/**
 * Sets a new password for the actor, who proves the current one first (if they have one).
 * Every other session of theirs ends: whoever may have learnt the old password is signed out.
 */
export async function changePassword(
	actor: Actor,
	input: { current: string; next: string }
): Promise<void> {
	const parsed = newPasswordSchema.safeParse(input.next);
	if (!parsed.success) {
		throw new UserRuleError(parsed.error.issues[0]?.message ?? 'Choose another password.', 'next');
	}
	const [row] = await db
		.select({ passwordHash: users.passwordHash })
		.from(users)
		.where(eq(users.id, actor.id))
		.limit(1);
	if (!row) throw new UserRuleError('There is nobody with that id.');
	if (row.passwordHash && !(await verifyPassword(input.current, row.passwordHash))) {
		throw new UserRuleError('That is not your current password.', 'current');
	}
	const hash = await hashPassword(parsed.data);
	await db.transaction(async (tx) => {
		await requireUserRow(tx, actor.id);
		await tx.update(users).set({ passwordHash: hash }).where(eq(users.id, actor.id));
		await revokeUserSessions(actor.id, tx, { keep: actor.sessionId });
	});
}

/** Replaces a person's roles with exactly `roles` (admin only; keeps at least one admin). */
export async function setRoles(userId: string, roles: Role[], actor: Actor): Promise<Role[]> {
	assertCan(actor, 'user.admin');
	const wanted = rolesSchema.parse(roles);
	await db.transaction(async (tx) => {
		const row = await requireUserRow(tx, userId);
		const current = (await rolesOf([userId], tx)).get(userId) ?? [];
		if (row.active && current.includes('admin') && !wanted.includes('admin')) {
			await assertAnotherAdmin(tx, userId, `remove the admin role from ${row.name || row.email}`);
		}
		const removed = current.filter((r) => !wanted.includes(r));
		const added = wanted.filter((r) => !current.includes(r));
		if (removed.length) {
			await tx
				.delete(userRoles)
				.where(and(eq(userRoles.userId, userId), inArray(userRoles.role, removed)));
		}
		if (added.length) {
			const now = new Date();
			await tx
				.insert(userRoles)
				.values(added.map((role) => ({ userId, role, grantedAt: now, grantedBy: actor.id })));
		}
		// A role change signs the person out everywhere, so no device carries on with pages or
		// an offline register prepared for the old roles. Admins changing their own roles keep
		// the session they are using.
		if (removed.length || added.length) {
			await revokeUserSessions(userId, tx, { keep: keepOwn(actor, userId) });
		}
	});
	return sortRoles(wanted);
}

/** Adds one role (no change if the person already holds it). */
export async function grantRole(userId: string, role: Role, actor: Actor): Promise<Role[]> {
	assertCan(actor, 'user.admin');
	const current = (await getUser(userId))?.roles;
	if (!current) throw new UserRuleError('There is nobody with that id.');
	return setRoles(userId, [...current, role], actor);
}

/** Removes one role; a person keeps at least one (deactivate them to remove all access). */
export async function revokeRole(userId: string, role: Role, actor: Actor): Promise<Role[]> {
	assertCan(actor, 'user.admin');
	const current = (await getUser(userId))?.roles;
	if (!current) throw new UserRuleError('There is nobody with that id.');
	const rest = current.filter((r) => r !== role);
	if (!rest.length) {
		throw new UserRuleError(
			'A person keeps at least one role. To remove all access, deactivate them instead.',
			'roles'
		);
	}
	return setRoles(userId, rest, actor);
}

/**
 * Stops a person from signing in, at once (their next request is signed out). Nothing they
 * recorded changes: entries stay attributed to them.
 */
export async function deactivate(userId: string, actor: Actor): Promise<void> {
	assertCan(actor, 'user.admin');
	if (userId === actor.id) {
		throw new UserRuleError('You cannot deactivate yourself. Ask another admin to do it.');
	}
	await db.transaction(async (tx) => {
		const row = await requireUserRow(tx, userId);
		if (!row.active) return;
		const roles = (await rolesOf([userId], tx)).get(userId) ?? [];
		if (roles.includes('admin')) {
			await assertAnotherAdmin(tx, userId, `deactivate ${row.name || row.email}`);
		}
		await tx
			.update(users)
			.set({ active: false, deactivatedAt: new Date() })
			.where(eq(users.id, userId));
		await revokeUserSessions(userId, tx);
	});
}

/**
 * Lets a deactivated person sign in again, with the roles they had. They sign in afresh: the
 * sessions deactivation revoked stay revoked. deactivatedAt is kept as "last deactivated".
 */
export async function reactivate(userId: string, actor: Actor): Promise<void> {
	assertCan(actor, 'user.admin');
	await db.transaction(async (tx) => {
		await requireUserRow(tx, userId);
		await tx.update(users).set({ active: true }).where(eq(users.id, userId));
	});
}
