import { z } from 'zod';
import { fixtureCodeSchema } from './events';

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
