/**
 * The insert step of ingest (./ingest.ts): the events of a batch on their way through, and the
 * insert of the new ones, telling apart new, duplicate and clashing ids.
 */
import type { PoolConnection } from 'mysql2/promise';
import type { SyncEvent } from '../schemas/events';
import {
	insertEvents,
	selectContentHashes,
	type EventInsert,
	type HealthFixture
} from './db/health-sql';
import { errnoOf } from './db/transaction';
import type { Actor } from './guard';

/** The answer for one event of a batch. */
export interface SyncResult {
	id: string;
	status: 'accepted' | 'duplicate' | 'rejected';
	error?: string;
}

/** One event of the batch on its way through ingest. */
export interface Item {
	index: number;
	/** The id as the phone sent it, echoed in the result. */
	sentId: string;
	/**
	 * The id in lower case, as stored: the column compares ids without regard to case, so one
	 * spelling must be chosen for the fold order to match a rebuild.
	 */
	id: string;
	event?: SyncEvent;
	hash?: string;
	fixture?: HealthFixture;
	/** First event of the batch with the same id, when this one repeats it. */
	repeatOf?: Item;
	result?: SyncResult;
}

/** Who sends the batch, from where, and the server clock for it. */
export interface Sender {
	actor: Actor;
	deviceId: string;
	now: Date;
}

/** MariaDB: duplicate entry for a unique key. */
export const ER_DUP_ENTRY = 1062;

export const CLASH =
	'An event with this id already exists with different content; it was not changed.';

/** Content hashes of those of `items` already stored, by (lower-case) id. */
export function storedHashes(conn: PoolConnection, items: Item[]): Promise<Map<string, string>> {
	return selectContentHashes(
		conn,
		items.map((i) => i.id)
	);
}

/** Duplicate or clash when the id is stored; undefined when it is not. */
export function judgeStored(item: Item, stored: Map<string, string>): SyncResult | undefined {
	const hash = stored.get(item.id);
	if (hash === undefined) return undefined;
	return hash === item.hash
		? { id: item.sentId, status: 'duplicate' }
		: { id: item.sentId, status: 'rejected', error: CLASH };
}

/** The events row of an item. */
function eventRow(item: Item, sender: Sender): EventInsert {
	const e = item.event!;
	return {
		id: e.id,
		fixtureId: item.fixture!.id,
		kind: e.kind,
		occurredAt: new Date(e.occurredAt),
		receivedAt: sender.now,
		userId: sender.actor.id,
		deviceId: sender.deviceId,
		payload: e.payload,
		contentHash: item.hash!
	};
}

/**
 * Inserts the candidates and returns those that were new. Optimistic: most batches are sent
 * once, so they are inserted straight away; only when the primary key says some id is already
 * there (a retry, or another phone's batch that just committed) are the stored ids looked up and
 * the rest inserted. A failed statement is undone on its own; the transaction goes on.
 */
export async function insertNew(
	conn: PoolConnection,
	sender: Sender,
	candidates: Item[]
): Promise<Item[]> {
	const rows = (list: Item[]) => list.map((item) => eventRow(item, sender));
	try {
		await insertEvents(conn, rows(candidates));
		for (const item of candidates) item.result = { id: item.sentId, status: 'accepted' };
		return candidates;
	} catch (err) {
		const errno = errnoOf(err);
		// The schemas refuse what the database cannot store; should something still slip past
		// them, it costs that one event, never the batch.
		if (errno !== undefined && DATA_ERRORS.has(errno)) {
			return insertOneByOne(conn, candidates, (item) => rows([item]));
		}
		if (errno !== ER_DUP_ENTRY) throw err;
	}
	const stored = await storedHashes(conn, candidates);
	const fresh: Item[] = [];
	for (const item of candidates) {
		const known = judgeStored(item, stored);
		if (known) item.result = known;
		else {
			item.result = { id: item.sentId, status: 'accepted' };
			fresh.push(item);
		}
	}
	// Another duplicate here means a third batch raced this one: the whole batch is retried.
	if (fresh.length) await insertEvents(conn, rows(fresh));
	return fresh;
}

/**
 * MariaDB errors that say a value cannot be stored (a CHECK such as json_valid, a string the
 * column's character set refuses, too long, out of range, a bad date) rather than that the
 * database is in trouble.
 */
const DATA_ERRORS = new Set([4025, 3140, 1366, 1406, 1264, 1292, 1367]);

/**
 * The slow path of insertNew: one statement per event, so an event the database refuses is
 * rejected alone (a failed statement is undone on its own; the transaction goes on).
 */
async function insertOneByOne(
	conn: PoolConnection,
	candidates: Item[],
	row: (item: Item) => EventInsert[]
): Promise<Item[]> {
	const stored = await storedHashes(conn, candidates);
	const fresh: Item[] = [];
	for (const item of candidates) {
		const known = judgeStored(item, stored);
		if (known) {
			item.result = known;
			continue;
		}
		try {
			await insertEvents(conn, row(item));
		} catch (err) {
			const errno = errnoOf(err);
			if (errno === undefined || !DATA_ERRORS.has(errno)) throw err;
			item.result = {
				id: item.sentId,
				status: 'rejected',
				error:
					'The database could not store this event (a value it cannot hold); check its text and numbers.'
			};
			continue;
		}
		item.result = { id: item.sentId, status: 'accepted' };
		fresh.push(item);
	}
	return fresh;
}
