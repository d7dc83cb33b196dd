import { createHash } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { ForbiddenError } from '$lib/server/guard';
import { closeMail, MailNotSentError } from '$lib/server/mail';
import {
	LAST_SEEN_STEP_MS,
	revokeSession,
	SESSION_MAX_AGE_S,
	startSession
} from '$lib/server/sessions';
import { authSecret } from '$lib/server/sign-in-link';
import * as people from '$lib/server/users';
import { closeDb, db, makeFixture, makeUser, resetDb, schema } from '../helpers/db';
import { firstLink, mailTo } from './mail';

// The invitation tests send real mail: `npm test` runs the fake SMTP server (scripts/mail-fake.ts)
// on SMTP_PORT and these tests read what it saved in MAIL_CAPTURE_DIR.
beforeAll(resetDb);
afterAll(async () => {
	closeMail();
	await closeDb();
});

const ORIGIN = 'http://127.0.0.1:3100';
let n = 0;
const address = (what: string) => `${what}-${Date.now().toString(36)}-${++n}@auth-test.example`;

describe('createUser', () => {
	it('stores a normalised address, the name, a bcrypt hash (never the password) and the roles', async () => {
		const email = address('Mixed.Case').toUpperCase();
		const made = await people.createUser({
			email: `  ${email} `,
			name: 'Wren Calloway',
			password: 'long-enough-pw',
			roles: ['technician', 'operator', 'technician']
		});
		expect(made.email).toBe(email.toLowerCase());
		expect(made.name).toBe('Wren Calloway');
		expect(made.roles).toEqual(['operator', 'technician']);
		expect(made.active).toBe(true);
		const [row] = await db.select().from(schema.users).where(eq(schema.users.id, made.id));
		expect(row.passwordHash).not.toContain('long-enough-pw');
		expect(await bcrypt.compare('long-enough-pw', row.passwordHash!)).toBe(true);
		expect(bcrypt.getRounds(row.passwordHash!)).toBe(people.BCRYPT_ROUNDS);
	});

	it('refuses a second account for the same address, whatever its case', async () => {
		const email = address('dup');
		await people.createUser({ email, name: 'First', roles: ['operator'] });
		await expect(
			people.createUser({ email: email.toUpperCase(), name: 'Second', roles: ['planner'] })
		).rejects.toMatchObject({ name: 'UserRuleError', field: 'email' });
	});

	it('lets only an admin create people when an actor is given', async () => {
		const sup = await makeUser({ roles: ['supervisor'] });
		await expect(
			people.createUser({ email: address('x'), name: 'X', roles: ['operator'] }, sup)
		).rejects.toBeInstanceOf(ForbiddenError);
		const admin = await makeUser({ roles: ['admin'] });
		const made = await people.createUser(
			{ email: address('y'), name: 'Y', roles: ['operator'] },
			admin
		);
		const [role] = await db
			.select()
			.from(schema.userRoles)
			.where(eq(schema.userRoles.userId, made.id));
		expect(role.grantedBy).toBe(admin.id);
	});

	it('refuses a short password and an empty role list', async () => {
		await expect(
			people.createUser({ email: address('s'), name: 'S', password: 'short', roles: ['operator'] })
		).rejects.toThrow(/at least 10/);
		await expect(people.createUser({ email: address('r'), name: 'R', roles: [] })).rejects.toThrow(
			/at least one role/
		);
	});
});

describe('verifyPassword', () => {
	it('accepts the right password and refuses a wrong one or a missing hash', async () => {
		const hash = await people.hashPassword('correct horse');
		expect(await people.verifyPassword('correct horse', hash)).toBe(true);
		expect(await people.verifyPassword('correct horsf', hash)).toBe(false);
		expect(await people.verifyPassword('correct horse', null)).toBe(false);
	});
});

describe('roles', () => {
	it('setRoles replaces the roles and the session user sees them at once', async () => {
		const admin = await makeUser({ roles: ['admin'] });
		const p = await makeUser({ roles: ['operator'] });
		expect(await people.setRoles(p.id, ['planner', 'technician'], admin)).toEqual([
			'technician',
			'planner'
		]);
		// The old session ended with the change; a new sign-in sees the new roles.
		const sid = await startSession(p.id);
		expect((await people.loadSessionUser(p.id, sid))?.roles).toEqual(['technician', 'planner']);
	});

	it('a role change ends every session of the person, and only when something changed', async () => {
		const admin = await makeUser({ roles: ['admin'] });
		const p = await makeUser({ roles: ['operator'] });
		const [phone, laptop] = [await startSession(p.id), await startSession(p.id)];
		const adminSession = await startSession(admin.id);
		await people.setRoles(p.id, ['operator'], admin); // no change: nobody is signed out
		expect(await people.loadSessionUser(p.id, phone)).not.toBeNull();
		await people.setRoles(p.id, ['operator', 'technician'], admin);
		expect(await people.loadSessionUser(p.id, phone)).toBeNull();
		expect(await people.loadSessionUser(p.id, laptop)).toBeNull();
		// The admin who made the change is not signed out.
		expect(await people.loadSessionUser(admin.id, adminSession)).not.toBeNull();
	});

	it('admins changing their own roles keep the session they use, and lose the others', async () => {
		const a = await makeUser({ roles: ['admin'] });
		const [mine, other] = [await startSession(a.id), await startSession(a.id)];
		const me = { ...(await people.loadSessionUser(a.id, mine))! };
		await people.grantRole(a.id, 'planner', me);
		expect((await people.loadSessionUser(a.id, mine))?.roles).toEqual(['planner', 'admin']);
		expect(await people.loadSessionUser(a.id, other)).toBeNull();
	});

	it('grantRole and revokeRole change one role; the last role cannot be revoked', async () => {
		const admin = await makeUser({ roles: ['admin'] });
		const p = await makeUser({ roles: ['operator'] });
		expect(await people.grantRole(p.id, 'supervisor', admin)).toEqual(['operator', 'supervisor']);
		expect(await people.revokeRole(p.id, 'operator', admin)).toEqual(['supervisor']);
		await expect(people.revokeRole(p.id, 'supervisor', admin)).rejects.toThrow(/at least one role/);
	});

	it('only admins change roles', async () => {
		const sup = await makeUser({ roles: ['supervisor', 'planner'] });
		const p = await makeUser({ roles: ['operator'] });
		await expect(people.setRoles(p.id, ['admin'], sup)).rejects.toBeInstanceOf(ForbiddenError);
		await expect(people.grantRole(p.id, 'admin', sup)).rejects.toBeInstanceOf(ForbiddenError);
		expect((await people.getUser(p.id))?.roles).toEqual(['operator']);
	});
});

describe('the last active admin', () => {
	beforeEach(resetDb);

	it('cannot remove their own admin role, but can once another admin exists', async () => {
		const a = await makeUser({ roles: ['admin', 'supervisor'] });
		await expect(people.setRoles(a.id, ['supervisor'], a)).rejects.toThrow(
			/at least one active admin/
		);
		await expect(people.revokeRole(a.id, 'admin', a)).rejects.toThrow(/at least one active admin/);
		expect((await people.getUser(a.id))?.roles).toContain('admin');

		const b = await makeUser({ roles: ['operator'] });
		await people.grantRole(b.id, 'admin', a);
		expect(await people.setRoles(a.id, ['supervisor'], a)).toEqual(['supervisor']);
	});

	it('a deactivated admin does not count as the other admin', async () => {
		const a = await makeUser({ roles: ['admin'] });
		await makeUser({ roles: ['admin'], active: false });
		await expect(people.setRoles(a.id, ['operator'], a)).rejects.toThrow(
			/at least one active admin/
		);
	});

	it('two admins may demote each other only one at a time', async () => {
		const a = await makeUser({ roles: ['admin', 'operator'] });
		const b = await makeUser({ roles: ['admin', 'operator'] });
		const results = await Promise.allSettled([
			people.setRoles(b.id, ['operator'], a),
			people.setRoles(a.id, ['operator'], b)
		]);
		expect(results.filter((r) => r.status === 'fulfilled')).toHaveLength(1);
		const admins = await db
			.select()
			.from(schema.userRoles)
			.where(eq(schema.userRoles.role, 'admin'));
		expect(admins).toHaveLength(1);
	});
});

describe('deactivate and reactivate', () => {
	it('signs the person out at once and keeps their entries attributed', async () => {
		const admin = await makeUser({ roles: ['admin'] });
		const p = await makeUser({ roles: ['supervisor'], name: 'Ines Brandt' });
		const fixture = await makeFixture({ createdBy: p.id });
		const before = await startSession(p.id);
		expect(await people.loadSessionUser(p.id, before)).not.toBeNull();
		// A token from before sessions were recorded carries no id: signed out.
		expect(await people.loadSessionUser(p.id, undefined)).toBeNull();

		await people.deactivate(p.id, admin);
		expect(await people.loadSessionUser(p.id, before)).toBeNull();
		const summary = await people.getUser(p.id);
		expect(summary).toMatchObject({ active: false, name: 'Ines Brandt', roles: ['supervisor'] });
		expect(summary?.deactivatedAt).toBeInstanceOf(Date);
		const [f] = await db.select().from(schema.fixtures).where(eq(schema.fixtures.id, fixture.id));
		expect(f.createdBy).toBe(p.id);

		await people.reactivate(p.id, admin);
		expect((await people.getUser(p.id))?.active).toBe(true);
		// A session from before the deactivation stays dead; a new sign-in works.
		expect(await people.loadSessionUser(p.id, before)).toBeNull();
		const fresh = await startSession(p.id);
		expect((await people.loadSessionUser(p.id, fresh))?.roles).toEqual(['supervisor']);
	});

	it('refuses deactivating yourself, and non-admins', async () => {
		const admin = await makeUser({ roles: ['admin'] });
		const other = await makeUser({ roles: ['admin'] });
		await expect(people.deactivate(admin.id, admin)).rejects.toThrow(/cannot deactivate yourself/);
		const sup = await makeUser({ roles: ['supervisor'] });
		await expect(people.deactivate(other.id, sup)).rejects.toBeInstanceOf(ForbiddenError);
		await expect(people.reactivate(other.id, sup)).rejects.toBeInstanceOf(ForbiddenError);
		expect((await people.getUser(other.id))?.active).toBe(true);
	});

	it('refuses a person who does not exist', async () => {
		const admin = await makeUser({ roles: ['admin'] });
		await expect(people.deactivate('no-such-id', admin)).rejects.toThrow(/nobody with that id/);
	});
});

describe('sessions', () => {
	it('signing out ends that session only; the person’s other devices stay signed in', async () => {
		const p = await makeUser({ roles: ['technician'] });
		const [phone, tablet] = [await startSession(p.id), await startSession(p.id)];
		await revokeSession(phone);
		expect(await people.loadSessionUser(p.id, phone)).toBeNull();
		expect((await people.loadSessionUser(p.id, tablet))?.sessionId).toBe(tablet);
	});

	it('refuses a session id that belongs to someone else, or that nobody made', async () => {
		const p = await makeUser({ roles: ['technician'] });
		const q = await makeUser({ roles: ['technician'] });
		const theirs = await startSession(q.id);
		expect(await people.loadSessionUser(p.id, theirs)).toBeNull();
		expect(await people.loadSessionUser(p.id, crypto.randomUUID())).toBeNull();
	});

	it('expires a session unused for longer than the cookie lives', async () => {
		const p = await makeUser({ roles: ['technician'] });
		const t0 = new Date();
		const sid = await startSession(p.id, t0);
		const later = new Date(t0.getTime() + SESSION_MAX_AGE_S * 1000 + 1000);
		expect(await people.loadSessionUser(p.id, sid, later)).toBeNull();
	});

	it('notes when a session was last used, at most every few minutes', async () => {
		const p = await makeUser({ roles: ['technician'] });
		const t0 = new Date(Date.now() - 60 * 60_000);
		const sid = await startSession(p.id, t0);
		const seen = async () =>
			(
				await db.select().from(schema.signInSessions).where(eq(schema.signInSessions.id, sid))
			)[0].lastSeenAt.getTime();
		await people.loadSessionUser(p.id, sid, new Date(t0.getTime() + 60_000));
		expect(await seen()).toBe(t0.getTime());
		const now = new Date(t0.getTime() + LAST_SEEN_STEP_MS + 1000);
		await people.loadSessionUser(p.id, sid, now);
		expect(await seen()).toBe(now.getTime());
	});

	it('a password change ends every other session and needs the current password', async () => {
		const p = await makeUser({ roles: ['technician'] });
		await db
			.update(schema.users)
			.set({ passwordHash: await people.hashPassword('the-old-password') })
			.where(eq(schema.users.id, p.id));
		const [here, elsewhere] = [await startSession(p.id), await startSession(p.id)];
		const me = (await people.loadSessionUser(p.id, here))!;
		await expect(
			people.changePassword(me, { current: 'not-it-at-all', next: 'a-brand-new-pass' })
		).rejects.toThrow(/not your current password/);
		await expect(
			people.changePassword(me, { current: 'the-old-password', next: 'short' })
		).rejects.toThrow(/at least 10/);
		expect(await people.loadSessionUser(p.id, elsewhere)).not.toBeNull();

		await people.changePassword(me, { current: 'the-old-password', next: 'a-brand-new-pass' });
		expect(await people.loadSessionUser(p.id, elsewhere)).toBeNull();
		expect(await people.loadSessionUser(p.id, here)).not.toBeNull();
		const [row] = await db.select().from(schema.users).where(eq(schema.users.id, p.id));
		expect(await people.verifyPassword('a-brand-new-pass', row.passwordHash)).toBe(true);
	});
});

describe('inviteUser', () => {
	it('creates the person with roles and mails a one-time sign-in link in Auth.js form', async () => {
		const admin = await makeUser({ roles: ['admin'], name: 'Ada Admin' });
		const email = address('invitee');
		const made = await people.inviteUser(
			{ email, name: 'Noor Haddad', roles: ['technician'] },
			admin,
			{ origin: ORIGIN }
		);
		expect(made).toMatchObject({
			email,
			roles: ['technician'],
			invitationPending: true,
			hasPassword: false
		});
		const [row] = await db.select().from(schema.users).where(eq(schema.users.id, made.id));
		expect(row.invitedBy).toBe(admin.id);

		const mails = await mailTo(email);
		expect(mails).toHaveLength(1);
		expect(mails[0].subject).toBe('You have been invited to Nestmark');
		expect(mails[0].text).toContain('Ada Admin');
		const link = new URL(firstLink(mails[0].text)!);
		expect(link.origin + link.pathname).toBe(`${ORIGIN}/auth/callback/nodemailer`);
		expect(link.searchParams.get('email')).toBe(email);

		// Auth.js looks the token up as sha256(token + secret); so must the stored row be.
		const token = link.searchParams.get('token')!;
		const stored = await db
			.select()
			.from(schema.verificationTokens)
			.where(eq(schema.verificationTokens.identifier, email));
		expect(stored).toHaveLength(1);
		expect(stored[0].token).toBe(
			createHash('sha256')
				.update(token + authSecret())
				.digest('hex')
		);
		const days = (stored[0].expires.getTime() - Date.now()) / 86_400_000;
		expect(days).toBeGreaterThan(6.9);
		expect(days).toBeLessThanOrEqual(7);
	});

	it('adds nobody when the mail cannot be sent', async () => {
		const admin = await makeUser({ roles: ['admin'] });
		const email = address('unreachable');
		const saved = process.env.SMTP_PORT;
		process.env.SMTP_PORT = '9'; // discard port: nothing listens there
		closeMail();
		try {
			await expect(
				people.inviteUser({ email, name: 'Lost Mail', roles: ['operator'] }, admin, {
					origin: ORIGIN
				})
			).rejects.toBeInstanceOf(MailNotSentError);
		} finally {
			process.env.SMTP_PORT = saved;
			closeMail();
		}
		expect(await people.getUserByEmail(email)).toBeUndefined();
		const tokens = await db
			.select()
			.from(schema.verificationTokens)
			.where(eq(schema.verificationTokens.identifier, email));
		expect(tokens).toHaveLength(0);
	});

	it('refuses an address that already has an account, and non-admins', async () => {
		const admin = await makeUser({ roles: ['admin'] });
		const existing = await makeUser({ roles: ['operator'] });
		await expect(
			people.inviteUser({ email: existing.email, name: 'Again', roles: ['operator'] }, admin, {
				origin: ORIGIN
			})
		).rejects.toMatchObject({ field: 'email' });
		const planner = await makeUser({ roles: ['planner'] });
		await expect(
			people.inviteUser({ email: address('p'), name: 'P', roles: ['operator'] }, planner, {
				origin: ORIGIN
			})
		).rejects.toBeInstanceOf(ForbiddenError);
	});
});
