import {
	CredentialsSignin,
	SvelteKitAuth,
	type Session,
	type SvelteKitAuthConfig
} from '@auth/sveltekit';
import { DrizzleAdapter } from '@auth/drizzle-adapter';
import Credentials from '@auth/sveltekit/providers/credentials';
import Nodemailer from '@auth/sveltekit/providers/nodemailer';
import type { RequestEvent } from '@sveltejs/kit';
import { passwordSignInSchema } from '../schemas/users';
import { signInMail } from './auth-mail';
import { getDb } from './db';
import { accounts, sessions, users, verificationTokens } from './db/schema';
import { mailFrom, sendMail } from './mail';
import { authSecret, EMAIL_PROVIDER_ID, SIGN_IN_LINK_MAX_AGE_S } from './sign-in-link';
import { minutesLocked, recordFailure, recordSuccess } from './throttle';
import { findForSignIn, isActiveEmail, verifyPassword } from './users';

/**
 * Why a password sign-in was refused, as the `code` Auth.js passes on. Codes never say whether
 * an account exists: a deactivated account is named only after its correct password.
 */
export type RefusalCode = 'wrong' | 'inactive' | `locked-${number}`;

class SignInRefused extends CredentialsSignin {
	constructor(code: RefusalCode) {
		super();
		this.code = code;
	}
}

/** The session as the handle reads it: Auth.js's, plus when it began (ms). */
export type SessionWithStart = Session & { signedInAt?: number };

/** Errors that are expected answers to people, not faults worth a stack trace in the log. */
const QUIET_ERRORS = new Set(['CredentialsSignin', 'AccessDenied', 'Verification']);

let adapter: ReturnType<typeof DrizzleAdapter> | undefined;

/** The client's address for throttling; falls back to a shared bucket if the platform has none. */
export function clientAddress(event: Pick<RequestEvent, 'getClientAddress'>): string {
	try {
		return event.getClientAddress();
	} catch {
		return 'unknown';
	}
}

/** Checks e-mail + password with throttling; returns the user or throws a SignInRefused. */
async function authorizePassword(raw: unknown, address: string) {
	const parsed = passwordSignInSchema.safeParse(raw);
	if (!parsed.success) throw new SignInRefused('wrong');
	const { email, password } = parsed.data;
	const attempt = { email, address };

	const locked = await minutesLocked(attempt);
	if (locked) throw new SignInRefused(`locked-${locked}`);

	const row = await findForSignIn(email);
	// verifyPassword spends one bcrypt comparison even without a hash (timing-equalised).
	const ok = await verifyPassword(password, row?.passwordHash ?? null);
	if (!ok || !row?.email) {
		const lock = await recordFailure(attempt);
		throw new SignInRefused(lock ? `locked-${lock}` : 'wrong');
	}
	if (!row.active) throw new SignInRefused('inactive');
	await recordSuccess(attempt);
	return { id: row.id, email: row.email, name: row.name || row.email };
}

/** The Auth.js configuration for one request (the credentials check needs the client address). */
function authConfig(event: RequestEvent): SvelteKitAuthConfig {
	adapter ??= DrizzleAdapter(getDb(), {
		usersTable: users,
		accountsTable: accounts,
		sessionsTable: sessions,
		verificationTokensTable: verificationTokens
	});
	const verifyRequestUrl = `${event.url.origin}/auth/verify-request?provider=${EMAIL_PROVIDER_ID}&type=email`;

	return {
		adapter,
		secret: authSecret(),
		trustHost: true,
		basePath: '/auth',
		// Credentials sign-in works only with JWT sessions in Auth.js.
		session: { strategy: 'jwt' },
		pages: { signIn: '/signin', error: '/signin', verifyRequest: '/signin/check-mail' },
		providers: [
			Credentials({
				id: 'credentials',
				credentials: { email: { label: 'E-mail' }, password: { label: 'Password' } },
				authorize: (credentials) => authorizePassword(credentials, clientAddress(event))
			}),
			Nodemailer({
				id: EMAIL_PROVIDER_ID,
				// Unused (sendVerificationRequest below sends through our own transport), but required.
				server: {
					host: process.env.SMTP_HOST ?? '127.0.0.1',
					port: Number(process.env.SMTP_PORT ?? 2525)
				},
				from: mailFrom(),
				maxAge: SIGN_IN_LINK_MAX_AGE_S,
				async sendVerificationRequest({ identifier, url }) {
					// The signIn callback already stops unknown addresses; this is the second lock.
					if (!(await isActiveEmail(identifier))) return;
					// Not awaited: an unknown address gets no mail, so waiting for the mail server
					// would let response times tell known addresses from unknown ones.
					sendMail({ to: identifier, ...signInMail(url, SIGN_IN_LINK_MAX_AGE_S) }).catch((e) =>
						console.error('[auth] sign-in link not sent:', e)
					);
				}
			})
		],
		callbacks: {
			async signIn({ user, account, email }) {
				if (account?.provider === 'credentials') return true; // authorizePassword decided
				if (account?.type !== 'email') return false;
				const active = !!user.email && (await isActiveEmail(user.email));
				// An unknown address gets exactly the answer a known one gets, but no mail.
				if (email?.verificationRequest) return active || verifyRequestUrl;
				return active; // a link clicked after deactivation no longer signs in
			},
			jwt({ token, user }) {
				if (user) {
					// Kept through every refresh of the token (unlike iat), so the handle can refuse
					// sessions that began before a deactivation.
					token.signedInAt = Date.now();
					token.sub = user.id;
					token.email = user.email;
					// People who only ever signed in by link may have no name.
					token.name = user.name || user.email;
				}
				return token;
			},
			session({ session, token }) {
				if (token.sub) session.user.id = token.sub;
				if (typeof token.signedInAt === 'number') {
					(session as SessionWithStart).signedInAt = token.signedInAt;
				}
				session.user.email = token.email ?? session.user.email;
				session.user.name = token.name || token.email || session.user.name;
				return session;
			}
		},
		logger: {
			error(error) {
				const type = (error as { type?: string }).type ?? error.name;
				if (QUIET_ERRORS.has(type)) return;
				console.error('[auth]', error);
			}
		}
	};
}

/** Auth.js for SvelteKit: the handle for /auth/**, and signIn/signOut for form actions. */
export const {
	handle: authHandle,
	signIn,
	signOut
} = SvelteKitAuth(async (event) => authConfig(event));
