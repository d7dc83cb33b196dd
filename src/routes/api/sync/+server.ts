import { json } from '@sveltejs/kit';
import { apiError } from '$lib/server/api-answers';
import { apiUser } from '$lib/server/guard';
import * as ingest from '$lib/server/ingest';
import { readApiJson } from '$lib/server/json-body';
import type { RequestHandler } from './$types';

/**
 * The outbox's sync endpoint: a batch of events from one device, answered per event
 * (accepted, duplicate or rejected). Only a malformed envelope fails the whole request.
 */
export const POST: RequestHandler = async ({ locals, request }) => {
	const actor = apiUser(locals);
	if (actor instanceof Response) return actor;

	const body = await readApiJson(request, ingest.SYNC_BODY_LIMIT_BYTES);
	if (body instanceof Response) return body;

	const envelope = ingest.parseEnvelope(body);
	if (!envelope.ok) {
		return apiError(400, envelope.error, envelope.fields);
	}

	const results = await ingest.ingestBatch(actor, envelope.deviceId, envelope.events);
	return json({ results, serverTime: new Date().toISOString() });
};
