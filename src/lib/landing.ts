/**
 * Where each person lands on `/` and after signing in: where their work is. Pure and shared;
 * relative imports so the browser tests can read it too.
 */
import type { Role } from './schemas/roles';

/** Each role's landing page. */
export const LANDING: Readonly<Record<Role, string>> = {
	supervisor: '/board',
	planner: '/plan',
	technician: '/work',
	operator: '/scan',
	admin: '/board'
};

/** With several roles, the first of these that a person holds decides (admin only alone). */
const PRECEDENCE: readonly Role[] = ['supervisor', 'planner', 'technician', 'operator', 'admin'];

/** The landing page for someone with `roles`; the register for someone with none. */
export function landingFor(roles: readonly Role[]): string {
	const role = PRECEDENCE.find((r) => roles.includes(r));
	return role ? LANDING[role] : '/fixtures';
}
