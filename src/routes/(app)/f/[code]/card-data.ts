import type { ServerEvent } from '$lib/domain/event-history';
import type { RegisterSnapshot, SnapshotFixture } from '$lib/schemas/register-snapshot';

/** How many of the server's events the card lists. */
export const CARD_EVENT_LIMIT = 10;

/** What the server says about one fixture, for the card. */
export type CardFetch =
	| { status: 'ok'; fixture: SnapshotFixture; events: ServerEvent[] | null; generatedAt: string }
	| { status: 'signed-out' | 'not-found' }
	| { status: 'failed'; error: string };

/** Fetches the card's fixture entry and recent events; network errors are thrown to the caller. */
export async function fetchCard(
	fetcher: typeof fetch,
	code: string,
	signal?: AbortSignal
): Promise<CardFetch> {
	const c = encodeURIComponent(code);
	const [fx, ev] = await Promise.all([
		fetcher(`/api/register-snapshot?code=${c}`, { signal }),
		fetcher(`/api/fixtures/${c}/events?limit=${CARD_EVENT_LIMIT}`, { signal })
	]);
	if (fx.status === 401) return { status: 'signed-out' };
	if (fx.status === 404) return { status: 'not-found' };
	if (!fx.ok) return { status: 'failed', error: `The server answered ${fx.status}.` };
	const body = (await fx.json()) as RegisterSnapshot;
	const events = ev.ok ? ((await ev.json()) as { events: ServerEvent[] }).events : null;
	return { status: 'ok', fixture: body.fixtures[0], events, generatedAt: body.generatedAt };
}
