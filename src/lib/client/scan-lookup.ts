/**
 * After a scan: is this code a fixture? The device's register copy answers first (instant, and
 * offline); a code the copy does not hold is asked of the server, because the copy may predate a
 * fixture added this morning.
 */
import { findFixture, snapshotInfo } from './register-snapshot';

/** What is known about a scanned code before its card opens. */
export type CodeLookup =
	| { status: 'known'; name?: string }
	| { status: 'unknown'; message: string }
	/** Nothing could tell (no copy, no network): the card itself will say what it can. */
	| { status: 'unchecked' };

/** A phone on a weak signal should not hang here; the card has its own offline fallback. */
const SERVER_TIMEOUT_MS = 4_000;

/** Looks `code` (canonical form) up in the register copy, then on the server. */
export async function lookUpCode(code: string, fetcher: typeof fetch = fetch): Promise<CodeLookup> {
	const local = await findFixture(code).catch(() => undefined);
	if (local) return { status: 'known', name: local.name };

	const unknown = `${code} is not in the register. Check the label, or ask a supervisor to add the fixture.`;
	let res: Response;
	try {
		res = await fetcher(`/api/fixtures/${encodeURIComponent(code)}`, {
			headers: { Accept: 'application/json' },
			signal: AbortSignal.timeout(SERVER_TIMEOUT_MS)
		});
	} catch {
		// No network: the copy is all there is to go on.
		const info = await snapshotInfo().catch(() => ({ count: 0, checkedAt: undefined }));
		if (info.count === 0) return { status: 'unchecked' };
		const when = info.checkedAt
			? ` (last updated ${new Date(info.checkedAt).toLocaleString()})`
			: '';
		return {
			status: 'unknown',
			message: `${code} is not in this device’s copy of the register${when}. Check the code; if the fixture is new, try again when the phone has a connection.`
		};
	}
	if (res.status === 404) return { status: 'unknown', message: unknown };
	if (res.ok) {
		const body = (await res.json().catch(() => ({}))) as { name?: string };
		return { status: 'known', name: body.name };
	}
	// Signed out or a server fault: the card handles both (sign-in, its own copy).
	return { status: 'unchecked' };
}
