/**
 * Inspection photos: checked by content, kept byte for byte in object storage, described by a row
 * in `attachments`. The client's photo UUID is the key, so an upload repeated after a dropped
 * answer is harmless. The object is written first and the row second; if the row cannot be
 * written, the objects are removed again, so no row ever points at nothing.
 */
import { createHash } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { normaliseFixtureCode } from '$lib/domain/fixture-code';
import { imageSizeProblem, sniffImage, type ImageType } from '$lib/images/image-type';
import { can } from '$lib/permissions';
import { PHOTO_LIMIT_BYTES } from '$lib/schemas/attachments';
import { db, schema } from './db';
import type { Actor } from './guard';
import * as storage from './storage';

const { attachments, events, fixtures } = schema;

export { PHOTO_LIMIT_BYTES };
/** Largest thumbnail accepted (the phone makes them ≤ 320 px, a few tens of KB). */
export const THUMB_LIMIT_BYTES = 512 * 1024;
/** Largest upload request: a photo, its thumbnail and the form's own bytes. */
export const UPLOAD_BODY_LIMIT_BYTES = PHOTO_LIMIT_BYTES + THUMB_LIMIT_BYTES + 64 * 1024;

/** What a client sends: the photo, the phone-made thumbnail if any, and what it belongs to. */
export interface PhotoUpload {
	id: string;
	fixtureCode: string;
	eventId: string;
	photo: Uint8Array;
	thumb?: Uint8Array | null;
}

/** The stored description of a photo, as the API returns it. */
export interface AttachmentInfo {
	id: string;
	fixtureCode: string;
	eventId: string | null;
	contentType: string;
	sizeBytes: number;
	sha256: string;
	width: number | null;
	height: number | null;
	createdAt: string;
}

/** A refusal the client can act on: HTTP status, message, and messages by form field. */
export class UploadError extends Error {
	constructor(
		readonly status: 400 | 403 | 404 | 409,
		message: string,
		readonly fields: Record<string, string> = {}
	) {
		super(message);
		this.name = 'UploadError';
	}
}

const mb = (n: number) => `${Math.round((n / (1024 * 1024)) * 10) / 10} MB`;
const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

/** Object keys carry the content hash, so a different upload under a known id overwrites nothing. */
const objectKey = (id: string, hash: string) => `attachments/${id}/${hash}`;
const thumbKey = (key: string) => `${key}.thumb`;

function checkImage(bytes: Uint8Array, field: string, limit: number, what: string): ImageType {
	if (bytes.byteLength === 0)
		throw new UploadError(400, `The ${what} is empty.`, { [field]: `The ${what} is empty.` });
	if (bytes.byteLength > limit) {
		const m = `The ${what} is ${mb(bytes.byteLength)}; the limit is ${mb(limit)}.`;
		throw new UploadError(400, m, { [field]: m });
	}
	const info = sniffImage(bytes);
	if (!info) {
		const m = `The ${what} is not a JPEG, PNG or WebP image (whatever its name says).`;
		throw new UploadError(400, m, { [field]: m });
	}
	const size = imageSizeProblem(info);
	if (size) throw new UploadError(400, size, { [field]: size });
	return info.type;
}

/**
 * Stores a photo for an inspection of `fixtureCode`, or confirms one already stored with the same
 * content. Throws UploadError when it is refused.
 */
export async function storePhoto(
	actor: Actor,
	upload: PhotoUpload
): Promise<{ status: 'stored' | 'duplicate'; attachment: AttachmentInfo }> {
	if (!can(actor, 'event.log', { kind: 'inspection' })) {
		throw new UploadError(403, 'Only people who may log inspections can add inspection photos.');
	}
	const code = normaliseFixtureCode(upload.fixtureCode);
	const [fixture] = code.ok
		? await db
				.select({ id: fixtures.id, code: fixtures.code })
				.from(fixtures)
				.where(eq(fixtures.code, code.code))
		: [];
	if (!fixture) {
		throw new UploadError(404, `No fixture has the code ${upload.fixtureCode}.`, {
			fixtureCode: 'No fixture has this code.'
		});
	}

	const type = checkImage(upload.photo, 'file', PHOTO_LIMIT_BYTES, 'photo');
	const thumb = upload.thumb?.byteLength ? upload.thumb : null;
	const thumbType = thumb ? checkImage(thumb, 'thumb', THUMB_LIMIT_BYTES, 'thumbnail') : null;
	const hash = sha256(upload.photo);
	const size = sniffImage(upload.photo)!;

	const existing = await find(upload.id);
	if (existing)
		return { status: sameUpload(existing, fixture.id, hash, upload.id), attachment: existing };

	// The event normally arrives first (photos go up after their event is accepted); when it is
	// already here it must be this fixture's inspection and list the photo.
	const [event] = await db
		.select({ fixtureId: events.fixtureId, kind: events.kind, payload: events.payload })
		.from(events)
		.where(eq(events.id, upload.eventId));
	if (event) {
		const ids = (event.payload as { photoIds?: unknown }).photoIds;
		if (
			event.fixtureId !== fixture.id ||
			event.kind !== 'inspection' ||
			!Array.isArray(ids) ||
			!ids.includes(upload.id)
		) {
			throw new UploadError(400, 'This photo does not belong to that inspection.', {
				eventId: 'The inspection does not list this photo.'
			});
		}
	}

	const key = objectKey(upload.id, hash);
	await storage.putObject(key, upload.photo, type);
	if (thumb && thumbType) await storage.putObject(thumbKey(key), thumb, thumbType);
	try {
		await db.insert(attachments).values({
			id: upload.id,
			fixtureId: fixture.id,
			eventId: upload.eventId,
			objectKey: key,
			contentType: type,
			sizeBytes: upload.photo.byteLength,
			sha256: hash,
			width: size.width,
			height: size.height,
			uploadedBy: actor.id
		});
	} catch (err) {
		// Two uploads of one photo at once: the other one's row is the answer.
		const raced = await find(upload.id);
		if (raced) {
			const status = sameUpload(raced, fixture.id, hash, upload.id);
			return { status, attachment: raced };
		}
		await Promise.allSettled([storage.deleteObject(key), storage.deleteObject(thumbKey(key))]);
		throw err;
	}
	return { status: 'stored', attachment: (await find(upload.id))! };
}

function sameUpload(
	a: AttachmentInfo & { fixtureId?: number },
	fixtureId: number,
	hash: string,
	id: string
) {
	if (a.sha256 !== hash || a.fixtureId !== fixtureId) {
		throw new UploadError(409, `Another photo is already stored under the id ${id}.`, {
			id: 'This photo id is taken by different content.'
		});
	}
	return 'duplicate' as const;
}

async function find(
	id: string
): Promise<(AttachmentInfo & { fixtureId: number; objectKey: string }) | null> {
	const [row] = await db
		.select({ a: attachments, code: fixtures.code })
		.from(attachments)
		.innerJoin(fixtures, eq(fixtures.id, attachments.fixtureId))
		.where(eq(attachments.id, id));
	if (!row) return null;
	const { a } = row;
	return {
		id: a.id,
		fixtureId: a.fixtureId,
		fixtureCode: row.code,
		eventId: a.eventId,
		objectKey: a.objectKey,
		contentType: a.contentType,
		sizeBytes: a.sizeBytes,
		sha256: a.sha256,
		width: a.width,
		height: a.height,
		createdAt: a.createdAt.toISOString()
	};
}

/** A stored photo's bytes (or its thumbnail's, falling back to the photo), or null when unknown. */
export async function readPhoto(
	id: string,
	variant: 'full' | 'thumb'
): Promise<{
	bytes: Uint8Array;
	contentType: string;
	sha256: string;
	variant: 'full' | 'thumb';
} | null> {
	const a = await find(id);
	if (!a) return null;
	if (variant === 'thumb') {
		const t = await storage.getObject(thumbKey(a.objectKey));
		const type = t && sniffImage(t)?.type;
		if (t && type) return { bytes: t, contentType: type, sha256: a.sha256, variant: 'thumb' };
	}
	const bytes = await storage.getObject(a.objectKey);
	if (!bytes) return null;
	return { bytes, contentType: a.contentType, sha256: a.sha256, variant: 'full' };
}
