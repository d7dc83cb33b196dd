import { error, isHttpError, isRedirect, redirect } from '@sveltejs/kit';
import { browser } from '$app/environment';
import { isHydrated } from '$lib/client/hydration';
import { normaliseFixtureCode } from '$lib/domain/fixture-code';
import type { ServerEvent } from '$lib/domain/event-history';
import type { SnapshotFixture } from '$lib/schemas/register-snapshot';
import { fetchCard, type CardFetch } from './card-data';
import type { PageLoad } from './$types';

/** A phone on a weak signal gives up on the server this soon and opens the card from its copy. */
const BROWSER_TIMEOUT_MS = 4_000;

/**
 * The fixture card's data. Server-rendered, it comes from the API. In the browser (after a scan)
 * it comes from the device's register copy first, so the card opens at once whatever the signal,
 * and the page then asks the server for fresh figures and history. A code the copy does not hold
 * is asked of the server; if that fails too, the page says so. A universal load, not a server
 * one, is what makes the device copy usable.
 */
export const load: PageLoad = async ({ params, fetch, url }) => {
	const reading = normaliseFixtureCode(params.code);
	if (!reading.ok) error(404, { message: reading.error });
	const code = reading.code;
	if (code !== params.code) redirect(308, `/f/${code}`);

	// While hydrating, the page must match what the server rendered: no device-first answer then.
	if (browser && isHydrated()) {
		const local = await fromDevice(code, false);
		if (local.fixture) return local;
	}
	try {
		const r = await fetchCard(
			fetch,
			code,
			browser ? AbortSignal.timeout(BROWSER_TIMEOUT_MS) : undefined
		);
		if (r.status === 'ok') {
			return { code, ...pick(r), source: 'server' as const, serverTried: true };
		}
		if (r.status === 'signed-out') {
			redirect(303, `/signin?next=${encodeURIComponent(url.pathname + url.search)}`);
		}
		if (r.status === 'not-found') error(404, { message: `No fixture has the code ${code}.` });
		throw new Error(r.status === 'failed' ? r.error : r.status);
	} catch (e) {
		if (isRedirect(e) || isHttpError(e) || !browser) throw e;
		return fromDevice(code, true);
	}
};

const pick = (r: Extract<CardFetch, { status: 'ok' }>) => ({
	fixture: r.fixture as SnapshotFixture | null,
	events: r.events,
	generatedAt: r.generatedAt as string | null
});

/**
 * The card from the device's register copy (no server events; the page merges the outbox in).
 * `serverTried` says whether the server already failed (else the page asks it next).
 * A code this device has never seen gives `fixture: null`, which the page explains.
 */
async function fromDevice(code: string, serverTried: boolean) {
	const { findFixture } = await import('$lib/client/register-snapshot');
	const fixture: SnapshotFixture | null = (await findFixture(code)) ?? null;
	return {
		code,
		fixture,
		events: null as ServerEvent[] | null,
		generatedAt: null as string | null,
		source: 'device' as const,
		serverTried
	};
}
