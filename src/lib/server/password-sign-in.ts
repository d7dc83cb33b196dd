import { passwordSignInSchema } from '../schemas/users';
import { admission, recordFailure, recordSuccess } from './throttle';
import { findForSignIn, verifyPassword } from './users';

/**
 * Why a password sign-in was refused, as the `code` Auth.js passes on. Codes never say whether
 * an account exists: a deactivated account is named only after its correct password, and the
 * throttle counts unknown addresses like known ones.
 */
export type RefusalCode = 'wrong' | 'inactive' | `locked-${number}` | `wait-${number}`;

/** The outcome of a password sign-in attempt. */
export type PasswordSignIn =
	| { ok: true; user: { id: string; email: string; name: string } }
	| { ok: false; code: RefusalCode };

/**
 * Checks e-mail + password with throttling (see $lib/server/throttle): a lock of the
 * (account, address) pair or of the address, or the account's delay, answers before any
 * password is compared. Kept apart from Auth.js so the rules can be tested on their own.
 */
export async function checkPasswordSignIn(
	raw: unknown,
	address: string,
	now = new Date()
): Promise<PasswordSignIn> {
	const parsed = passwordSignInSchema.safeParse(raw);
	if (!parsed.success) return { ok: false, code: 'wrong' };
	const { email, password } = parsed.data;
	const attempt = { email, address };

	const gate = await admission(attempt, now);
	if (gate.kind === 'locked') return { ok: false, code: `locked-${gate.minutes}` };
	if (gate.kind === 'wait') return { ok: false, code: `wait-${gate.seconds}` };

	const row = await findForSignIn(email);
	// verifyPassword spends one bcrypt comparison even without a hash (timing-equalised).
	const ok = await verifyPassword(password, row?.passwordHash ?? null);
	if (!ok || !row?.email) {
		const lock = await recordFailure(attempt, now);
		return { ok: false, code: lock ? `locked-${lock}` : 'wrong' };
	}
	if (!row.active) return { ok: false, code: 'inactive' };
	await recordSuccess(attempt);
	return { ok: true, user: { id: row.id, email: row.email, name: row.name || row.email } };
}
