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
 *   their policies, one of the existing ids, one locking read of the states, one multi-row insert of the events, one read
 *   of the open flags, one multi-row upsert of the states and one of the flags.
 */
import { createHash } from 'node:crypto';
import type { PoolConnection, RowDataPacket } from 'mysql2/promise';
import { normaliseFixtureCode } from '../domain/fixture-code';
import {
	applyEvent,
	compareEvents,
	evaluateFlags,
	recompute,
	type Flag,
	type FixtureState
} from '../domain/health';
import type { Policy } from '../domain/policy';
import { can, rolesThatCan } from '../permissions';
import {
	MAX_EVENTS_PER_SYNC,
	parseSyncEvent,
	syncRequestSchema,
	type EventKind,
	type FixtureEvent,
	type SyncEvent
} from '../schemas/events';
import { ROLES, type Role } from '../schemas/roles';
import { withConnection } from './db';
import { canonicalJson } from './fixtures';
import type { Actor } from './guard';
import {
	diffFlags,
	flagRows,
	HEALTH_FIXTURE_COLUMNS,
	initialStateFor,
	initialStateOptions,
	loadStoredStates,
	parseJson,
	policiesFor,
	toHealthFixture,
	upsertStates,
	writeFlags,
	type FlagRow,
	type HealthFixture
} from './state-store';

/** Largest sync request body accepted (declared and actually read). */
export const SYNC_BODY_LIMIT_BYTES = 2 * 1024 * 1024;
/** How far ahead of the server clock an event's occurredAt may be (phone clocks drift). */
export const FUTURE_TOLERANCE_MS = 10 * 60 * 1000;
/** Attempts of the batch transaction when it meets a deadlock, lock timeout or id race. */
const TRANSACTION_ATTEMPTS = 4;

export { MAX_EVENTS_PER_SYNC };

/** The answer for one event of a batch. */
export interface SyncResult {
	id: string;
	status: 'accepted' | 'duplicate' | 'rejected';
	error?: string;
}

/** Options of ingestBatch. */
export interface IngestOptions {
	/** The server clock for this batch (receivedAt, flag times, the future check); default now. */
	now?: Date;
}

/** What the envelope check found: the events to judge one by one, or why the request is refused. */
export type Envelope =
	| { ok: true; deviceId: string; events: unknown[] }
	| { ok: false; error: string; fields?: Record<string, string> };

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
	const fields: Record<string, string> = {};
	for (const issue of parsed.error.issues) {
		const key = issue.path.length ? issue.path.join('.') : '(body)';
		const message =
			issue.code === 'invalid_type' && issue.path[0] === 'events'
				? 'events must be an array of events'
				: issue.code === 'invalid_type' && issue.path[0] === 'deviceId'
					? 'deviceId is required (a text of 1 to 100 characters)'
					: issue.message;
		fields[key] = fields[key] ? `${fields[key]}; ${message}` : message;
	}
	const error = Object.entries(fields)
		.map(([k, m]) => `${k}: ${m}`)
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

/** What ingest needs to know about a fixture. */
type FixtureRow = HealthFixture;

/** One event of the batch on its way through ingest. */
interface Item {
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
	fixture?: FixtureRow;
	/** First event of the batch with the same id, when this one repeats it. */
	repeatOf?: Item;
	result?: SyncResult;
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
	const now = options.now ?? new Date();
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

	// A repeated id inside the batch: the first is judged, the later ones follow it.
	const firstById = new Map<string, Item>();
	for (const item of items) {
		if (!item.event) continue;
		const first = firstById.get(item.id);
		if (first) item.repeatOf = first;
		else firstById.set(item.id, item);
	}

	// One connection for the whole batch, and everything the batch reads goes through it: the
	// fixtures, their policies, the transaction. Asking the pool for a second connection while
	// holding this one wedged the server once every connection was held by a batch doing so.
	await withConnection(async (conn) => {
		const fixtures = await lookUpFixtures(conn, items);
		for (const item of items) {
			if (!item.event) continue;
			const reading = normaliseFixtureCode(item.event.fixtureCode);
			item.fixture = reading.ok ? fixtures.get(reading.code) : undefined;
			// The canonical code when it is known, so "nm-4k7qx" and "NM-4K7QX" hash alike.
			const code = item.fixture?.code ?? item.event.fixtureCode;
			item.hash = contentHash({ ...item.event, fixtureCode: code });
		}
		const policies = await policiesFor(
			new Set(items.filter((i) => i.fixture && !i.repeatOf).map((i) => i.fixture!)),
			conn
		);

		for (let attempt = 1; ; attempt++) {
			try {
				await writeBatch(conn, actor, deviceId, items, policies, now);
				break;
			} catch (err) {
				if (attempt >= TRANSACTION_ATTEMPTS || !isRetryable(err)) throw err;
				// Forget this attempt's verdicts on the new events and judge them again.
				for (const item of items) if (item.event) item.result = undefined;
			}
		}
	});

	return items.map((item) => item.result!);
}

function isRetryable(err: unknown): boolean {
	const errno = (err as { errno?: number }).errno;
	// 1213 deadlock, 1205 lock wait timeout, 1062 an id inserted by a concurrent batch.
	return errno === 1213 || errno === 1205 || errno === 1062;
}

async function lookUpFixtures(
	conn: PoolConnection,
	items: Item[]
): Promise<Map<string, FixtureRow>> {
	const codes = new Set<string>();
	for (const item of items) {
		if (!item.event) continue;
		const reading = normaliseFixtureCode(item.event.fixtureCode);
		if (reading.ok) codes.add(reading.code);
	}
	const map = new Map<string, FixtureRow>();
	if (!codes.size) return map;
	const [rows] = await conn.query<RowDataPacket[]>(
		`SELECT ${HEALTH_FIXTURE_COLUMNS} FROM fixtures WHERE code IN (?)`,
		[[...codes]]
	);
	for (const r of rows) map.set(r.code, toHealthFixture(r));
	return map;
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

/** MariaDB: duplicate entry for a unique key. */
const ER_DUP_ENTRY = 1062;

const CLASH = 'An event with this id already exists with different content; it was not changed.';

/** The transaction: judge, insert, fold, flag, upsert. */
async function writeBatch(
	conn: PoolConnection,
	actor: Actor,
	deviceId: string,
	items: Item[],
	policies: Map<number, Policy>,
	now: Date
): Promise<void> {
	await conn.query('SET TRANSACTION ISOLATION LEVEL READ COMMITTED');
	await conn.beginTransaction();
	try {
		const firsts = items.filter((i) => i.event && !i.repeatOf);
		const candidates: Item[] = [];
		const refused: { item: Item; why: string }[] = [];
		for (const item of firsts) {
			const why = refusal(item, actor, now);
			if (why) refused.push({ item, why });
			else candidates.push(item);
		}

		// A refused event may still be one stored earlier (re-sent after another person signed in
		// on the phone, or after its fixture was renamed): then it is a duplicate, not a refusal.
		const storedRefused = await storedHashes(
			conn,
			refused.map((r) => r.item)
		);
		for (const { item, why } of refused) {
			item.result = judgeStored(item, storedRefused) ?? {
				id: item.sentId,
				status: 'rejected',
				error: why
			};
		}

		if (candidates.length) await storeAndFold(conn, actor, deviceId, candidates, policies, now);

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
		await conn.commit();
	} catch (err) {
		await conn.rollback().catch(() => undefined);
		throw err;
	}
}

/** Content hashes of those of `items` already stored, by (lower-case) id. */
async function storedHashes(conn: PoolConnection, items: Item[]): Promise<Map<string, string>> {
	const stored = new Map<string, string>();
	if (!items.length) return stored;
	const [rows] = await conn.query<RowDataPacket[]>(
		'SELECT id, content_hash FROM events WHERE id IN (?)',
		[items.map((i) => i.id)]
	);
	for (const r of rows) stored.set(String(r.id).toLowerCase(), r.content_hash);
	return stored;
}

/** Duplicate or clash when the id is stored; undefined when it is not. */
function judgeStored(item: Item, stored: Map<string, string>): SyncResult | undefined {
	const hash = stored.get(item.id);
	if (hash === undefined) return undefined;
	return hash === item.hash
		? { id: item.sentId, status: 'duplicate' }
		: { id: item.sentId, status: 'rejected', error: CLASH };
}

const INSERT_EVENTS = `INSERT INTO events
	(id, fixture_id, kind, occurred_at, received_at, user_id, device_id, payload, content_hash)
	VALUES ?`;

/**
 * Inserts the candidates and returns those that were new. Optimistic: most batches are sent
 * once, so they are inserted straight away; only when the primary key says some id is already
 * there (a retry, or another phone's batch that just committed) are the stored ids looked up and
 * the rest inserted. A failed statement is undone on its own; the transaction goes on.
 */
async function insertNew(
	conn: PoolConnection,
	actor: Actor,
	deviceId: string,
	candidates: Item[],
	now: Date
): Promise<Item[]> {
	const rows = (list: Item[]) =>
		list.map((item) => {
			const e = item.event!;
			return [
				e.id,
				item.fixture!.id,
				e.kind,
				new Date(e.occurredAt),
				now,
				actor.id,
				deviceId,
				JSON.stringify(e.payload),
				item.hash
			];
		});
	try {
		await conn.query(INSERT_EVENTS, [rows(candidates)]);
		for (const item of candidates) item.result = { id: item.sentId, status: 'accepted' };
		return candidates;
	} catch (err) {
		const errno = (err as { errno?: number }).errno;
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
	if (fresh.length) await conn.query(INSERT_EVENTS, [rows(fresh)]);
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
	row: (item: Item) => unknown[][]
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
			await conn.query(INSERT_EVENTS, [row(item)]);
		} catch (err) {
			const errno = (err as { errno?: number }).errno;
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

interface StateRow {
	state: FixtureState;
	before: FixtureState;
	recompute: boolean;
	newEvents: Item[];
	fixture: FixtureRow;
}

async function storeAndFold(
	conn: PoolConnection,
	actor: Actor,
	deviceId: string,
	candidates: Item[],
	policies: Map<number, Policy>,
	now: Date
): Promise<void> {
	const lockIds = [...new Set(candidates.map((i) => i.fixture!.id))].sort((a, b) => a - b);

	// Lock the states first, in id order; a fixture without a state row gets one, then the lock.
	const locked = await loadStoredStates(conn, lockIds, true);
	const missing = lockIds.filter((id) => !locked.has(id));
	if (missing.length) {
		const fixtureOf = new Map(candidates.map((i) => [i.fixture!.id, i.fixture!]));
		await conn.query('INSERT IGNORE INTO fixture_state (fixture_id, data, updated_at) VALUES ?', [
			missing.map((id) => [id, JSON.stringify(initialStateFor(fixtureOf.get(id)!)), now])
		]);
		for (const [id, entry] of await loadStoredStates(conn, missing, true)) locked.set(id, entry);
	}

	const fresh = await insertNew(conn, actor, deviceId, candidates, now);
	if (!fresh.length) return;

	const byFixture = new Map<number, StateRow>();
	for (const item of fresh) {
		const f = item.fixture!;
		let row = byFixture.get(f.id);
		if (!row) {
			const current = locked.get(f.id)!.state;
			row = { state: current, before: current, recompute: false, newEvents: [], fixture: f };
			byFixture.set(f.id, row);
		}
		row.newEvents.push(item);
	}
	const fixtureIds = [...byFixture.keys()].sort((a, b) => a - b);
	const flagWrites: FlagRow[] = [];

	for (const id of fixtureIds) {
		const row = byFixture.get(id)!;
		const policy = policies.get(id)!;
		const current = row.before;
		const events = row.newEvents.map((i) => toFixtureEvent(i.event!)).sort(compareEvents);
		const last =
			current.lastEventAt && current.lastEventId
				? { occurredAt: current.lastEventAt, id: current.lastEventId }
				: null;
		row.recompute = last !== null && compareEvents(events[0], last) <= 0;

		// The state after each new event (incremental case), to find which event changed a flag.
		let trail: FixtureState[] | null = null;
		if (row.recompute) {
			const history = await loadHistory(conn, id);
			row.state = recompute(history, policy, initialStateOptions(row.fixture));
		} else {
			trail = [current];
			for (const ev of events) trail.push(applyEvent(trail[trail.length - 1], ev, policy));
			row.state = trail[trail.length - 1];
		}

		const final = evaluateFlags(row.state, policy, now);
		const kindsAfter = new Map<number, Set<Flag['kind']>>();
		const kindsAt = (k: number) => {
			let kinds = kindsAfter.get(k);
			if (!kinds) {
				kinds = new Set(evaluateFlags(trail![k], policy, now).map((f) => f.kind));
				kindsAfter.set(k, kinds);
			}
			return kinds;
		};
		/** The new event after which `kind` was first present (or absent), by bisection. */
		const culprit = (kind: Flag['kind'], present: boolean): string => {
			if (!trail) return events[events.length - 1].id;
			let lo = 1;
			let hi = events.length;
			while (lo < hi) {
				const mid = (lo + hi) >> 1;
				if (kindsAt(mid).has(kind) === present) hi = mid;
				else lo = mid + 1;
			}
			return events[lo - 1].id;
		};

		const diff = diffFlags(locked.get(id)!.openFlags, final);
		flagWrites.push(...flagRows(id, diff, now, culprit));
	}

	await upsertStates(
		conn,
		[...byFixture.values()].map((r) => ({ fixtureId: r.fixture.id, state: r.state })),
		now
	);
	await writeFlags(conn, flagWrites);
	await syncFixtureStatus(conn, [...byFixture.values()]);
}

function toFixtureEvent(e: SyncEvent): FixtureEvent {
	return { id: e.id, kind: e.kind, occurredAt: e.occurredAt, payload: e.payload } as FixtureEvent;
}

/** A fixture's whole history in folding order (this transaction's inserts included). */
async function loadHistory(conn: PoolConnection, fixtureId: number): Promise<FixtureEvent[]> {
	const [rows] = await conn.query<RowDataPacket[]>(
		'SELECT id, kind, occurred_at, payload FROM events WHERE fixture_id = ? ORDER BY occurred_at, id',
		[fixtureId]
	);
	const events = rows.map(
		(r) =>
			({
				id: r.id,
				kind: r.kind,
				occurredAt: (r.occurred_at as Date).toISOString(),
				payload: parseJson(r.payload)
			}) as FixtureEvent
	);
	// The database's collation orders ids case-insensitively; the fold order is the domain's.
	return events.sort(compareEvents);
}

/**
 * Keeps the register's status in step when the state's status changed in this batch (a hold, a
 * release, a break-in begun or completed). Retired fixtures stay retired, and a status set by hand
 * in the register stands until the next change comes from the log.
 */
async function syncFixtureStatus(conn: PoolConnection, rows: StateRow[]): Promise<void> {
	const changed = rows.filter((r) => r.state.status !== r.before.status);
	if (!changed.length) return;
	const cases = changed.map(() => 'WHEN ? THEN ?').join(' ');
	await conn.query(
		`UPDATE fixtures SET status = CASE id ${cases} END WHERE id IN (?) AND status <> 'retired'`,
		[...changed.flatMap((r) => [r.fixture.id, r.state.status]), changed.map((r) => r.fixture.id)]
	);
}
