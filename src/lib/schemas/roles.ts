import { z } from 'zod';

/** The five roles; a person may hold several. */
export const ROLES = ['operator', 'technician', 'supervisor', 'planner', 'admin'] as const;
export const roleSchema = z.enum(ROLES);
export type Role = z.infer<typeof roleSchema>;
