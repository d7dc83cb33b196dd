/**
 * Photos on the device: checked and given a thumbnail when taken, kept in IndexedDB with their
 * event (see outbox.addEntry), and uploaded by the sync loop once the event has reached the
 * server. A photo leaves the device only when the server has it; one the server refuses stays,
 * with the reason, until a person discards it.
 */
import { sniffImage } from '$lib/images/image-type';
import { retryDelayMs } from '$lib/client/sync-schedule';
import { PHOTO_LIMIT_BYTES, THUMB_MAX_PX } from '$lib/schemas/attachments';
import { clientDb, type PhotoBlob } from './db';
import { newUuid } from './device-id';
import type { NewPhoto } from './outbox';

export type { PhotoBlob } from './db';

const listeners = new Set<() => void>();
let channel: BroadcastChannel | null | undefined;

function tabChannel(): BroadcastChannel | null {
	if (channel === undefined) {
		channel =
			typeof BroadcastChannel === 'function' ? new BroadcastChannel('nestmark-photos') : null;
		if (channel) channel.onmessage = () => listeners.forEach((l) => l());
	}
	return channel;
}

function notify() {
	listeners.forEach((l) => l());
	tabChannel()?.postMessage('changed');
}

/** Calls `listener` whenever the stored photos change, in this tab or another. */
export function onPhotosChange(listener: () => void): () => void {
	tabChannel();
	listeners.add(listener);
	return () => listeners.delete(listener);
}

/**
 * A small JPEG (longest side ≤ THUMB_MAX_PX) of `blob`, made on the phone so the server never
 * decodes images; null when this browser cannot decode it.
 */
export async function makeThumb(blob: Blob): Promise<Blob | null> {
	try {
		const bitmap = await createImageBitmap(blob);
		const scale = Math.min(1, THUMB_MAX_PX / Math.max(bitmap.width, bitmap.height));
		const canvas = document.createElement('canvas');
		canvas.width = Math.max(1, Math.round(bitmap.width * scale));
		canvas.height = Math.max(1, Math.round(bitmap.height * scale));
		const ctx = canvas.getContext('2d');
		if (!ctx) return null;
		// JPEG has no transparency: a white ground, not black, under a transparent PNG.
		ctx.fillStyle = '#fff';
		ctx.fillRect(0, 0, canvas.width, canvas.height);
		ctx.drawImage(bitmap, 0, 0, canvas.width, canvas.height);
		bitmap.close();
		return await new Promise((resolve) => canvas.toBlob((b) => resolve(b), 'image/jpeg', 0.8));
	} catch {
		return null;
	}
}

/** A photo picked by the person, ready to go with an event; or why it cannot. */
export type PreparedPhoto = { ok: true; photo: NewPhoto } | { ok: false; error: string };

/** Checks a picked file as the server will (type by content, size) and makes its thumbnail. */
export async function preparePhoto(file: Blob & { name?: string }): Promise<PreparedPhoto> {
	const name = file.name ? `“${file.name}”` : 'The file';
	if (file.size > PHOTO_LIMIT_BYTES) {
		const mb = (file.size / 1024 / 1024).toFixed(1);
		return { ok: false, error: `${name} is ${mb} MB; photos may be at most 8 MB.` };
	}
	const head = new Uint8Array(await file.slice(0, 64 * 1024).arrayBuffer());
	const info = sniffImage(head);
	if (!info) return { ok: false, error: `${name} is not a JPEG, PNG or WebP photo.` };
	const thumb = await makeThumb(file);
	return {
		ok: true,
		photo: { id: newUuid(), blob: file, contentType: info.type, ...(thumb ? { thumb } : {}) }
	};
}

/** Every photo on the device, oldest first. */
export async function listPhotos(): Promise<PhotoBlob[]> {
	const all = await (await clientDb()).getAll('photos');
	return all.sort((a, b) => a.createdAt.localeCompare(b.createdAt));
}

/** Photos waiting to upload, and photos the server refused. */
export async function photoCounts(): Promise<{ pending: number; rejected: number }> {
	const all = await (await clientDb()).getAll('photos');
	const rejected = all.filter((p) => p.error).length;
	return { pending: all.length - rejected, rejected };
}

/** Removes a photo a person chose to drop. */
export async function discardPhoto(id: string): Promise<void> {
	await (await clientDb()).delete('photos', id);
	notify();
}

/** How an upload pass ended, and how many photos could still go now. */
export interface UploadPass {
	outcome: 'ok' | 'network' | 'signed-out' | 'server';
	problem?: string;
	remaining: number;
}

/**
 * Uploads the photos whose event has left the outbox (the server has it), oldest first. Stops at
 * the first failure that is not about the photo itself; each photo backs off on its own.
 */
export async function uploadWaiting(fetcher: typeof fetch, now = Date.now()): Promise<UploadPass> {
	const db = await clientDb();
	const inOutbox = new Set(await db.getAllKeys('outbox'));
	const ready = (p: PhotoBlob) => !p.error && !inOutbox.has(p.eventId);
	const due = (await listPhotos()).filter(
		(p) => ready(p) && (!p.nextAttemptAt || Date.parse(p.nextAttemptAt) <= now)
	);
	const left = async () => (await listPhotos()).filter(ready).length;
	for (const photo of due) {
		const form = new FormData();
		form.set('fixtureCode', photo.fixtureCode);
		form.set('eventId', photo.eventId);
		form.set('file', photo.blob, `${photo.id}.${photo.contentType.split('/')[1]}`);
		if (photo.thumb) form.set('thumb', photo.thumb, `${photo.id}.thumb.jpg`);
		let res: Response;
		try {
			res = await fetcher(`/api/attachments/${photo.id}`, { method: 'PUT', body: form });
		} catch {
			await backOff(photo, now);
			return { outcome: 'network', remaining: await left() };
		}
		if (res.status === 401) return { outcome: 'signed-out', remaining: await left() };
		const body = (await res.json().catch(() => null)) as { error?: string } | null;
		if (res.ok) {
			await db.delete('photos', photo.id);
		} else if ([400, 403, 404, 409, 413].includes(res.status)) {
			await db.put('photos', { ...photo, error: body?.error ?? `Refused (${res.status}).` });
		} else {
			await backOff(photo, now);
			notify();
			return {
				outcome: 'server',
				problem: body?.error ?? `The server answered ${res.status} to a photo upload.`,
				remaining: await left()
			};
		}
		notify();
	}
	return { outcome: 'ok', remaining: await left() };
}

async function backOff(photo: PhotoBlob, now: number): Promise<void> {
	const attempts = (photo.attempts ?? 0) + 1;
	const next = new Date(now + retryDelayMs(attempts)).toISOString();
	await (await clientDb()).put('photos', { ...photo, attempts, nextAttemptAt: next });
}
