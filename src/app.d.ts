import type { Role } from '$lib/roles';

declare global {
	namespace App {
		interface Locals {
			/** Filled by the auth hook from the session; null when signed out. Never trusted for access alone. */
			user: { id: string; name: string; email: string; role: Role } | null;
			/** Set by the credentials provider when it refuses a sign-in for too many failures: seconds to wait. */
			signInWait?: number;
		}
		interface Error {
			message: string;
		}
	}
}

declare module '@auth/sveltekit' {
	interface Session {
		user: { id: string; name?: string | null; email?: string | null; role: Role; gen: number };
	}
}

export {};
