import * as attachments from '$lib/server/attachments';
import { photoIdSchema } from '$lib/schemas/attachments';
import { apiError } from '$lib/server/api-answers';

/**
 * A stored photo (or its thumbnail) as an HTTP response: the type read from its bytes, cached by
 * the browser only (a photo never changes under its id), never sniffed, never run as a page.
 */
export async function photoResponse(
	id: string,
	variant: 'full' | 'thumb',
	request: Request
): Promise<Response> {
	const notFound = () => apiError(404, 'No photo with this id.');
	if (!photoIdSchema.safeParse(id).success) return notFound();
	const photo = await attachments.readPhoto(id, variant);
	if (!photo) return notFound();
	const etag = `"${photo.sha256.slice(0, 32)}-${photo.variant}"`;
	const headers = {
		'Content-Type': photo.contentType,
		'Cache-Control': 'private, max-age=31536000, immutable',
		ETag: etag,
		'X-Content-Type-Options': 'nosniff',
		'Content-Security-Policy': "default-src 'none'; sandbox",
		'Content-Disposition': 'inline'
	};
	if (request.headers.get('if-none-match') === etag)
		return new Response(null, { status: 304, headers });
	return new Response(photo.bytes as BodyInit, {
		headers: { ...headers, 'Content-Length': String(photo.bytes.byteLength) }
	});
}
