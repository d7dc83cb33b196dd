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
import { signInMail } from './auth-mail';
import { config } from './config';
import { getDb } from './db';
import { accounts, sessions, users, verificationTokens } from './db/schema';
import { mailFrom, sendMail } from './mail';
import { publicOrigin, sameOriginRedirect } from './origin';
import { checkPasswordSignIn, type RefusalCode } from './password-sign-in';
import { revokeSession, SESSION_MAX_AGE_S, startSession } from './sessions';
import { authSecret, EMAIL_PROVIDER_ID, SIGN_IN_LINK_MAX_AGE_S } from './sign-in-link';
import { isActiveEmail } from './users';

class SignInRefused extends CredentialsSignin {
	constructor(code: RefusalCode) {
		super();
		this.code = code;
	}
}

/** The session as the handle reads it: Auth.js's, plus the id of its row in sign_in_sessions. */
export type SessionWithId = Session & { sessionId?: string };

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
	const result = await checkPasswordSignIn(raw, address);
	if (!result.ok) throw new SignInRefused(result.code);
	return result.user;
}

/** The Auth.js configuration for one request (the credentials check needs the client address). */
function authConfig(event: RequestEvent): SvelteKitAuthConfig {
	adapter ??= DrizzleAdapter(getDb(), {
		usersTable: users,
		accountsTable: accounts,
		sessionsTable: sessions,
		verificationTokensTable: verificationTokens
	});
	// Never the request's Host or X-Forwarded-Host (see $lib/server/origin).
	const origin = publicOrigin(event.url.origin);
	const verifyRequestUrl = `${origin}/auth/verify-request?provider=${EMAIL_PROVIDER_ID}&type=email`;

	return {
		adapter,
		secret: authSecret(),
		trustHost: true,
		basePath: '/auth',
		// Credentials sign-in works only with JWT sessions in Auth.js.
		session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_S },
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
				server: { host: config().smtp.host, port: config().smtp.port },
				from: mailFrom(),
				maxAge: SIGN_IN_LINK_MAX_AGE_S,
				async sendVerificationRequest({ identifier, url }) {
					// The signIn callback already stops unknown addresses; this is the second lock.
					if (!(await isActiveEmail(identifier))) return;
					// Auth.js built `url` from headers pinned to ORIGIN (pinOrigin in hooks); put it
					// on ORIGIN once more, so no header handling upstream can ever change where a
					// genuine token is sent.
					const link = new URL(url);
					url = `${origin}${link.pathname}${link.search}`;
					// Not awaited: an unknown address gets no mail, so waiting for the mail server
					// would let response times tell known addresses from unknown ones.
					sendMail({ to: identifier, ...signInMail(url, SIGN_IN_LINK_MAX_AGE_S) }).catch((e) =>
						console.error('[auth] sign-in link not sent:', e)
					);
				}
			})
		],
		events: {
			// Auth.js's own sign-out (POST /auth/signout) ends the session's row too; the sign-out
			// page revokes it itself first, so a database failure there is not swallowed.
			async signOut(message) {
				const sid = 'token' in message ? message.token?.sid : undefined;
				if (typeof sid === 'string') await revokeSession(sid);
			}
		},
		callbacks: {
			// Auth.js's default throws on a malformed callback URL (a tampered cookie gave a 500
			// on every request) and trusts the request's origin; ours does neither.
			redirect({ url }) {
				return sameOriginRedirect(url, origin);
			},
			async signIn({ user, account, email }) {
				if (account?.provider === 'credentials') return true; // authorizePassword decided
				if (account?.type !== 'email') return false;
				const active = !!user.email && (await isActiveEmail(user.email));
				// An unknown address gets exactly the answer a known one gets, but no mail.
				if (email?.verificationRequest) return active || verifyRequestUrl;
				return active; // a link clicked after deactivation no longer signs in
			},
			async jwt({ token, user }) {
				if (user?.id) {
					// A row per sign-in, checked on every request: sign-out, password and role
					// changes and deactivation end it (see $lib/server/sessions).
					token.sid = await startSession(user.id);
					token.sub = user.id;
					token.email = user.email;
					// People who only ever signed in by link may have no name.
					token.name = user.name || user.email;
				}
				return token;
			},
			session({ session, token }) {
				if (token.sub) session.user.id = token.sub;
				if (typeof token.sid === 'string') (session as SessionWithId).sessionId = token.sid;
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
