/**
 * The outbox: every event the device logs is written here first, whatever the network, and
 * leaves only when the server has it (accepted or duplicate). Rejected entries stay, with the
 * server's reason, until a person fixes or discards them.
 */
import type { EventKind, FieldErrors } from '$lib/schemas/events';
import { clientDb, type OutboxEntry, type PhotoBlob } from './db';
import { newUuid } from './device-id';

export type { OutboxEntry, OutboxState } from './db';

/** What a screen hands over to log. */
export interface NewEvent {
	fixtureCode: string;
	kind: EventKind;
	payload: Record<string, unknown>;
	/** Defaults to now (device clock). */
	occurredAt?: string;
	/** Photos that go with the event (ids listed in its payload), kept until uploaded. */
	photos?: NewPhoto[];
}

/** A photo taken for an event, before it is written to the device. */
export interface NewPhoto {
	id: string;
	blob: Blob;
	contentType: string;
	thumb?: Blob;
}

export type AddResult = { ok: true; entry: OutboxEntry } | { ok: false; errors: FieldErrors };

/** One per-event answer of the sync API. */
export interface SyncResult {
	id: string;
	status: 'accepted' | 'duplicate' | 'rejected';
	error?: string;
}

const listeners = new Set<() => void>();
// One channel object per tab: a channel never hears its own messages, so this tab's listeners
// are called directly and the channel carries only other tabs' changes.
let channel: BroadcastChannel | null | undefined;

function tabChannel(): BroadcastChannel | null {
	if (channel === undefined) {
		channel =
			typeof BroadcastChannel === 'function' ? new BroadcastChannel('nestmark-outbox') : null;
		if (channel) channel.onmessage = () => listeners.forEach((l) => l());
	}
	return channel;
}

function notify() {
	listeners.forEach((l) => l());
	tabChannel()?.postMessage('changed');
}

/** Calls `listener` whenever the outbox changes, in this tab or another; returns the unsubscribe. */
export function onOutboxChange(listener: () => void): () => void {
	tabChannel();
	listeners.add(listener);
	return () => listeners.delete(listener);
}

/** Checks an event with the shared schema (loaded on first use, so light pages stay light). */
async function validate(raw: {
	id: string;
	fixtureCode: string;
	kind: string;
	occurredAt: string;
	payload: Record<string, unknown>;
}) {
	const { parseSyncEvent } = await import('$lib/schemas/events');
	return parseSyncEvent(raw);
}

/**
 * A record that the new entry replaces on the device (a finished break-in run): it is deleted in
 * the same transaction as the entry is written, so the event is never written twice or lost.
 */
export interface Replaces {
	store: 'breakInRuns';
	key: string;
}

/**
 * Validates `input` and writes it to the outbox as waiting; nothing is written when it is invalid,
 * or when the record it `replaces` is no longer there (already finished or discarded).
 */
export async function addEntry(
	input: NewEvent,
	loggedBy?: string,
	replaces?: Replaces
): Promise<AddResult> {
	const parsed = await validate({
		id: newUuid(),
		fixtureCode: input.fixtureCode,
		kind: input.kind,
		occurredAt: input.occurredAt ?? new Date().toISOString(),
		payload: input.payload
	});
	if (!parsed.ok) return { ok: false, errors: parsed.errors };
	const entry: OutboxEntry = {
		...parsed.event,
		payload: parsed.event.payload as Record<string, unknown>,
		state: 'waiting',
		createdAt: new Date().toISOString(),
		attempts: 0,
		...(loggedBy ? { loggedBy } : {})
	};
	// One transaction for the event, its photos and the record it replaces: never an event whose
	// photos were lost, and never a finished run that is logged twice.
	const stores = replaces
		? (['outbox', 'photos', replaces.store] as const)
		: (['outbox', 'photos'] as const);
	const tx = (await clientDb()).transaction(stores, 'readwrite');
	if (replaces) {
		const gone = !(await tx.objectStore(replaces.store).get(replaces.key));
		if (gone) {
			tx.abort();
			await tx.done.catch(() => {});
			return { ok: false, errors: { '(event)': ['This was already logged or discarded.'] } };
		}
		await tx.objectStore(replaces.store).delete(replaces.key);
	}
	await tx.objectStore('outbox').add(entry);
	for (const p of input.photos ?? []) {
		const photo: PhotoBlob = {
			id: p.id,
			eventId: entry.id,
			fixtureCode: entry.fixtureCode,
			blob: p.blob,
			contentType: p.contentType,
			createdAt: entry.createdAt,
			...(p.thumb ? { thumb: p.thumb } : {}),
			attempts: 0
		};
		await tx.objectStore('photos').put(photo);
	}
	await tx.done;
	notify();
	return { ok: true, entry };
}

/** Every entry, oldest first. */
export async function listEntries(): Promise<OutboxEntry[]> {
	return (await clientDb()).getAllFromIndex('outbox', 'by-created');
}

/** The entries of one fixture, oldest first. */
export async function listForFixture(code: string): Promise<OutboxEntry[]> {
	const rows = await (await clientDb()).getAllFromIndex('outbox', 'by-fixture', code);
	return rows.sort((a, b) => a.createdAt.localeCompare(b.createdAt));
}

/** Entries to send, oldest first: waiting ones, and any left 'sending' by a page that closed mid-request. */
export async function sendableEntries(): Promise<OutboxEntry[]> {
	return (await listEntries()).filter((e) => e.state !== 'rejected');
}

/** How many entries wait (or are in flight) and how many were rejected. */
export async function outboxCounts(): Promise<{ pending: number; rejected: number }> {
	const db = await clientDb();
	const [waiting, sending, rejected] = await Promise.all([
		db.countFromIndex('outbox', 'by-state', 'waiting'),
		db.countFromIndex('outbox', 'by-state', 'sending'),
		db.countFromIndex('outbox', 'by-state', 'rejected')
	]);
	return { pending: waiting + sending, rejected };
}

/** Marks entries as in flight (only those still present and not rejected); returns the ones marked. */
export async function markSending(ids: string[]): Promise<OutboxEntry[]> {
	const tx = (await clientDb()).transaction('outbox', 'readwrite');
	const marked: OutboxEntry[] = [];
	for (const id of ids) {
		const e = await tx.store.get(id);
		if (!e || e.state === 'rejected') continue;
		const next = { ...e, state: 'sending' as const, attempts: e.attempts + 1 };
		await tx.store.put(next);
		marked.push(next);
	}
	await tx.done;
	notify();
	return marked;
}

/** Puts in-flight entries back to waiting (the request failed without an answer). */
export async function markWaiting(ids: string[]): Promise<void> {
	const tx = (await clientDb()).transaction('outbox', 'readwrite');
	for (const id of ids) {
		const e = await tx.store.get(id);
		if (e?.state === 'sending') await tx.store.put({ ...e, state: 'waiting' });
	}
	await tx.done;
	notify();
}

/**
 * Applies the server's answers in one transaction: accepted and duplicate entries leave the
 * outbox, rejected ones stay with the reason. Entries without an answer go back to waiting.
 */
export async function applyResults(sentIds: string[], results: SyncResult[]): Promise<void> {
	const byId = new Map(results.map((r) => [r.id, r]));
	const tx = (await clientDb()).transaction('outbox', 'readwrite');
	for (const id of sentIds) {
		const e = await tx.store.get(id);
		if (!e) continue;
		const r = byId.get(id);
		if (r?.status === 'accepted' || r?.status === 'duplicate') await tx.store.delete(id);
		else if (r?.status === 'rejected') {
			await tx.store.put({ ...e, state: 'rejected', error: r.error ?? 'Refused by the server.' });
		} else await tx.store.put({ ...e, state: 'waiting' });
	}
	await tx.done;
	notify();
}

/** Marks entries rejected with `error` (the server refused the request that carried them alone). */
export async function rejectEntries(ids: string[], error: string): Promise<void> {
	const tx = (await clientDb()).transaction('outbox', 'readwrite');
	for (const id of ids) {
		const e = await tx.store.get(id);
		if (e) await tx.store.put({ ...e, state: 'rejected', error });
	}
	await tx.done;
	notify();
}

/**
 * Removes an entry a person chose to drop. `onlyIfWaiting` is the undo case: an entry already on
 * its way to the server cannot be taken back. Returns whether it was removed.
 */
export async function discardEntry(id: string, onlyIfWaiting = false): Promise<boolean> {
	const tx = (await clientDb()).transaction(['outbox', 'photos'], 'readwrite');
	const store = tx.objectStore('outbox');
	const e = await store.get(id);
	const removable = !!e && (!onlyIfWaiting || e.state === 'waiting');
	if (removable) {
		await store.delete(id);
		// Its photos go with it: they belong to no event the server will ever have.
		const photos = tx.objectStore('photos');
		for (const key of await photos.index('by-event').getAllKeys(id)) await photos.delete(key);
	}
	await tx.done;
	if (removable) notify();
	return removable;
}

/**
 * Replaces a rejected entry by a corrected one with a new id (the rejected id may be known to the
 * server with other content), keeping its time and fixture. Invalid corrections change nothing.
 */
export async function fixEntry(id: string, payload: Record<string, unknown>): Promise<AddResult> {
	const db = await clientDb();
	const old = await db.get('outbox', id);
	if (!old) return { ok: false, errors: { '(event)': ['This entry is no longer in the outbox.'] } };
	const parsed = await validate({
		id: newUuid(),
		fixtureCode: old.fixtureCode,
		kind: old.kind,
		occurredAt: old.occurredAt,
		payload
	});
	if (!parsed.ok) return { ok: false, errors: parsed.errors };
	const { error: _refused, ...kept } = old;
	const entry: OutboxEntry = {
		...kept,
		...parsed.event,
		payload: parsed.event.payload as Record<string, unknown>,
		state: 'waiting',
		attempts: 0
	};
	const tx = db.transaction(['outbox', 'photos'], 'readwrite');
	await tx.objectStore('outbox').delete(id);
	await tx.objectStore('outbox').add(entry);
	// Photos follow the corrected entry (its new id) if it still lists them; else they go.
	const listed = new Set(Array.isArray(entry.payload.photoIds) ? entry.payload.photoIds : []);
	const photos = tx.objectStore('photos');
	for (const p of await photos.index('by-event').getAll(id)) {
		if (listed.has(p.id)) await photos.put({ ...p, eventId: entry.id });
		else await photos.delete(p.id);
	}
	await tx.done;
	notify();
	return { ok: true, entry };
}
