import { apiUser } from '$lib/server/guard';
import { photoResponse } from '../photo-response';
import type { RequestHandler } from './$types';

/** A photo's thumbnail (the original when the phone sent none), to signed-in people only. */
export const GET: RequestHandler = async ({ locals, params, request }) => {
	const actor = apiUser(locals);
	if (actor instanceof Response) return actor;
	return photoResponse(params.id, 'thumb', request);
};
