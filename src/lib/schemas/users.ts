import { z } from 'zod';
import { roleSchema } from './roles';

/** An e-mail address as people type it: trimmed, lower-cased, checked. */
export const emailSchema = z
	.string({ error: 'Enter an e-mail address.' })
	.trim()
	.toLowerCase()
	.min(1, 'Enter an e-mail address.')
	.max(255, 'That address is too long (255 characters at most).')
	.pipe(z.email({ error: 'Enter an e-mail address like name@example.com.' }));

/** The e-mail + password form. The password is not trimmed: spaces may be part of it. */
export const passwordSignInSchema = z.object({
	email: emailSchema,
	password: z
		.string({ error: 'Enter your password.' })
		.min(1, 'Enter your password.')
		.max(200, 'That password is too long.')
});

/** The "e-mail me a sign-in link" form. */
export const linkRequestSchema = z.object({ email: emailSchema });

/** A new password: long enough to resist guessing, short enough for bcrypt's 72-byte limit. */
export const newPasswordSchema = z
	.string()
	.min(10, 'Use at least 10 characters.')
	.max(72, 'Use at most 72 characters.');

/** A person's display name. */
export const nameSchema = z
	.string({ error: 'Enter the person’s name.' })
	.trim()
	.min(1, 'Enter the person’s name.')
	.max(120, 'Keep the name under 120 characters.');

/** One or more roles, without repeats. */
export const rolesSchema = z
	.array(roleSchema, { error: 'Choose at least one role.' })
	.min(1, 'Choose at least one role.')
	.transform((roles) => [...new Set(roles)]);

/** What createUser takes (the seed script and the admin page both go through it). */
export const newUserSchema = z.object({
	email: emailSchema,
	name: nameSchema,
	password: newPasswordSchema.optional(),
	roles: rolesSchema
});
export type NewUser = z.input<typeof newUserSchema>;

/** The admin's invite form. */
export const inviteSchema = z.object({ email: emailSchema, name: nameSchema, roles: rolesSchema });

/** The admin's per-person role form. */
export const setRolesSchema = z.object({ userId: z.string().min(1).max(255), roles: rolesSchema });

/** A form that names one person. */
export const userIdSchema = z.object({ userId: z.string().min(1).max(255) });

/** The "change your password" form; `current` is empty for people who have none yet. */
export const changePasswordSchema = z
	.object({
		current: z.string().max(200, 'That password is too long.'),
		next: newPasswordSchema,
		confirm: z.string()
	})
	.refine((v) => v.next === v.confirm, {
		path: ['confirm'],
		message: 'The two new passwords differ.'
	});
