/**
 * What the work-order writers share: who may plan, the assignee check, people's e-mail addresses
 * and the before/after comparison that history rows record.
 */
import { and, eq, inArray } from 'drizzle-orm';
import type { WorkOrderPart, WorkOrderStatus } from '../domain/work-orders';
import { can, refusal } from '../permissions';
import type { WorkOrderCreate } from '../schemas/work-orders';
import type { Db } from './db';
import { userRoles, users, workOrders } from './db/schema';
import { ForbiddenError, type Actor } from './guard';
import { fieldError } from './work-order-errors';

/** Who acts: the services need only the id and the roles. */
export type WorkOrderActor = Pick<Actor, 'id' | 'roles'>;

export type OrderRow = typeof workOrders.$inferSelect;

/**
 * A new order: the API's body after workOrderCreateSchema (WorkOrderCreate fits), with the
 * optional fields optional for callers on the server (forms, drafts, the seed).
 */
export type WorkOrderInput = Pick<WorkOrderCreate, 'fixtureCode' | 'action'> &
	Partial<Pick<WorkOrderCreate, 'actionText' | 'dueOn' | 'assigneeEmail' | 'flagId' | 'notes'>> & {
		parts?: WorkOrderPart[];
	};

/** Only planners, supervisors and admins plan work orders. */
export function assertPlanner(actor: WorkOrderActor): void {
	if (!can(actor, 'work-order.plan')) throw new ForbiddenError(refusal('work-order.plan'));
}

/** The person with this e-mail address, when active and a technician; else a field error. */
export async function technicianByEmail(
	d: Db,
	email: string
): Promise<{ id: string; email: string }> {
	const found = await d
		.select({ id: users.id, email: users.email, active: users.active, role: userRoles.role })
		.from(users)
		.leftJoin(userRoles, and(eq(userRoles.userId, users.id), eq(userRoles.role, 'technician')))
		.where(eq(users.email, email));
	const u = found[0];
	if (!u) throw fieldError('assigneeEmail', `No one has the e-mail address ${email}.`);
	if (!u.active)
		throw fieldError('assigneeEmail', `${email} is deactivated; choose an active technician.`);
	if (!found.some((r) => r.role === 'technician'))
		throw fieldError(
			'assigneeEmail',
			`${email} is not a technician; work orders are assigned to technicians.`
		);
	return { id: u.id, email: u.email ?? email };
}

/** E-mail addresses of these people, by id (one statement). */
export async function emailsOf(d: Db, ids: (string | null)[]): Promise<Map<string, string | null>> {
	const wanted = [...new Set(ids.filter((x): x is string => !!x))];
	if (!wanted.length) return new Map();
	const rows = await d
		.select({ id: users.id, email: users.email })
		.from(users)
		.where(inArray(users.id, wanted));
	return new Map(rows.map((r) => [r.id, r.email]));
}

/** The fields a history row compares, as the API shows them. */
export interface Shown {
	status: WorkOrderStatus;
	dueOn: string | null;
	assigneeEmail: string | null;
	notes: string | null;
	parts: OrderRow['parts'];
	cancelReason: string | null;
}

/** Field → [before, after] for the fields that really changed. */
export function diff<T extends object>(before: T, after: T): Record<string, [unknown, unknown]> {
	const out: Record<string, [unknown, unknown]> = {};
	for (const k of Object.keys(before) as (keyof T & string)[]) {
		if (JSON.stringify(before[k]) !== JSON.stringify(after[k])) out[k] = [before[k], after[k]];
	}
	return out;
}
