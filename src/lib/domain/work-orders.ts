/** What a work order asks for. */
export const WORK_ORDER_ACTIONS = [
	'replace-balls',
	'replace-seats',
	'replace-fixture',
	're-break-in',
	'inspect'
] as const;
export type WorkOrderAction = (typeof WORK_ORDER_ACTIONS)[number];

/** Where a work order stands. */
export const WORK_ORDER_STATUSES = [
	'planned',
	'scheduled',
	'underway',
	'done',
	'cancelled'
] as const;
export type WorkOrderStatus = (typeof WORK_ORDER_STATUSES)[number];
