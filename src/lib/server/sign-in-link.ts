import { createHash, randomBytes } from 'node:crypto';
import { config } from './config';
import { db, type Db } from './db';
import { verificationTokens } from './db/schema';

/** Id of the Auth.js e-mail provider; the callback path of every sign-in link depends on it. */
export const EMAIL_PROVIDER_ID = 'nodemailer';

/** How long a requested sign-in link stays valid. */
export const SIGN_IN_LINK_MAX_AGE_S = 24 * 60 * 60;
/** How long an invitation link stays valid: long enough for someone away for a week. */
export const INVITE_LINK_MAX_AGE_S = 7 * 24 * 60 * 60;

const DEV_SECRET = 'nestmark-development-secret-not-for-production-use';

/**
 * The Auth.js secret from AUTH_SECRET. Development and test fall back to a fixed value so a
 * fresh checkout runs; anywhere else a missing secret is an error, not a silent default.
 */
export function authSecret(): string {
	const { authSecret: secret, lenient } = config();
	if (secret) return secret;
	if (lenient) return DEV_SECRET;
	throw new Error('AUTH_SECRET is not set (see .env.example)');
}

/** The form in which Auth.js stores a verification token: sha256 of token + secret, hex. */
export function hashVerificationToken(token: string): string {
	return createHash('sha256').update(`${token}${authSecret()}`).digest('hex');
}

/** Lower-cases and trims an address the way Auth.js's e-mail provider does. */
export function normaliseEmail(email: string): string {
	return email.normalize('NFKC').trim().toLowerCase();
}

/**
 * Makes a one-time sign-in link that Auth.js's e-mail callback accepts, exactly as if the
 * person had asked for a link on the sign-in page (used for invitations).
 */
export async function createSignInLink(
	opts: { email: string; origin: string; callbackPath?: string; maxAgeS?: number },
	executor: Pick<Db, 'insert'> = db
): Promise<{ url: string; expires: Date }> {
	const email = normaliseEmail(opts.email);
	const token = randomBytes(32).toString('hex');
	const expires = new Date(Date.now() + (opts.maxAgeS ?? SIGN_IN_LINK_MAX_AGE_S) * 1000);
	await executor
		.insert(verificationTokens)
		.values({ identifier: email, token: hashVerificationToken(token), expires });
	const origin = opts.origin.replace(/\/+$/, '');
	const params = new URLSearchParams({
		callbackUrl: `${origin}${opts.callbackPath ?? '/'}`,
		token,
		email
	});
	return { url: `${origin}/auth/callback/${EMAIL_PROVIDER_ID}?${params}`, expires };
}
