import type { Role } from '$lib/schemas/roles';

/** One line on what each role is for, shown beside the role checkboxes. */
export const ROLE_HINTS: Record<Role, string> = {
	operator: 'logs reseats, cleanings and notes at the machine',
	technician: 'inspections, break-in runs, part swaps, hold and release',
	supervisor: 'fleet health, history, the register and labels',
	planner: 'work orders, the replacement plan and calendars',
	admin: 'people and roles, sites, policies, sign-in settings'
};
