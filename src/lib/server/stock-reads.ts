/**
 * Reads of the spare-parts stock that other parts of the office need (the board, the digest):
 * kept apart from the stock writes so those readers do not pull in the write path.
 */
import { and, asc, gt, isNull, sql } from 'drizzle-orm';
import type { PartKind } from '../domain/stock';
import { db, type Db } from './db';
import { stockParts } from './db/schema';

export interface LowStockLine {
	id: number;
	partNumber: string;
	description: string;
	kind: PartKind;
	onHand: number;
	reserved: number;
	available: number;
	reorderLevel: number;
	keptAt: string | null;
}

/**
 * Lines whose free quantity (on hand − reserved) has reached their reorder level, lowest first
 * (one statement; retired lines and lines with no reorder level are not watched).
 */
export async function lowStockParts(q: Db = db, limit = 200): Promise<LowStockLine[]> {
	const available = sql<number>`(${stockParts.onHand} - ${stockParts.reserved})`;
	const rows = await q
		.select({
			id: stockParts.id,
			partNumber: stockParts.partNumber,
			description: stockParts.description,
			kind: stockParts.kind,
			onHand: stockParts.onHand,
			reserved: stockParts.reserved,
			reorderLevel: stockParts.reorderLevel,
			keptAt: stockParts.keptAt
		})
		.from(stockParts)
		.where(
			and(
				isNull(stockParts.retiredAt),
				gt(stockParts.reorderLevel, 0),
				sql`${available} <= ${stockParts.reorderLevel}`
			)
		)
		.orderBy(sql`${available} - ${stockParts.reorderLevel}`, asc(stockParts.partNumber))
		.limit(limit);
	return rows.map((r) => ({ ...r, available: r.onHand - r.reserved }));
}
