/**
 * The one way a work order's history row is written: by the planner's forms and API
 * (`$lib/server/work-orders*`) and by sync ingest when the phone carries an order out, always in
 * the same transaction as the change it records.
 */
import type { PoolConnection } from 'mysql2/promise';
import { drizzleOn } from './transaction';
import { workOrderHistory, type WorkOrderChanges } from './schema';

/** What kind of change a history row records. */
export type WorkOrderHistoryWhat =
	'created' | 'changed' | 'started' | 'done' | 'cancelled' | 'done-after-cancel' | 'flag-linked';

export interface WorkOrderHistoryEntry {
	workOrderId: number;
	at: Date;
	/** Who made the change; null only for the server's own changes. */
	userId: string | null;
	what: WorkOrderHistoryWhat;
	/** Field → [before, after], in the JSON the API shows. */
	changes: WorkOrderChanges;
	/** The synced event behind the change, if any. */
	eventId?: string | null;
}

/** Appends history rows in one statement, on the caller's connection (inside its transaction). */
export async function appendWorkOrderHistory(
	conn: PoolConnection,
	entries: WorkOrderHistoryEntry[]
): Promise<void> {
	if (entries.length === 0) return;
	await drizzleOn(conn)
		.insert(workOrderHistory)
		.values(entries.map((e) => ({ ...e, eventId: e.eventId ?? null })));
}
