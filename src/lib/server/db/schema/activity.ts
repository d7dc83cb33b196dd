import {
	char,
	datetime,
	double,
	index,
	int,
	mysqlEnum,
	mysqlTable,
	text,
	varchar
} from 'drizzle-orm/mysql-core';
import { json } from './json';
import { FLAG_KINDS } from '../../../domain/flag-kinds';
import { users } from './auth';
import { fixtures } from './register';

/**
 * The append-only log. The primary key is the UUID the device made, so a batch sent twice
 * stores each event once. Rows are never updated or deleted; corrections are new events.
 */
export const events = mysqlTable(
	'events',
	{
		id: char('id', { length: 36 }).primaryKey(),
		fixtureId: int('fixture_id')
			.notNull()
			.references(() => fixtures.id),
		kind: varchar('kind', { length: 20 }).notNull(),
		occurredAt: datetime('occurred_at', { mode: 'date', fsp: 3 }).notNull(),
		receivedAt: datetime('received_at', { mode: 'date', fsp: 3 }).notNull(),
		userId: varchar('user_id', { length: 255 })
			.notNull()
			.references(() => users.id),
		deviceId: varchar('device_id', { length: 100 }).notNull(),
		payload: json<Record<string, unknown>>('payload').notNull(),
		/** SHA-256 of the canonical content, to tell a true duplicate from a clashing id. */
		contentHash: char('content_hash', { length: 64 }).notNull()
	},
	(t) => [
		index('events_fixture_occurred_idx').on(t.fixtureId, t.occurredAt),
		index('events_fixture_received_idx').on(t.fixtureId, t.receivedAt),
		index('events_user_idx').on(t.userId, t.receivedAt),
		// The audit report reads one kind over a date range across the fleet (inspections, runs,
		// swaps, holds) without touching the far more numerous reseats, in (occurred_at, id) order,
		// and filters by area through fixture_id without reading the rows themselves.
		index('events_kind_occurred_idx').on(t.kind, t.occurredAt, t.id, t.fixtureId)
	]
);

/**
 * Derived health of one fixture, folded from its events on every ingest. Never the source of
 * truth: `data` holds the domain's full state; the columns beside it are copies for filtering.
 */
export const fixtureState = mysqlTable(
	'fixture_state',
	{
		fixtureId: int('fixture_id')
			.primaryKey()
			.references(() => fixtures.id),
		data: json<Record<string, unknown>>('data').notNull(),
		eventCount: int('event_count').notNull().default(0),
		totalCycles: int('total_cycles').notNull().default(0),
		cyclesSinceCleaning: int('cycles_since_cleaning').notNull().default(0),
		cyclesSinceInspection: int('cycles_since_inspection').notNull().default(0),
		cyclesSincePartSwap: int('cycles_since_part_swap').notNull().default(0),
		repeatability_um: double('repeatability_um'),
		wearGrade: int('wear_grade'),
		lastEventAt: datetime('last_event_at', { mode: 'date', fsp: 3 }),
		lastCleaningAt: datetime('last_cleaning_at', { mode: 'date', fsp: 3 }),
		lastInspectionAt: datetime('last_inspection_at', { mode: 'date', fsp: 3 }),
		updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 })
			.notNull()
			.$defaultFn(() => new Date())
	},
	(t) => [index('fixture_state_cycles_idx').on(t.totalCycles)]
);

/** Raised and cleared health flags, with their history; open while `clearedAt` is null. */
export const flags = mysqlTable(
	'flags',
	{
		id: int('id').autoincrement().primaryKey(),
		fixtureId: int('fixture_id')
			.notNull()
			.references(() => fixtures.id),
		kind: mysqlEnum('kind', FLAG_KINDS).notNull(),
		reason: text('reason').notNull(),
		figures: json<Record<string, number | string | null>>('figures'),
		raisedAt: datetime('raised_at', { mode: 'date', fsp: 3 }).notNull(),
		raisedByEventId: char('raised_by_event_id', { length: 36 }),
		clearedAt: datetime('cleared_at', { mode: 'date', fsp: 3 }),
		clearedByEventId: char('cleared_by_event_id', { length: 36 })
	},
	(t) => [
		index('flags_fixture_open_idx').on(t.fixtureId, t.clearedAt),
		index('flags_kind_open_idx').on(t.kind, t.clearedAt),
		// The audit report: flags raised, and flags cleared, within a date range.
		index('flags_raised_idx').on(t.raisedAt),
		index('flags_cleared_idx').on(t.clearedAt)
	]
);

/** Photos and files kept in object storage (S3 API); the row says where and what. */
export const attachments = mysqlTable(
	'attachments',
	{
		id: char('id', { length: 36 }).primaryKey(),
		fixtureId: int('fixture_id')
			.notNull()
			.references(() => fixtures.id),
		/** The event the photo belongs to; it may arrive before its event has synced. */
		eventId: char('event_id', { length: 36 }),
		objectKey: varchar('object_key', { length: 255 }).notNull(),
		contentType: varchar('content_type', { length: 64 }).notNull(),
		sizeBytes: int('size_bytes').notNull(),
		sha256: char('sha256', { length: 64 }).notNull(),
		width: int('width'),
		height: int('height'),
		uploadedBy: varchar('uploaded_by', { length: 255 })
			.notNull()
			.references(() => users.id),
		createdAt: datetime('created_at', { mode: 'date', fsp: 3 })
			.notNull()
			.$defaultFn(() => new Date())
	},
	(t) => [
		index('attachments_event_idx').on(t.eventId),
		index('attachments_fixture_idx').on(t.fixtureId)
	]
);
