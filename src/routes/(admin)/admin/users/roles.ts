import type { Role } from '$lib/schemas/roles';

/**
 * One line on what each role is for, shown beside the role checkboxes. Everyone signed in reads the
 * register, its health and its history; the lines say what each role adds. Keep them in step with
 * the permission table in $lib/permissions.
 */
export const ROLE_HINTS: Record<Role, string> = {
	operator: 'logs reseats, cleanings and notes at the machine',
	technician:
		'logs every event: also inspections, break-in runs, part swaps, moves, hold and release',
	supervisor: 'every event, plus the register, coupling geometry, policies and labels',
	planner: 'reads the register and its health; logs notes',
	admin: 'people and roles, plus everything a supervisor does'
};
