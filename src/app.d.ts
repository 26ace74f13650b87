// See https://svelte.dev/docs/kit/types#app.d.ts
declare global {
	namespace App {
		interface Error {
			message: string;
			code?: string;
			/** Seconds, on 429 answers. */
			retryAfter?: number;
		}
		interface Locals {
			/** Filled by hooks.server.ts from the session cookie or an API token. */
			user: { id: string; email: string; name: string } | null;
			session: { id: string; expiresAt: Date } | null;
			/** Set when the request authenticated with an API token (bound to one team and role). */
			token: { id: string; teamId: string; role: import('$lib/permissions').Role } | null;
		}
		// interface PageData {}
		// interface PageState {}
		// interface Platform {}
	}
}

export {};
