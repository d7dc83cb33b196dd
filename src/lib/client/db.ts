/**
 * The device's one IndexedDB database, `nestmark`: a copy of the register (snapshot), the outbox
 * of events not yet accepted by the server, photo blobs waiting to upload, break-in runs in
 * progress, and small settings.
 * Browser only; every caller runs after mount or inside a browser-side load.
 */
import { openDB, type DBSchema, type IDBPDatabase } from 'idb';
import type { RunCycle } from '$lib/domain/break-in-run';
import type { SnapshotFixture } from '$lib/schemas/register-snapshot';

/** Where an outbox entry stands: not sent yet, in flight, or refused by the server. */
export type OutboxState = 'waiting' | 'sending' | 'rejected';

/** One event the device logged, exactly as it will be sent, plus its place in the queue. */
export interface OutboxEntry {
	/** The event id (a UUID made here); the server keys on it, so resending is harmless. */
	id: string;
	fixtureCode: string;
	kind: string;
	/** Device clock, ISO 8601. */
	occurredAt: string;
	payload: Record<string, unknown>;
	state: OutboxState;
	/** The server's reason, when rejected. */
	error?: string;
	/** When it was written here (ISO 8601); the queue is sent oldest first. */
	createdAt: string;
	/** Who was signed in when it was logged, for the outbox page. */
	loggedBy?: string;
	/** How many times it was sent without an answer for it. */
	attempts: number;
}

/** A photo kept until its upload succeeds (after its event has reached the server). */
export interface PhotoBlob {
	id: string;
	eventId: string;
	fixtureCode: string;
	blob: Blob;
	contentType: string;
	createdAt: string;
	/** The small JPEG made on the phone when the photo was taken, if the browser could. */
	thumb?: Blob;
	/** Uploads tried without success, and when to try next (ISO 8601), for the back-off. */
	attempts?: number;
	nextAttemptAt?: string;
	/** The server's reason when it refused the photo; it then waits for a person. */
	error?: string;
}

/** A break-in run being counted on this device: one per fixture, saved after every tap. */
export interface BreakInRunRecord {
	fixtureCode: string;
	/** The device it is counted on (runs never travel between devices). */
	deviceId: string;
	/** Who started it, for the resume prompt. */
	startedBy?: string;
	startedAt: string;
	updatedAt: string;
	/** One entry per counted cycle, oldest first: that seating's readings (µm) or null. */
	cycles: RunCycle[];
	note: string;
}

/** Keys of the `meta` store. */
export interface MetaValues {
	deviceId: string;
	/** Last time the server answered a sync (ISO 8601). */
	lastSyncAt: string;
	/** ETag of the stored register snapshot. */
	snapshotEtag: string;
	/** When the stored snapshot was last confirmed current (ISO 8601). */
	snapshotCheckedAt: string;
	/**
	 * JSON `{ userId, orders }`: the open work orders assigned to the person the snapshot was
	 * fetched for (`/work` reads it offline); stored with the snapshot, in its transaction.
	 */
	myWorkOrders: string;
}

interface NestmarkDB extends DBSchema {
	snapshot: { key: string; value: SnapshotFixture };
	outbox: {
		key: string;
		value: OutboxEntry;
		indexes: { 'by-fixture': string; 'by-created': string; 'by-state': OutboxState };
	};
	photos: { key: string; value: PhotoBlob; indexes: { 'by-event': string } };
	breakInRuns: { key: string; value: BreakInRunRecord };
	meta: { key: keyof MetaValues; value: string };
}

export type ClientDb = IDBPDatabase<NestmarkDB>;

const DB_NAME = 'nestmark';
const DB_VERSION = 2;

let opening: Promise<ClientDb> | undefined;

/** Opens (once per page) the device database, creating its stores on first use. */
export function clientDb(): Promise<ClientDb> {
	opening ??= openDB<NestmarkDB>(DB_NAME, DB_VERSION, {
		upgrade(db, oldVersion) {
			if (oldVersion < 1) {
				db.createObjectStore('snapshot', { keyPath: 'code' });
				const outbox = db.createObjectStore('outbox', { keyPath: 'id' });
				outbox.createIndex('by-fixture', 'fixtureCode');
				outbox.createIndex('by-created', 'createdAt');
				outbox.createIndex('by-state', 'state');
				const photos = db.createObjectStore('photos', { keyPath: 'id' });
				photos.createIndex('by-event', 'eventId');
				db.createObjectStore('meta');
			}
			// Version 2 adds a store; the others and their data are kept as they are.
			if (oldVersion < 2) db.createObjectStore('breakInRuns', { keyPath: 'fixtureCode' });
		},
		// Another tab opened a newer version (after an app update): let it upgrade.
		blocking() {
			void opening?.then((db) => db.close());
			opening = undefined;
		},
		terminated() {
			opening = undefined;
		}
	});
	return opening;
}

/** Reads one setting. */
export async function getMeta<K extends keyof MetaValues>(key: K): Promise<string | undefined> {
	return (await clientDb()).get('meta', key);
}

/** Writes one setting. */
export async function setMeta<K extends keyof MetaValues>(key: K, value: string): Promise<void> {
	await (await clientDb()).put('meta', value, key);
}
