import { createHash, randomUUID } from 'node:crypto';
import { encodePng } from '../../../scripts/demo-photos';
import { eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Actor } from '$lib/server/guard';
import { PHOTO_LIMIT_BYTES, storePhoto } from '$lib/server/attachments';
import * as storage from '$lib/server/storage';
import { GET as getPhoto, PUT as putPhoto } from '../../../src/routes/api/attachments/[id]/+server';
import { GET as getThumb } from '../../../src/routes/api/attachments/[id]/thumb/+server';
import { POST as postSync } from '../../../src/routes/api/sync/+server';
import { closeDb, db, makeFixture, makeUser, resetDb, schema } from '../helpers/db';
import { useS3 } from '../helpers/s3';

// The endpoints called through their SvelteKit handlers, against the real MariaDB test database
// and a real S3 fake (s3rver): nothing of our own is mocked.

let stopS3: () => Promise<void>;
beforeAll(async () => {
	await resetDb();
	stopS3 = await useS3();
});
afterAll(async () => {
	await stopS3();
	await closeDb();
});

type Handler = (event: never) => Promise<Response> | Response;
function call(
	handler: Handler,
	user: Actor | null,
	request: Request,
	params: Record<string, string>
) {
	const event = { locals: { user }, request, params, url: new URL(request.url) };
	return handler(event as never);
}

/** A real PNG of w × h grey pixels. */
function png(w: number, h: number): Uint8Array {
	return new Uint8Array(encodePng(w, h, new Uint8Array(w * h * 3).fill(0x80)));
}

function upload(
	id: string,
	fields: { fixtureCode: string; eventId: string },
	file: Uint8Array,
	opts: { name?: string; type?: string; thumb?: Uint8Array } = {}
) {
	const form = new FormData();
	form.set('fixtureCode', fields.fixtureCode);
	form.set('eventId', fields.eventId);
	form.set(
		'file',
		new File([file as BlobPart], opts.name ?? 'photo.png', { type: opts.type ?? 'image/png' })
	);
	if (opts.thumb)
		form.set('thumb', new File([opts.thumb as BlobPart], 'thumb.png', { type: 'image/png' }));
	return new Request(`http://127.0.0.1/api/attachments/${id}`, { method: 'PUT', body: form });
}

const get = (id: string, suffix = '') =>
	new Request(`http://127.0.0.1/api/attachments/${id}${suffix}`);

describe('photo uploads against s3rver', () => {
	let tech: Actor;
	let operator: Actor;
	let code: string;
	let eventId: string;
	const photoIds = [randomUUID(), randomUUID(), randomUUID()];

	beforeAll(async () => {
		tech = await makeUser({ roles: ['technician'] });
		operator = await makeUser({ roles: ['operator'] });
		code = (await makeFixture()).code;
		eventId = randomUUID();
		// The inspection reaches the server first, listing its photos, as the phone sends it.
		const sync = new Request('http://127.0.0.1/api/sync', {
			method: 'POST',
			headers: { 'content-type': 'application/json' },
			body: JSON.stringify({
				deviceId: 'phone-photos',
				events: [
					{
						id: eventId,
						fixtureCode: code,
						kind: 'inspection',
						occurredAt: new Date().toISOString(),
						payload: {
							contacts: [{ contact: 'Ball 1', grade: 1, marks: [] }],
							verdict: 'serviceable',
							photoIds
						}
					}
				]
			})
		});
		const res = await call(postSync, tech, sync, {});
		expect((await res.json()).results[0].status).toBe('accepted');
	});

	it('accepts a PNG, keeps its bytes unchanged and records its size and hash', async () => {
		const bytes = png(64, 48);
		const res = await call(
			putPhoto,
			tech,
			upload(photoIds[0], { fixtureCode: code, eventId }, bytes),
			{
				id: photoIds[0]
			}
		);
		expect(res.status).toBe(201);
		const body = await res.json();
		expect(body.attachment).toMatchObject({
			id: photoIds[0],
			contentType: 'image/png',
			sizeBytes: bytes.byteLength,
			width: 64,
			height: 48,
			eventId
		});
		const [row] = await db
			.select()
			.from(schema.attachments)
			.where(eq(schema.attachments.id, photoIds[0]));
		expect(row.sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
		expect(row.uploadedBy).toBe(tech.id);
		// Read straight from the store: byte for byte what was sent (no checksum framing).
		expect(Buffer.from((await storage.getObject(row.objectKey))!)).toEqual(Buffer.from(bytes));

		const full = await call(getPhoto, operator, get(photoIds[0]), { id: photoIds[0] });
		expect(full.status).toBe(200);
		expect(full.headers.get('content-type')).toBe('image/png');
		expect(full.headers.get('x-content-type-options')).toBe('nosniff');
		expect(full.headers.get('cache-control')).toMatch(/^private/);
		expect(Buffer.from(await full.arrayBuffer())).toEqual(Buffer.from(bytes));
		// No thumbnail was sent, so the thumbnail URL serves the photo itself.
		const thumb = await call(getThumb, operator, get(photoIds[0], '/thumb'), { id: photoIds[0] });
		expect(thumb.status).toBe(200);
		expect(Buffer.from(await thumb.arrayBuffer())).toEqual(Buffer.from(bytes));
	});

	it('is idempotent: the same photo again answers 200 duplicate and stores one row', async () => {
		const bytes = png(64, 48);
		const again = await call(
			putPhoto,
			tech,
			upload(photoIds[0], { fixtureCode: code, eventId }, bytes),
			{
				id: photoIds[0]
			}
		);
		expect(again.status).toBe(200);
		expect((await again.json()).status).toBe('duplicate');
		const rows = await db
			.select()
			.from(schema.attachments)
			.where(eq(schema.attachments.id, photoIds[0]));
		expect(rows).toHaveLength(1);
		// Other content under a known id is refused, and the stored photo is left as it was.
		const other = await call(
			putPhoto,
			tech,
			upload(photoIds[0], { fixtureCode: code, eventId }, png(8, 8)),
			{
				id: photoIds[0]
			}
		);
		expect(other.status).toBe(409);
		const full = await call(getPhoto, tech, get(photoIds[0]), { id: photoIds[0] });
		expect(Buffer.from(await full.arrayBuffer())).toEqual(Buffer.from(bytes));
	});

	it('serves the phone’s thumbnail when one was sent', async () => {
		const photo = png(640, 480);
		const small = png(32, 24);
		const res = await call(
			putPhoto,
			tech,
			upload(photoIds[1], { fixtureCode: code, eventId }, photo, { thumb: small }),
			{ id: photoIds[1] }
		);
		expect(res.status).toBe(201);
		const thumb = await call(getThumb, tech, get(photoIds[1], '/thumb'), { id: photoIds[1] });
		expect(Buffer.from(await thumb.arrayBuffer())).toEqual(Buffer.from(small));
	});

	it('rejects a text file renamed to .png, with a message on the file field', async () => {
		const text = new TextEncoder().encode('Ball 2 looked fine, no photo really\n');
		const res = await call(
			putPhoto,
			tech,
			upload(photoIds[2], { fixtureCode: code, eventId }, text, {
				name: 'ball-2.png',
				type: 'image/png'
			}),
			{ id: photoIds[2] }
		);
		expect(res.status).toBe(400);
		const body = await res.json();
		expect(body.fields.file[0]).toMatch(/not a JPEG, PNG or WebP/);
		expect(
			await db.select().from(schema.attachments).where(eq(schema.attachments.id, photoIds[2]))
		).toEqual([]);
	});

	it('answers 400 JSON, not 500, to a PNG whose header claims 2^31 pixels, and stores nothing', async () => {
		const bytes = png(4, 4);
		// IHDR width and height sit at bytes 16–23, big-endian (PNG specification §11.2.2).
		new DataView(bytes.buffer, bytes.byteOffset).setUint32(16, 2 ** 31);
		new DataView(bytes.buffer, bytes.byteOffset).setUint32(20, 2 ** 32 - 1);
		const res = await call(
			putPhoto,
			tech,
			upload(photoIds[2], { fixtureCode: code, eventId }, bytes),
			{ id: photoIds[2] }
		);
		expect(res.status).toBe(400);
		const body = await res.json();
		expect(body.error).toBe(
			'The image header claims a width of 2147483648 pixels; at most 65535 is accepted.'
		);
		expect(body.fields.file).toEqual([body.error]);
		expect(
			await db.select().from(schema.attachments).where(eq(schema.attachments.id, photoIds[2]))
		).toEqual([]);
	});

	it('rejects a photo over the size limit and stores nothing', async () => {
		const big = new Uint8Array(PHOTO_LIMIT_BYTES + 1);
		big.set(png(4, 4));
		const res = await call(
			putPhoto,
			tech,
			upload(photoIds[2], { fixtureCode: code, eventId }, big),
			{
				id: photoIds[2]
			}
		);
		expect(res.status).toBe(400);
		expect((await res.json()).fields.file[0]).toMatch(/limit is 8 MB/);
		expect(
			await db.select().from(schema.attachments).where(eq(schema.attachments.id, photoIds[2]))
		).toEqual([]);
	});

	it('refuses a fetch without a session (401) and answers 404 for an unknown photo', async () => {
		const res = await call(getPhoto, null, get(photoIds[0]), { id: photoIds[0] });
		expect(res.status).toBe(401);
		expect(await res.json()).toEqual({ error: expect.any(String) });
		const thumb = await call(getThumb, null, get(photoIds[0], '/thumb'), { id: photoIds[0] });
		expect(thumb.status).toBe(401);
		const unknown = randomUUID();
		expect((await call(getPhoto, tech, get(unknown), { id: unknown })).status).toBe(404);
		expect(
			(await call(getThumb, tech, get('not-a-uuid', '/thumb'), { id: 'not-a-uuid' })).status
		).toBe(404);
	});

	it('leaves no object behind when the row cannot be written', async () => {
		// A person the database does not know: the row's foreign key fails after the object is put.
		const ghost: Actor = { ...tech, id: randomUUID() };
		const bytes = png(16, 16);
		await expect(
			storePhoto(ghost, { id: photoIds[2], fixtureCode: code, eventId, photo: bytes })
		).rejects.toThrow();
		const hash = createHash('sha256').update(bytes).digest('hex');
		expect(await storage.getObject(`attachments/${photoIds[2]}/${hash}`)).toBeNull();
		expect(
			await db.select().from(schema.attachments).where(eq(schema.attachments.id, photoIds[2]))
		).toEqual([]);
	});

	it('lets only people who may log inspections upload, and only to a listed inspection', async () => {
		const id = randomUUID();
		const asOperator = await call(
			putPhoto,
			operator,
			upload(id, { fixtureCode: code, eventId }, png(4, 4)),
			{ id }
		);
		expect(asOperator.status).toBe(403);
		const unlisted = await call(
			putPhoto,
			tech,
			upload(id, { fixtureCode: code, eventId }, png(4, 4)),
			{ id }
		);
		expect(unlisted.status).toBe(400);
		expect((await unlisted.json()).fields.eventId).toBeTruthy();
		const signedOut = await call(
			putPhoto,
			null,
			upload(id, { fixtureCode: code, eventId }, png(4, 4)),
			{ id }
		);
		expect(signedOut.status).toBe(401);
	});
});
