import { z } from 'zod';
import { fixtureCodeSchema } from './events';

/** Largest photo accepted: a full-resolution phone JPEG is 2–6 MB (common practice). */
export const PHOTO_LIMIT_BYTES = 8 * 1024 * 1024;
/** Longest side of the thumbnail the phone makes, px. */
export const THUMB_MAX_PX = 320;

/** Media types a photo may have; checked again on the server from the bytes themselves. */
export const PHOTO_ACCEPT = 'image/jpeg,image/png,image/webp';

/** The text fields of a photo upload (`PUT /api/attachments/{id}`, multipart form). */
export const photoUploadFieldsSchema = z.strictObject({
	id: z.uuid({ error: 'Photo id must be a UUID' }),
	fixtureCode: fixtureCodeSchema,
	eventId: z.uuid({ error: 'Event id must be a UUID' })
});
export type PhotoUploadFields = z.infer<typeof photoUploadFieldsSchema>;

/** A photo id in a URL. */
export const photoIdSchema = z.uuid();
