/**
 * Spare parts as plain rules: what a stock line is, why its count may change, and what is still
 * free to promise. No I/O: `$lib/server/stock*` stores what these functions decide.
 */

/** What kind of part a stock line holds. */
export const PART_KINDS = ['ball', 'seat', 'vee-insert', 'flat', 'other'] as const;
export type PartKind = (typeof PART_KINDS)[number];

/**
 * Why a count changed; every change of on-hand or reserved quantity is one stock_movements row
 * with one of these reasons, so a count can be audited back to its first receipt.
 */
export const STOCK_MOVE_REASONS = [
	'received',
	'counted',
	'adjusted',
	'imported',
	'reserved',
	'released',
	'consumed'
] as const;
export type StockMoveReason = (typeof STOCK_MOVE_REASONS)[number];

/** Limits on a stock line's text and numbers, shared by forms, CSV import and the API. */
export const STOCK_LIMITS = {
	partNumber: 40,
	description: 200,
	size: 60,
	material: 60,
	keptAt: 120,
	note: 500,
	quantityMax: 1_000_000
} as const;

/** What may still be promised to a work order: on hand less what open orders hold. */
export function availableQuantity(onHand: number, reserved: number): number {
	return onHand - reserved;
}

/**
 * A line is low when what is free to promise has reached its reorder level (a level of 0 means
 * "do not watch this part").
 */
export function isLowStock(onHand: number, reserved: number, reorderLevel: number): boolean {
	return reorderLevel > 0 && availableQuantity(onHand, reserved) <= reorderLevel;
}
