/**
 * Small reads the planner's pages need beside the work-order service: whom work can be assigned
 * to, and the calendar day the list counts "overdue" from.
 */
import { listUsers } from './users';

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

/** Today as a UTC calendar day (YYYY-MM-DD): due dates are calendar days, compared as text. */
export function todayUtc(now = new Date()): string {
	return now.toISOString().slice(0, 10);
}
