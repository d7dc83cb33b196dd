import {
	bigint,
	char,
	date,
	datetime,
	index,
	int,
	mysqlEnum,
	mysqlTable,
	primaryKey,
	text,
	varchar
} from 'drizzle-orm/mysql-core';
import { json } from './json';
import {
	WORK_ORDER_ACTIONS,
	WORK_ORDER_STATUSES,
	type WorkOrderPart
} from '../../../domain/work-orders';
import { users } from './auth';
import { flags } from './activity';
import { fixtures } from './register';

/**
 * Planned work on a fixture, usually from a flag. Rows are never deleted: a cancelled order keeps
 * its reason, and every change is a row of work_order_history.
 */
export const workOrders = mysqlTable(
	'work_orders',
	{
		id: int('id').autoincrement().primaryKey(),
		fixtureId: int('fixture_id')
			.notNull()
			.references(() => fixtures.id),
		action: mysqlEnum('action', WORK_ORDER_ACTIONS).notNull(),
		/** What "other" means for this order; null for the named actions. */
		actionText: varchar('action_text', { length: 200 }),
		status: mysqlEnum('status', WORK_ORDER_STATUSES).notNull().default('planned'),
		/** Null while the order is planned without a date. */
		dueOn: date('due_on', { mode: 'string' }),
		assigneeId: varchar('assignee_id', { length: 255 }).references(() => users.id),
		parts: json<WorkOrderPart[]>('parts').notNull(),
		notes: text('notes'),
		cancelReason: text('cancel_reason'),
		createdAt: datetime('created_at', { mode: 'date', fsp: 3 })
			.notNull()
			.$defaultFn(() => new Date()),
		createdBy: varchar('created_by', { length: 255 }).references(() => users.id),
		updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 })
			.notNull()
			.$defaultFn(() => new Date()),
		startedAt: datetime('started_at', { mode: 'date', fsp: 3 }),
		/** When the work was recorded as done; set also on a cancelled order done anyway. */
		completedAt: datetime('completed_at', { mode: 'date', fsp: 3 }),
		completedBy: varchar('completed_by', { length: 255 }).references(() => users.id),
		/** The synced event that carried the work out, when it came from the phone. */
		completedByEventId: char('completed_by_event_id', { length: 36 })
	},
	(t) => [
		index('work_orders_fixture_status_idx').on(t.fixtureId, t.status),
		index('work_orders_due_idx').on(t.status, t.dueOn),
		index('work_orders_assignee_due_idx').on(t.assigneeId, t.status, t.dueOn)
	]
);

/** The flags an order answers: the one it was made from, and any raised while it is open. */
export const workOrderFlags = mysqlTable(
	'work_order_flags',
	{
		workOrderId: int('work_order_id')
			.notNull()
			.references(() => workOrders.id),
		flagId: int('flag_id')
			.notNull()
			.references(() => flags.id)
	},
	(t) => [
		primaryKey({ columns: [t.workOrderId, t.flagId] }),
		index('work_order_flags_flag_idx').on(t.flagId)
	]
);

/** One field's change: [before, after], as the order's JSON shows them. */
export type WorkOrderChanges = Record<string, [unknown, unknown]>;

/** Every change to a work order, in order: who, when, what (append-only). */
export const workOrderHistory = mysqlTable(
	'work_order_history',
	{
		id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
		workOrderId: int('work_order_id')
			.notNull()
			.references(() => workOrders.id),
		at: datetime('at', { mode: 'date', fsp: 3 }).notNull(),
		/** Null only for changes the server makes by itself (none yet). */
		userId: varchar('user_id', { length: 255 }).references(() => users.id),
		/** 'created', 'changed', 'started', 'done', 'cancelled', 'done-after-cancel', 'flag-linked'. */
		what: varchar('what', { length: 32 }).notNull(),
		changes: json<WorkOrderChanges>('changes').notNull(),
		/** The synced event behind the change, when there was one. */
		eventId: char('event_id', { length: 36 })
	},
	(t) => [index('work_order_history_order_idx').on(t.workOrderId, t.at)]
);
