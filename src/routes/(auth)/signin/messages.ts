/** Wording of sign-in outcomes, shared by the form actions and the ?error= page. */

/** The message for a refused password sign-in (codes from $lib/server/auth). */
export function refusalMessage(code: string | null | undefined): string {
	const locked = /^locked-(\d+)$/.exec(code ?? '');
	if (locked) {
		const m = Number(locked[1]);
		return `Too many failed attempts. Wait ${m} minute${m === 1 ? '' : 's'} and try again, or ask for a sign-in link by e-mail below.`;
	}
	const wait = /^wait-(\d+)$/.exec(code ?? '');
	if (wait) {
		const s = Number(wait[1]);
		return `Many failed attempts on this account just now. Wait ${s} second${s === 1 ? '' : 's'} and try again, or ask for a sign-in link by e-mail below.`;
	}
	if (code === 'inactive') {
		return 'This account has been deactivated. If you need access again, ask an admin.';
	}
	// Deliberately the same whether or not the account exists.
	return 'E-mail or password is wrong.';
}

/** The message for Auth.js's ?error= (and our ?signedout=) on the sign-in page, or null. */
export function noticeFor(
	params: URLSearchParams
): { tone: 'error' | 'info'; text: string } | null {
	if (params.has('signedout')) return { tone: 'info', text: 'You have signed out.' };
	const error = params.get('error');
	if (!error) return null;
	const text = (() => {
		switch (error) {
			case 'CredentialsSignin':
				return refusalMessage(params.get('code'));
			case 'Verification':
				return 'That sign-in link has expired or has already been used. Ask for a new one below.';
			case 'AccessDenied':
				return 'That account cannot sign in. If you need access, ask an admin.';
			default:
				return 'Signing in did not work. Try again; if it keeps failing, tell your admin.';
		}
	})();
	return { tone: 'error', text };
}

const under = (path: string, prefix: string) => path === prefix || path.startsWith(`${prefix}/`);

/**
 * Where to go after signing in: a path on this site only (never another host), and never back
 * to the sign-in pages themselves.
 */
export function safeNext(raw: unknown, origin: string): string {
	if (typeof raw !== 'string' || !raw) return '/';
	let url: URL;
	try {
		url = new URL(raw, origin);
	} catch {
		return '/';
	}
	if (url.origin !== origin) return '/';
	const path = url.pathname;
	if (under(path, '/auth') || under(path, '/signin') || under(path, '/signout')) return '/';
	return path + url.search + url.hash;
}
