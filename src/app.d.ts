// See https://svelte.dev/docs/kit/types#app.d.ts
import type { Role } from '$lib/schemas/roles';

declare global {
	namespace App {
		interface Error {
			message: string;
			code?: string;
		}
		interface Locals {
			/** The signed-in user, or null; filled by the auth handle in hooks.server.ts. */
			user: {
				id: string;
				email: string;
				name: string;
				roles: Role[];
				/** The row in sign_in_sessions this request's cookie names. */
				sessionId?: string;
			} | null;
		}
	}
}

export {};
