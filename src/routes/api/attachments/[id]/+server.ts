import { json } from '@sveltejs/kit';
import { apiError } from '$lib/server/api-answers';
import * as attachments from '$lib/server/attachments';
import { apiUser } from '$lib/server/guard';
import { discardRequestBody } from '$lib/server/json-body';
import { photoIdSchema, photoUploadFieldsSchema } from '$lib/schemas/attachments';
import { photoResponse } from './photo-response';
import type { RequestHandler } from './$types';

const bad = (error: string, fields: Record<string, string | string[]> = {}, status = 400) =>
	apiError(status, error, fields);

/** The full photo, to signed-in people only. */
export const GET: RequestHandler = async ({ locals, params, request }) => {
	const actor = apiUser(locals);
	if (actor instanceof Response) return actor;
	return photoResponse(params.id, 'full', request);
};

/**
 * Uploads one inspection photo as a multipart form: `file` (the photo as taken), optional `thumb`
 * (the phone's small JPEG), `fixtureCode` and `eventId`; the URL's id is the phone's photo UUID.
 * 201 when stored, 200 when the same photo was already stored (so a retry is harmless).
 */
export const PUT: RequestHandler = async ({ locals, params, request }) => {
	const actor = apiUser(locals);
	if (actor instanceof Response) return actor;
	if (!photoIdSchema.safeParse(params.id).success) {
		return bad('Invalid photo id.', { id: 'Photo id must be a UUID' });
	}

	const declared = Number(request.headers.get('content-length') ?? 0);
	const limit = attachments.UPLOAD_BODY_LIMIT_BYTES;
	const tooLarge = `The upload is larger than the limit of ${attachments.PHOTO_LIMIT_BYTES / 1024 / 1024} MB per photo.`;
	if (declared > limit) {
		// Read the refused body off the connection, so the next request on it is understood.
		const drained = await discardRequestBody(request);
		return apiError(
			400,
			tooLarge,
			{ file: tooLarge },
			{ headers: drained ? {} : { connection: 'close' } }
		);
	}

	let form: FormData;
	try {
		form = await request.formData();
	} catch (err) {
		// adapter-node's own BODY_SIZE_LIMIT, a broken form, or a body that is not a form at all.
		if ((err as { status?: number }).status === 413) return bad(tooLarge, { file: tooLarge });
		return bad('Send the photo as a multipart form with the fields file, fixtureCode and eventId.');
	}

	const text = (name: string) => {
		const v = form.get(name);
		return typeof v === 'string' ? v : undefined;
	};
	const fields = photoUploadFieldsSchema.safeParse({
		id: params.id,
		fixtureCode: text('fixtureCode'),
		eventId: text('eventId')
	});
	if (!fields.success) {
		const messages: Record<string, string[]> = {};
		for (const issue of fields.error.issues)
			(messages[issue.path.join('.') || '(form)'] ??= []).push(issue.message);
		return bad('Invalid upload.', messages);
	}
	const file = form.get('file');
	if (!(file instanceof Blob))
		return bad('Attach the photo as the file field.', { file: 'Choose a photo.' });
	const thumb = form.get('thumb');

	try {
		const r = await attachments.storePhoto(actor, {
			...fields.data,
			photo: new Uint8Array(await file.arrayBuffer()),
			thumb: thumb instanceof Blob ? new Uint8Array(await thumb.arrayBuffer()) : null
		});
		const { id, fixtureCode, eventId, contentType, sizeBytes, sha256, width, height, createdAt } =
			r.attachment;
		return json(
			{
				status: r.status,
				attachment: {
					id,
					fixtureCode,
					eventId,
					contentType,
					sizeBytes,
					sha256,
					width,
					height,
					createdAt
				}
			},
			{ status: r.status === 'stored' ? 201 : 200 }
		);
	} catch (err) {
		if (err instanceof attachments.UploadError) return bad(err.message, err.fields, err.status);
		throw err;
	}
};
