import { json } from '@sveltejs/kit';
import { apiUser } from '$lib/server/guard';
import * as ingest from '$lib/server/ingest';
import { BodyError, bodyErrorHeaders, readJsonBody } from '$lib/server/json-body';
import type { RequestHandler } from './$types';

/**
 * The outbox's sync endpoint: a batch of events from one device, answered per event
 * (accepted, duplicate or rejected). Only a malformed envelope fails the whole request.
 */
export const POST: RequestHandler = async ({ locals, request }) => {
	const actor = apiUser(locals);
	if (actor instanceof Response) return actor;

	let body: unknown;
	try {
		body = await readJsonBody(request, ingest.SYNC_BODY_LIMIT_BYTES);
	} catch (err) {
		if (err instanceof BodyError) {
			return json({ error: err.message }, { status: 400, headers: bodyErrorHeaders(err) });
		}
		throw err;
	}

	const envelope = ingest.parseEnvelope(body);
	if (!envelope.ok) {
		return json({ error: envelope.error, fields: envelope.fields }, { status: 400 });
	}

	const results = await ingest.ingestBatch(actor, envelope.deviceId, envelope.events);
	return json({ results, serverTime: new Date().toISOString() });
};
