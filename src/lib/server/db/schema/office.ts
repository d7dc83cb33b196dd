import {
	bigint,
	boolean,
	char,
	date,
	datetime,
	index,
	int,
	mediumtext,
	mysqlEnum,
	mysqlTable,
	primaryKey,
	tinyint,
	uniqueIndex,
	varchar
} from 'drizzle-orm/mysql-core';
import { json } from './json';
import { ICS_METHODS, MAIL_KINDS, MAIL_STATUSES, NOTICE_DELIVERIES } from '../../../domain/mail';
import { PART_KINDS, STOCK_MOVE_REASONS } from '../../../domain/stock';
import { users } from './auth';
import { workOrders } from './work-orders';

const at = (name: string) => datetime(name, { mode: 'date', fsp: 3 });
const createdAt = () =>
	at('created_at')
		.notNull()
		.$defaultFn(() => new Date());

/** The installation's office settings: one row, id 1 (see domain/office-settings for defaults). */
export const officeSettings = mysqlTable('office_settings', {
	id: tinyint('id').primaryKey(),
	capacityPerDay: int('capacity_per_day').notNull().default(4),
	digestTime: char('digest_time', { length: 5 }).notNull().default('06:30'),
	timeZone: varchar('time_zone', { length: 64 }),
	updatedAt: at('updated_at'),
	updatedBy: varchar('updated_by', { length: 255 }).references(() => users.id)
});

/**
 * iCalendar subscription tokens: a feed URL carries the token, not a session. Revoking stamps
 * revoked_at and a new row takes its place, so the old URL answers 404 at once.
 */
export const feedTokens = mysqlTable(
	'feed_tokens',
	{
		id: int('id').autoincrement().primaryKey(),
		userId: varchar('user_id', { length: 255 })
			.notNull()
			.references(() => users.id),
		/** 'mine': the person's own work orders; 'plan': the whole plan (planners and up). */
		scope: mysqlEnum('scope', ['mine', 'plan']).notNull(),
		token: varchar('token', { length: 64 }).notNull().unique(),
		createdAt: createdAt(),
		revokedAt: at('revoked_at')
	},
	(t) => [index('feed_tokens_user_idx').on(t.userId, t.scope, t.revokedAt)]
);

/** A person's mail settings; no row means the defaults (digest on, notices by mail). */
export const mailPreferences = mysqlTable('mail_preferences', {
	userId: varchar('user_id', { length: 255 })
		.primaryKey()
		.references(() => users.id),
	digest: boolean('digest').notNull().default(true),
	notices: mysqlEnum('notices', NOTICE_DELIVERIES).notNull().default('mail'),
	/** The one-click unsubscribe link's secret (RFC 8058); stable until the person changes it. */
	unsubscribeToken: varchar('unsubscribe_token', { length: 64 }).notNull().unique(),
	updatedAt: at('updated_at')
});

/**
 * Every mail Nestmark sends, queued first and sent by the outbox worker: a mail that cannot be
 * sent stays queued with its error and the time of its next try; nothing is deleted. A claim
 * (claim_token, claimed_until) keeps two processes from sending the same row; dedupe_key keeps a
 * retried request from queueing the same notice twice.
 */
export const mailOutbox = mysqlTable(
	'mail_outbox',
	{
		id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
		kind: mysqlEnum('kind', MAIL_KINDS).notNull(),
		status: mysqlEnum('status', MAIL_STATUSES).notNull().default('queued'),
		toAddress: varchar('to_address', { length: 255 }).notNull(),
		userId: varchar('user_id', { length: 255 }).references(() => users.id),
		workOrderId: int('work_order_id').references(() => workOrders.id),
		subject: varchar('subject', { length: 255 }).notNull(),
		text: mediumtext('text').notNull(),
		html: mediumtext('html'),
		icsMethod: mysqlEnum('ics_method', ICS_METHODS),
		ics: mediumtext('ics'),
		/** Extra headers (List-Unsubscribe, List-Unsubscribe-Post). */
		headers: json<Record<string, string>>('headers'),
		dedupeKey: varchar('dedupe_key', { length: 191 }).unique(),
		attempts: int('attempts').notNull().default(0),
		nextAttemptAt: at('next_attempt_at').notNull(),
		lastError: varchar('last_error', { length: 1000 }),
		claimToken: char('claim_token', { length: 36 }),
		claimedUntil: at('claimed_until'),
		createdAt: createdAt(),
		sentAt: at('sent_at')
	},
	(t) => [
		index('mail_outbox_due_idx').on(t.status, t.nextAttemptAt),
		index('mail_outbox_user_idx').on(t.userId, t.createdAt)
	]
);

/** One row per planner and local day: the digest goes out at most once, whatever runs it. */
export const digestSends = mysqlTable(
	'digest_sends',
	{
		userId: varchar('user_id', { length: 255 })
			.notNull()
			.references(() => users.id),
		day: date('day', { mode: 'string' }).notNull(),
		/** Null when there was nothing to say (the day is still taken: no second look). */
		mailId: bigint('mail_id', { mode: 'number' }).references(() => mailOutbox.id),
		createdAt: createdAt()
	},
	(t) => [primaryKey({ columns: [t.userId, t.day] })]
);

/** Run-once jobs (digest, outbox worker): one owner at a time, taken over when the lease lapses. */
export const jobLeases = mysqlTable('job_leases', {
	name: varchar('name', { length: 64 }).primaryKey(),
	owner: varchar('owner', { length: 128 }).notNull(),
	expiresAt: at('expires_at').notNull()
});

/** A stock line of spare parts. Lines are retired, never deleted (their movements stay). */
export const stockParts = mysqlTable(
	'stock_parts',
	{
		id: int('id').autoincrement().primaryKey(),
		partNumber: varchar('part_number', { length: 40 }).notNull(),
		description: varchar('description', { length: 200 }).notNull(),
		kind: mysqlEnum('kind', PART_KINDS).notNull(),
		size: varchar('size', { length: 60 }),
		material: varchar('material', { length: 60 }),
		onHand: int('on_hand').notNull().default(0),
		/** Held by open work orders; on hand − reserved is what may still be promised. */
		reserved: int('reserved').notNull().default(0),
		reorderLevel: int('reorder_level').notNull().default(0),
		keptAt: varchar('kept_at', { length: 120 }),
		createdAt: createdAt(),
		updatedAt: at('updated_at'),
		retiredAt: at('retired_at')
	},
	(t) => [uniqueIndex('stock_parts_number_idx').on(t.partNumber)]
);

/** Every change of a stock line's counts: who, when, why, by how much, and the counts after. */
export const stockMovements = mysqlTable(
	'stock_movements',
	{
		id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
		partId: int('part_id')
			.notNull()
			.references(() => stockParts.id),
		at: at('at').notNull(),
		userId: varchar('user_id', { length: 255 }).references(() => users.id),
		reason: mysqlEnum('reason', STOCK_MOVE_REASONS).notNull(),
		onHandDelta: int('on_hand_delta').notNull().default(0),
		reservedDelta: int('reserved_delta').notNull().default(0),
		onHandAfter: int('on_hand_after').notNull(),
		reservedAfter: int('reserved_after').notNull(),
		workOrderId: int('work_order_id').references(() => workOrders.id),
		note: varchar('note', { length: 500 })
	},
	(t) => [index('stock_movements_part_idx').on(t.partId, t.at)]
);

/** What each open work order holds of each stock line (zero rows once consumed or released). */
export const workOrderReservations = mysqlTable(
	'work_order_reservations',
	{
		workOrderId: int('work_order_id')
			.notNull()
			.references(() => workOrders.id),
		stockPartId: int('stock_part_id')
			.notNull()
			.references(() => stockParts.id),
		quantity: int('quantity').notNull()
	},
	(t) => [
		primaryKey({ columns: [t.workOrderId, t.stockPartId] }),
		index('work_order_reservations_part_idx').on(t.stockPartId)
	]
);
