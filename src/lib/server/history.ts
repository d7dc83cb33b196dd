import { and, count, desc, eq, lt, or } from 'drizzle-orm';
import type { EventKind } from '../domain/events';
import { HISTORY_CURSOR, historyCursor } from '../schemas/history-query';
import type { FixtureHistory, HistoryEntry, TimelinePage } from '../schemas/history-views';
import { normaliseFixtureCode } from '../domain/fixture-code';
import { db, schema } from './db';

export type { FixtureHistory, HistoryEntry, TimelinePage };

/** The columns of one history entry with who logged it (list and timeline alike). */
const ENTRY_COLUMNS = {
	id: schema.events.id,
	kind: schema.events.kind,
	occurredAt: schema.events.occurredAt,
	receivedAt: schema.events.receivedAt,
	deviceId: schema.events.deviceId,
	payload: schema.events.payload,
	userId: schema.events.userId,
	userName: schema.users.name,
	userEmail: schema.users.email
};

/** A row selected with ENTRY_COLUMNS as a history entry. */
function toEntry(r: {
	id: string;
	kind: string;
	occurredAt: Date;
	receivedAt: Date;
	deviceId: string;
	payload: unknown;
	userId: string;
	userName: string | null;
	userEmail: string | null;
}): HistoryEntry {
	return {
		id: r.id,
		kind: r.kind,
		occurredAt: r.occurredAt.toISOString(),
		receivedAt: r.receivedAt.toISOString(),
		deviceId: r.deviceId,
		payload: r.payload as Record<string, unknown>,
		// Someone who signed in by e-mail link may have no name (Auth.js keeps the address only).
		user: { id: r.userId, name: r.userName ?? r.userEmail ?? r.userId, email: r.userEmail }
	};
}

/**
 * The newest `limit` events of the fixture with `code` (any spelling a person might type),
 * newest first by when they happened; null when no such fixture exists.
 */
export async function fixtureEvents(code: string, limit: number): Promise<FixtureHistory | null> {
	const reading = normaliseFixtureCode(code);
	if (!reading.ok) return null;

	const [fixture] = await db
		.select({ id: schema.fixtures.id, code: schema.fixtures.code, name: schema.fixtures.name })
		.from(schema.fixtures)
		.where(eq(schema.fixtures.code, reading.code))
		.limit(1);
	if (!fixture) return null;

	const e = schema.events;
	const rows = await db
		.select(ENTRY_COLUMNS)
		.from(e)
		.innerJoin(schema.users, eq(schema.users.id, e.userId))
		.where(eq(e.fixtureId, fixture.id))
		// The id breaks ties so that pages are stable when two entries share a millisecond.
		.orderBy(desc(e.occurredAt), desc(e.id))
		.limit(limit);

	return {
		fixture: { code: fixture.code, name: fixture.name },
		events: rows.map(toEntry)
	};
}

/**
 * A page of `limit` events of a fixture, newest first, optionally of one kind and older than a
 * cursor (see historyCursor).
 */
export async function fixtureTimeline(
	fixtureId: number,
	options: { kind?: EventKind; before?: string; limit: number }
): Promise<TimelinePage> {
	const e = schema.events;
	const m = options.before ? HISTORY_CURSOR.exec(options.before) : null;
	const older = m
		? or(
				lt(e.occurredAt, new Date(m[1])),
				and(eq(e.occurredAt, new Date(m[1])), lt(e.id, m[2].toLowerCase()))
			)
		: undefined;
	const [rows, kindRows] = await Promise.all([
		db
			.select(ENTRY_COLUMNS)
			.from(e)
			.innerJoin(schema.users, eq(schema.users.id, e.userId))
			.where(
				and(eq(e.fixtureId, fixtureId), options.kind ? eq(e.kind, options.kind) : undefined, older)
			)
			.orderBy(desc(e.occurredAt), desc(e.id))
			// One more than the page, to know whether an older page exists.
			.limit(options.limit + 1),
		db
			.select({ kind: e.kind, n: count() })
			.from(e)
			.where(eq(e.fixtureId, fixtureId))
			.groupBy(e.kind)
	]);
	const events = rows.slice(0, options.limit).map(toEntry);
	return {
		events,
		older: rows.length > options.limit ? historyCursor(events[events.length - 1]) : null,
		kinds: Object.fromEntries(kindRows.map((k) => [k.kind, k.n]))
	};
}
