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
	account: () => '/account',
	team: (slug: string) => `/teams/${enc(slug)}`,
	teamMembers: (slug: string) => `/teams/${enc(slug)}/members`,
	teamTokens: (slug: string) => `/teams/${enc(slug)}/tokens`,
	circuits: (slug: string) => `/teams/${enc(slug)}/circuits`,
	circuit: (slug: string, id: string, version?: number) =>
		`/teams/${enc(slug)}/circuits/${enc(id)}${version ? `?version=${version}` : ''}`,
	traces: (slug: string) => `/teams/${enc(slug)}/traces`,
	/** The read-only replay of a saved trace, opened at `step` (and, from a report, linking back to it). */
	replay: (slug: string, traceId: string, step?: number, reportId?: string) => {
		const q = new URLSearchParams();
		if (step !== undefined) q.set('step', String(step));
		if (reportId) q.set('report', reportId);
		const qs = q.toString();
		return `/teams/${enc(slug)}/traces/${enc(traceId)}/replay${qs ? `?${qs}` : ''}`;
	},
	reports: (slug: string) => `/teams/${enc(slug)}/reports`,
	report: (slug: string, id: string) => `/teams/${enc(slug)}/reports/${enc(id)}`,
	devOutbox: () => '/dev/outbox',
	api: {
		circuitExport: (slug: string, id: string, version?: number) => `/api/teams/${enc(slug)}/circuits/${enc(id)}/export${version ? `?version=${version}` : ''}`,
		circuits: (slug: string) => `/api/teams/${enc(slug)}/circuits`,
		circuitChecks: (slug: string, id: string) => `/api/teams/${enc(slug)}/circuits/${enc(id)}/checks`,
		check: (slug: string, id: string) => `/api/teams/${enc(slug)}/checks/${enc(id)}`,
		checkCancel: (slug: string, id: string) => `/api/teams/${enc(slug)}/checks/${enc(id)}/cancel`,
		me: () => '/api/me',
		teams: () => '/api/teams',
		teamMembers: (slug: string) => `/api/teams/${enc(slug)}/members`,
		teamInvitations: (slug: string) => `/api/teams/${enc(slug)}/invitations`,
		traces: (slug: string) => `/api/teams/${enc(slug)}/traces`,
		trace: (slug: string, id: string) => `/api/teams/${enc(slug)}/traces/${enc(id)}`,
		reports: (slug: string) => `/api/teams/${enc(slug)}/reports`,
		report: (slug: string, id: string) => `/api/teams/${enc(slug)}/reports/${enc(id)}`,
		/** The dial board at the report's step, drawn on the server (SVG). */
		reportBoard: (slug: string, id: string) => `/api/teams/${enc(slug)}/reports/${enc(id)}/board`,
		reportComments: (slug: string, id: string) => `/api/teams/${enc(slug)}/reports/${enc(id)}/comments`,
		breakpoints: (slug: string) => `/api/teams/${enc(slug)}/breakpoints`,
		breakpoint: (slug: string, id: string) => `/api/teams/${enc(slug)}/breakpoints/${enc(id)}`,
		breakpointComments: (slug: string, id: string) => `/api/teams/${enc(slug)}/breakpoints/${enc(id)}/comments`,
		attachment: (slug: string, id: string) => `/api/teams/${enc(slug)}/attachments/${enc(id)}`
	}
};

/** A `next` target from a query string, kept only when it is a path on this site. */
export function safeNext(next: string | null | undefined): string | null {
	if (!next || !next.startsWith('/') || next.startsWith('//') || next.startsWith('/\\')) return null;
	return next;
}
