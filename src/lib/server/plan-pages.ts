/**
 * Small reads the planner's pages need beside the work-order service: whom work can be assigned
 * to, and the open orders beside flags as plain records the pages can carry.
 */
import type { PlannedOrder } from '../schemas/plan';
import { listUsers } from './users';
import { openOrdersByFixture, openOrdersByFlag } from './work-order-reads';

export { todayUtc } from './work-order-reads';

/** A person work orders can be assigned to. */
export interface Assignee {
	email: string;
	name: string;
}

/** Active technicians, by name: the people the assignee select offers. */
export async function activeTechnicians(): Promise<Assignee[]> {
	const people = await listUsers();
	return people
		.filter((p) => p.active && p.roles.includes('technician'))
		.map((p) => ({ email: p.email, name: p.name }))
		.sort((a, b) => a.name.localeCompare(b.name));
}

/** Open work orders by the flag they answer, as a plain record the pages can carry. */
export async function plannedByFlag(flagIds: number[]): Promise<Record<number, PlannedOrder>> {
	if (flagIds.length === 0) return {};
	const byFlag = await openOrdersByFlag(flagIds);
	return Object.fromEntries(
		[...byFlag].map(([flagId, o]) => [
			flagId,
			{ id: o.id, status: o.status, dueOn: o.dueOn, assigneeName: o.assigneeName }
		])
	);
}

/**
 * Per fixture, its open work order due first (the register shows one line per fixture: its
 * flags are shown by kind, not one by one).
 */
export async function plannedByFixture(
	fixtureIds: number[]
): Promise<Record<number, PlannedOrder>> {
	if (fixtureIds.length === 0) return {};
	const byFixture = await openOrdersByFixture(fixtureIds);
	const out: Record<number, PlannedOrder> = {};
	for (const [fixtureId, list] of byFixture) {
		// Listed soonest due first.
		const first = list[0];
		if (first)
			out[fixtureId] = {
				id: first.id,
				status: first.status,
				dueOn: first.dueOn,
				assigneeName: first.assigneeName
			};
	}
	return out;
}
