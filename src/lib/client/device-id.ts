/** The device's stable id: made once, kept in IndexedDB, sent with every sync. */
import { clientDb } from './db';

/** A random (version 4) UUID; crypto.randomUUID exists only on secure origins, so build one if needed. */
export function newUuid(): string {
	if (typeof crypto.randomUUID === 'function') return crypto.randomUUID();
	const b = crypto.getRandomValues(new Uint8Array(16));
	b[6] = (b[6] & 0x0f) | 0x40;
	b[8] = (b[8] & 0x3f) | 0x80;
	const h = [...b].map((x) => x.toString(16).padStart(2, '0')).join('');
	return `${h.slice(0, 8)}-${h.slice(8, 12)}-${h.slice(12, 16)}-${h.slice(16, 20)}-${h.slice(20)}`;
}

let cached: string | undefined;

/** This device's id, created on first call (one transaction, so two tabs agree on it). */
export async function getDeviceId(): Promise<string> {
	if (cached) return cached;
	const db = await clientDb();
	const tx = db.transaction('meta', 'readwrite');
	let id = await tx.store.get('deviceId');
	if (!id) {
		id = newUuid();
		await tx.store.put(id, 'deviceId');
	}
	await tx.done;
	cached = id;
	return id;
}
