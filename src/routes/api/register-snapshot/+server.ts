import { json } from '@sveltejs/kit';
import { apiError } from '$lib/server/api-answers';
import { normaliseFixtureCode } from '$lib/domain/fixture-code';
import type { RegisterSnapshot } from '$lib/schemas/register-snapshot';
import { apiUser } from '$lib/server/guard';
import * as snapshot from '$lib/server/register-snapshot';
import type { RequestHandler } from './$types';

// The copy must be revalidated every time (If-None-Match), and never shared between people.
const CACHE_CONTROL = 'private, no-cache';

/**
 * The register as a device keeps it offline. `?code=` narrows it to one fixture (the fixture
 * card's online load; it then carries no work orders). Answers 304 when If-None-Match names the current ETag.
 */
export const GET: RequestHandler = async ({ locals, url, request }) => {
	const actor = apiUser(locals);
	if (actor instanceof Response) return actor;

	const rawCode = url.searchParams.get('code');
	let code: string | undefined;
	if (rawCode !== null) {
		const reading = normaliseFixtureCode(rawCode);
		if (!reading.ok) return apiError(400, reading.error, { code: reading.error });
		code = reading.code;
	}

	// The whole copy also carries the person's own open work orders (for /work, offline).
	const [entries, workOrders] = await Promise.all([
		snapshot.snapshotFixtures(actor, code),
		code ? undefined : snapshot.myOpenWorkOrders(actor)
	]);
	if (code && entries.length === 0) {
		return apiError(404, `No fixture with code ${code}.`);
	}
	const etag = snapshot.snapshotEtag(entries, workOrders);
	const headers = { ETag: etag, 'Cache-Control': CACHE_CONTROL, Vary: 'Cookie' };
	if (snapshot.etagMatches(request.headers.get('if-none-match'), etag)) {
		return new Response(null, { status: 304, headers });
	}
	const body: RegisterSnapshot = {
		version: etag.slice(1, -1),
		generatedAt: new Date().toISOString(),
		fixtures: entries,
		...(workOrders ? { workOrders, workOrdersFor: actor.id } : {})
	};
	return json(body, { headers });
};
