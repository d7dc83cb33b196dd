/**
 * Work orders in the phone's register copy (./register-snapshot.ts): the open orders assigned to
 * the person the copy is for (what `/work` shows offline), and per open flag the open order that
 * answers it (the card's "planned for DATE · ASSIGNEE"). Two statements whatever the fleet size.
 */
import type { RowDataPacket } from 'mysql2/promise';
import type { SnapshotPlannedWork, SnapshotWorkOrder } from '$lib/schemas/register-snapshot';
import { OPEN_WORK_ORDER_STATUSES, type WorkOrderPart } from '$lib/domain/work-orders';
import { getPool } from './db';
import { parseJson } from './db/health-sql';
import type { Actor } from './guard';

/** DATE column as read by mysql2 (a Date at UTC midnight, as the pool reads in UTC) → YYYY-MM-DD. */
const day = (d: unknown): string | null =>
	d instanceof Date ? d.toISOString().slice(0, 10) : typeof d === 'string' ? d.slice(0, 10) : null;

/** The open orders assigned to `actor`, by due date (undated last), then id. */
export async function myOpenWorkOrders(actor: Actor): Promise<SnapshotWorkOrder[]> {
	const [rows] = await getPool().query<RowDataPacket[]>(
		`SELECT wo.id, f.code, f.name, wo.action, wo.action_text, wo.status, wo.due_on, wo.parts,
		   wo.notes,
		   (SELECT JSON_ARRAYAGG(fl.reason) FROM work_order_flags l
		      JOIN flags fl ON fl.id = l.flag_id AND fl.cleared_at IS NULL
		      WHERE l.work_order_id = wo.id) AS reasons
		 FROM work_orders wo JOIN fixtures f ON f.id = wo.fixture_id
		 WHERE wo.assignee_id = ? AND wo.status IN (?)
		 ORDER BY wo.due_on IS NULL, wo.due_on, wo.id`,
		[actor.id, OPEN_WORK_ORDER_STATUSES]
	);
	return rows.map((r) => ({
		id: r.id as number,
		fixtureCode: r.code as string,
		fixtureName: r.name as string,
		action: r.action as SnapshotWorkOrder['action'],
		actionText: (r.action_text as string | null) ?? null,
		status: r.status as SnapshotWorkOrder['status'],
		dueOn: day(r.due_on),
		parts: (parseJson<WorkOrderPart[]>(r.parts) ?? []).map((p) => ({
			description: p.description,
			quantity: p.quantity,
			...(p.size ? { size: p.size } : {}),
			...(p.material ? { material: p.material } : {})
		})),
		notes: (r.notes as string | null) ?? null,
		flagReasons: parseJson<string[]>(r.reasons) ?? []
	}));
}

/**
 * Per open flag id, the open order that answers it (soonest due, then lowest id), with its
 * assignee's name.
 */
export async function plannedWorkByFlag(): Promise<Map<number, SnapshotPlannedWork>> {
	const [rows] = await getPool().query<RowDataPacket[]>(
		`SELECT l.flag_id, wo.id, wo.due_on, u.name
		 FROM work_order_flags l
		 JOIN flags fl ON fl.id = l.flag_id AND fl.cleared_at IS NULL
		 JOIN work_orders wo ON wo.id = l.work_order_id AND wo.status IN (?)
		 LEFT JOIN users u ON u.id = wo.assignee_id
		 ORDER BY l.flag_id, wo.due_on IS NULL, wo.due_on, wo.id`,
		[OPEN_WORK_ORDER_STATUSES]
	);
	const out = new Map<number, SnapshotPlannedWork>();
	for (const r of rows) {
		const flagId = r.flag_id as number;
		if (out.has(flagId)) continue;
		out.set(flagId, {
			workOrderId: r.id as number,
			dueOn: day(r.due_on),
			assignee: (r.name as string | null) ?? null
		});
	}
	return out;
}
