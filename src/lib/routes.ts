// One function per URL, so links never drift. Safe in the browser and on the server.

const enc = encodeURIComponent;

export const routes = {
	home: () => '/',
	signIn: (next?: string) => (next ? `/signin?next=${enc(next)}` : '/signin'),
	signUp: () => '/signup',
	signOut: () => '/signout',
	resetRequest: () => '/reset',
	resetPassword: (token: string) => `/reset/${enc(token)}`,
	invite: (token: string) => `/invite/${enc(token)}`,
	teams: () => '/teams',
	team: (slug: string) => `/teams/${enc(slug)}`,
	teamMembers: (slug: string) => `/teams/${enc(slug)}/members`,
	teamTokens: (slug: string) => `/teams/${enc(slug)}/tokens`,
	circuits: (slug: string) => `/teams/${enc(slug)}/circuits`,
	circuit: (slug: string, id: string, version?: number) =>
		`/teams/${enc(slug)}/circuits/${enc(id)}${version ? `?version=${version}` : ''}`,
	devOutbox: () => '/dev/outbox',
	api: {
		me: () => '/api/me',
		teams: () => '/api/teams',
		teamMembers: (slug: string) => `/api/teams/${enc(slug)}/members`,
		teamInvitations: (slug: string) => `/api/teams/${enc(slug)}/invitations`
	}
};

/** A `next` target from a query string, kept only when it is a path on this site. */
export function safeNext(next: string | null | undefined): string | null {
	if (!next || !next.startsWith('/') || next.startsWith('//') || next.startsWith('/\\')) return null;
	return next;
}
