/**
 * Ingest of synced events: the server side of the phone's outbox.
 *
 * A batch is answered per event (accepted, duplicate or rejected) and written in one database
 * transaction: the new events, the derived state of every fixture they touch, and the flags that
 * state raises or clears. A failure anywhere rolls the whole batch back; the phone keeps its
 * outbox and the retry gets `accepted` or `duplicate`, never a lost or doubled event.
 *
 * Decisions worth knowing:
 * - Content hash. SHA-256 of the canonical JSON of { fixtureCode (canonical), kind, occurredAt
 *   (UTC, ms), payload (as parsed, defaults filled, keys sorted) }. The id, the device and the
 *   user are left out on purpose: the hash says *what happened*, not who carried it, so an outbox
 *   entry re-sent after another person signed in on the same phone is still a duplicate, not a
 *   clash. The same id with other content is refused and the stored event is never overwritten.
 * - Order of folding. State is a fold over the events in (occurredAt, id) order — the order things
 *   happened at the fixture, not the order they reached the server — so `cycles since cleaning`
 *   means what it says even when a phone syncs an hour of offline work late. New events that all
 *   come after the last folded one are applied incrementally (the usual case, O(1) per event);
 *   if any is older, that fixture is recomputed from its full history in the same transaction.
 *   Either way the stored state equals a rebuild that folds the history in (occurredAt, id) order.
 * - Flags. Evaluated once per fixture per batch, on the state after the batch (evaluation is the
 *   costly part of ingest; doing it per event made large batches several times slower). A flag
 *   that appears or disappears is attributed to the event after which it first did so, found by
 *   bisection over the states after each new event; after a recompute, to the fixture's latest
 *   new event. A flag that opened and closed again inside one batch leaves no row. `now` (the
 *   receive time) is the clock for calendar rules and for raisedAt / clearedAt.
 * - Concurrency. The transaction runs at READ COMMITTED and locks the touched fixture_state rows
 *   (FOR UPDATE, in fixture id order, so two batches cannot deadlock on them). Two phones sending
 *   the same new id at once: the second waits on the fixture lock, or hits the primary key; the
 *   whole batch is then retried and answers `duplicate`.
 * - One connection. The batch takes one pooled connection and reads everything through it
 *   (fixtures, policies, the transaction); it never asks the pool for a second one while holding
 *   it, so any number of concurrent batches drain through the pool instead of waiting on each
 *   other (see db/pool.ts).
 * - Speed. A handful of statements per batch, not per event: one lookup of the fixtures, one of
 *   their policies, one of the existing ids, one locking read of the states with their open flags,
 *   one multi-row insert of the events, one multi-row upsert of the states and one of the flags
 *   (the statements are in db/health-sql.ts; the fold step in ingest-fold.ts). Events carrying a
 *   `workOrderId` add one locking read of those orders (before the states, the same order for
 *   every batch), one update and one history insert; flags raised add one read and two inserts
 *   when they link to open orders (ingest-work-orders.ts).
 */
import { createHash } from 'node:crypto';
import type { PoolConnection } from 'mysql2/promise';
import { normaliseFixtureCode } from '../domain/fixture-code';
import type { Policy } from '../domain/policy';
import { can, rolesThatCan } from '../permissions';
import {
	MAX_EVENTS_PER_SYNC,
	parseSyncEvent,
	syncRequestSchema,
	type EventKind,
	type SyncEvent
} from '../schemas/events';
import { ROLES, type Role } from '../schemas/roles';
import { canonicalJson } from './canonical-json';
import { withConnection } from './db';
import { selectFixturesByCode } from './db/health-sql';
import { errnoOf, isLockConflict, transactionOn } from './db/transaction';
import type { Actor } from './guard';
import { foldNewEvents, lockStates } from './ingest-fold';
import {
	CLASH,
	ER_DUP_ENTRY,
	insertNew,
	judgeStored,
	storedHashes,
	type Item,
	type Sender,
	type SyncResult
} from './ingest-insert';
import {
	applyOrderEffects,
	linkRaisedFlags,
	lockOrders,
	orderReferenceRefusal,
	type LockedOrder
} from './ingest-work-orders';
import { policiesFor } from './state-store';

/** Largest sync request body accepted (declared and actually read). */
export const SYNC_BODY_LIMIT_BYTES = 2 * 1024 * 1024;
/** How far ahead of the server clock an event's occurredAt may be (phone clocks drift). */
export const FUTURE_TOLERANCE_MS = 10 * 60 * 1000;
/** Attempts of the batch transaction when it meets a deadlock, lock timeout or id race. */
const TRANSACTION_ATTEMPTS = 4;

export { MAX_EVENTS_PER_SYNC };

export type { SyncResult };

/** Options of ingestBatch. */
export interface IngestOptions {
	/** The server clock for this batch (receivedAt, flag times, the future check); default now. */
	now?: Date;
}

/** What the envelope check found: the events to judge one by one, or why the request is refused. */
export type Envelope =
	| { ok: true; deviceId: string; events: unknown[] }
	| { ok: false; error: string; fields?: Record<string, string[]> };

/**
 * Checks the request envelope only ({ deviceId, events: 1..500 }); events are judged one by one
 * later, so one bad event never refuses the others.
 */
export function parseEnvelope(body: unknown): Envelope {
	if (body === null || typeof body !== 'object' || Array.isArray(body)) {
		return { ok: false, error: 'The body must be a JSON object { deviceId, events }.' };
	}
	const parsed = syncRequestSchema.safeParse(body);
	if (parsed.success)
		return { ok: true, deviceId: parsed.data.deviceId, events: parsed.data.events };
	const fields: Record<string, string[]> = {};
	for (const issue of parsed.error.issues) {
		const key = issue.path.length ? issue.path.join('.') : '(body)';
		const message =
			issue.code === 'invalid_type' && issue.path[0] === 'events'
				? 'events must be an array of events'
				: issue.code === 'invalid_type' && issue.path[0] === 'deviceId'
					? 'deviceId is required (a text of 1 to 100 characters)'
					: issue.message;
		(fields[key] ??= []).push(message);
	}
	const error = Object.entries(fields)
		.map(([k, m]) => `${k}: ${m.join('; ')}`)
		.join('; ');
	return { ok: false, error: `Malformed sync request — ${error}.`, fields };
}

/* ------------------------------------------------------------------------------------------ */
/* Judging single events                                                                      */

const ROLE_PLURALS: Record<Role, string> = {
	operator: 'operators',
	technician: 'technicians',
	supervisor: 'supervisors',
	planner: 'planners',
	admin: 'admins'
};

const KIND_PLURALS: Record<EventKind, string> = {
	reseat: 'reseats',
	cleaning: 'cleanings',
	inspection: 'inspections',
	'break-in': 'break-in runs',
	'part-swap': 'part swaps',
	move: 'moves',
	hold: 'holds',
	release: 'releases',
	note: 'notes'
};

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

function listWords(words: string[], joiner = 'and'): string {
	if (words.length <= 1) return words.join('');
	return `${words.slice(0, -1).join(', ')} ${joiner} ${words.at(-1)}`;
}

/** "Operators cannot log inspections; a technician, supervisor or admin can." */
export function roleRefusal(roles: readonly Role[], kind: EventKind): string {
	const who = roles.length
		? `${capitalise(listWords(ROLES.filter((r) => roles.includes(r)).map((r) => ROLE_PLURALS[r])))} cannot`
		: 'Your account has no role that may';
	const allowed = rolesThatCan('event.log', { kind });
	const hint = allowed.length ? `; a ${listWords(allowed, 'or')} can` : '';
	return `${who} log ${KIND_PLURALS[kind]}${hint}.`;
}

function minutesAhead(ms: number): string {
	const minutes = Math.round(ms / 60_000);
	if (minutes < 120) return `${minutes} minutes`;
	const hours = Math.round(minutes / 60);
	if (hours < 72) return `${hours} hours`;
	return `${Math.round(hours / 24)} days`;
}

function validationMessage(errors: Record<string, string[]>): string {
	const parts = Object.entries(errors).map(([path, messages]) => `${path}: ${messages.join(', ')}`);
	return `Invalid event — ${parts.join('; ')}.`;
}

/** SHA-256 of what an event says happened (see the module comment for what is left out). */
export function contentHash(e: Pick<SyncEvent, 'fixtureCode' | 'kind' | 'occurredAt' | 'payload'>) {
	const canonical = canonicalJson({
		fixtureCode: e.fixtureCode,
		kind: e.kind,
		occurredAt: e.occurredAt,
		payload: e.payload
	});
	return createHash('sha256').update(canonical).digest('hex');
}

/* ------------------------------------------------------------------------------------------ */
/* The batch                                                                                  */

/**
 * Ingests one sync batch for `actor` from device `deviceId`: validates each event, stores the new
 * ones and updates the derived state and flags of their fixtures in one transaction. Returns one
 * result per event, in request order.
 */
export async function ingestBatch(
	actor: Actor,
	deviceId: string,
	rawEvents: readonly unknown[],
	options: IngestOptions = {}
): Promise<SyncResult[]> {
	const sender = { actor, deviceId, now: options.now ?? new Date() };
	const items = toItems(rawEvents);
	// One connection for the whole batch, and everything the batch reads goes through it: the
	// fixtures, their policies, the transaction. Asking the pool for a second connection while
	// holding this one wedged the server once every connection was held by a batch doing so.
	await withConnection(async (conn) => {
		const policies = await prepare(conn, items);
		await transactionOn(conn, () => judgeAndStore(conn, sender, items, policies), {
			attempts: TRANSACTION_ATTEMPTS,
			retryable: isRetryable,
			// Forget this attempt's verdicts on the new events and judge them again.
			beforeRetry: () => {
				for (const item of items) if (item.event) item.result = undefined;
			}
		});
	});
	return items.map((item) => item.result!);
}

/**
 * The same ingest inside a transaction the caller holds on `conn` (the register's move, written
 * in the same transaction as the fixture's change): same judging, content hash, fold and flag
 * diff as a phone's batch. Not retried here; the caller's transaction is.
 */
export async function ingestOn(
	conn: PoolConnection,
	actor: Actor,
	deviceId: string,
	rawEvents: readonly unknown[],
	options: IngestOptions = {}
): Promise<SyncResult[]> {
	const sender = { actor, deviceId, now: options.now ?? new Date() };
	const items = toItems(rawEvents);
	const policies = await prepare(conn, items);
	await judgeAndStore(conn, sender, items, policies);
	return items.map((item) => item.result!);
}

/** Parses each event; a repeated id inside the batch follows the first with that id. */
function toItems(rawEvents: readonly unknown[]): Item[] {
	const items: Item[] = rawEvents.map((raw, index) => {
		const parsed = parseSyncEvent(raw);
		if (!parsed.ok) {
			const sentId = parsed.id ?? '';
			return {
				index,
				sentId,
				id: sentId.toLowerCase(),
				result: { id: sentId, status: 'rejected', error: validationMessage(parsed.errors) }
			};
		}
		const id = parsed.event.id.toLowerCase();
		return { index, sentId: parsed.event.id, id, event: { ...parsed.event, id } };
	});
	const firstById = new Map<string, Item>();
	for (const item of items) {
		if (!item.event) continue;
		const first = firstById.get(item.id);
		if (first) item.repeatOf = first;
		else firstById.set(item.id, item);
	}
	return items;
}

/** Finds each event's fixture, hashes its content and reads the fixtures' policies. */
async function prepare(conn: PoolConnection, items: Item[]): Promise<Map<number, Policy>> {
	const codes = new Set<string>();
	for (const item of items) {
		if (!item.event) continue;
		const reading = normaliseFixtureCode(item.event.fixtureCode);
		if (reading.ok) codes.add(reading.code);
	}
	const fixtures = new Map((await selectFixturesByCode(conn, [...codes])).map((f) => [f.code, f]));
	for (const item of items) {
		if (!item.event) continue;
		const reading = normaliseFixtureCode(item.event.fixtureCode);
		item.fixture = reading.ok ? fixtures.get(reading.code) : undefined;
		// The canonical code when it is known, so "nm-4k7qx" and "NM-4K7QX" hash alike.
		const code = item.fixture?.code ?? item.event.fixtureCode;
		item.hash = contentHash({ ...item.event, fixtureCode: code });
	}
	return policiesFor(
		new Set(items.filter((i) => i.fixture && !i.repeatOf).map((i) => i.fixture!)),
		conn
	);
}

function isRetryable(err: unknown): boolean {
	// A deadlock, a lock wait timeout, or (1062) an id inserted by a concurrent batch.
	return isLockConflict(err) || errnoOf(err) === ER_DUP_ENTRY;
}

/** Judges an event that is not stored yet; undefined when it may be accepted. */
function refusal(item: Item, actor: Actor, now: Date): string | undefined {
	const e = item.event!;
	if (!item.fixture) {
		const reading = normaliseFixtureCode(e.fixtureCode);
		return reading.ok
			? `No fixture with code ${reading.code} in the register.`
			: `Fixture code "${e.fixtureCode}": ${reading.error}`;
	}
	if (!can(actor, 'event.log', { kind: e.kind })) return roleRefusal(actor.roles, e.kind);
	const ahead = Date.parse(e.occurredAt) - now.getTime();
	if (ahead > FUTURE_TOLERANCE_MS) {
		return `occurredAt ${e.occurredAt} is ${minutesAhead(ahead)} ahead of the server clock (at most 10 minutes allowed); check the phone's date and time.`;
	}
	return undefined;
}

/** Inside the transaction: judge, insert, fold, flag, upsert. */
async function judgeAndStore(
	conn: PoolConnection,
	sender: Sender,
	items: Item[],
	policies: Map<number, Policy>
): Promise<void> {
	// Orders first, then states: every writer takes them in this order, so none deadlock.
	const orders = await lockOrders(
		conn,
		items.filter((i) => i.event && i.fixture && !i.repeatOf)
	);
	const candidates = await judgeNew(conn, sender, items, orders);
	if (candidates.length) {
		const locked = await lockStates(
			conn,
			candidates.map((i) => i.fixture!),
			sender.now
		);
		const fresh = await insertNew(conn, sender, candidates);
		const newEvents = fresh.map((i) => ({ event: i.event!, fixture: i.fixture! }));
		if (fresh.length) {
			const raised = await foldNewEvents(conn, newEvents, locked, policies, sender.now);
			// Orders move before flags link, so an order this batch completed takes no new flag.
			await applyOrderEffects(conn, sender, fresh, orders);
			await linkRaisedFlags(conn, raised, sender.actor.id, sender.now);
		}
	}
	judgeRepeats(items);
}

/**
 * Answers the refused first events of each id (a refused event may still be one stored earlier:
 * re-sent after another person signed in on the phone, or after its fixture was renamed; then it
 * is a duplicate, not a refusal) and returns the rest, which may be stored.
 */
async function judgeNew(
	conn: PoolConnection,
	sender: Sender,
	items: Item[],
	orders: Map<number, LockedOrder>
): Promise<Item[]> {
	const candidates: Item[] = [];
	const refused: { item: Item; why: string }[] = [];
	for (const item of items) {
		if (!item.event || item.repeatOf) continue;
		const why =
			refusal(item, sender.actor, sender.now) ?? orderReferenceRefusal(item, orders, sender);
		if (why) refused.push({ item, why });
		else candidates.push(item);
	}
	const stored = await storedHashes(
		conn,
		refused.map((r) => r.item)
	);
	for (const { item, why } of refused) {
		item.result = judgeStored(item, stored) ?? {
			id: item.sentId,
			status: 'rejected',
			error: why
		};
	}
	return candidates;
}

/** A repeated id inside the batch gets its first's answer: duplicate, or a clash or refusal. */
function judgeRepeats(items: Item[]): void {
	for (const item of items) {
		const first = item.repeatOf;
		if (!first) continue;
		const same = first.hash === item.hash;
		if (first.result!.status === 'rejected') {
			item.result = {
				id: item.sentId,
				status: 'rejected',
				error: same ? first.result!.error : 'Another event in this batch has the same id.'
			};
		} else {
			item.result = same
				? { id: item.sentId, status: 'duplicate' }
				: { id: item.sentId, status: 'rejected', error: CLASH };
		}
	}
}
