// The product's role table, in one place. Pure data and functions: the server guard uses it to
// decide, pages use it to decide what to show. Later issues add actions here, never elsewhere.

export const ROLES = ['owner', 'engineer', 'reviewer', 'viewer'] as const;
export type Role = (typeof ROLES)[number];

/** Higher is more. Used for "at least this role" and for capping API tokens. */
export const ROLE_RANK: Record<Role, number> = { owner: 4, engineer: 3, reviewer: 2, viewer: 1 };

export const ROLE_LABEL: Record<Role, string> = {
	owner: 'Owner',
	engineer: 'Engineer',
	reviewer: 'Reviewer',
	viewer: 'Viewer'
};

const RIGHTS = {
	'team.view': ['owner', 'engineer', 'reviewer', 'viewer'],
	'members.view': ['owner', 'engineer', 'reviewer', 'viewer'],
	'members.manage': ['owner'],
	'circuit.view': ['owner', 'engineer', 'reviewer', 'viewer'],
	'circuit.edit': ['owner', 'engineer'],
	/** Server checks: everyone reads verdicts and progress; those who edit circuits queue and cancel them. */
	'check.view': ['owner', 'engineer', 'reviewer', 'viewer'],
	'check.run': ['owner', 'engineer'],
	'check.cancel': ['owner', 'engineer'],
	'trace.replay': ['owner', 'engineer', 'reviewer', 'viewer'],
	'trace.create': ['owner', 'engineer'],
	'trace.delete': ['owner'],
	'breakpoint.create': ['owner', 'engineer'],
	'breakpoint.delete': ['owner'],
	'breakpoint.annotate': ['owner', 'engineer', 'reviewer'],
	'report.view': ['owner', 'engineer', 'reviewer', 'viewer'],
	'report.create': ['owner', 'engineer'],
	'report.edit': ['owner', 'engineer'],
	'report.comment': ['owner', 'engineer', 'reviewer'],
	'report.status': ['owner', 'engineer', 'reviewer'],
	'report.delete': ['owner'],
	// A token never exceeds its creator's role; viewers only look, so they make none.
	'token.create': ['owner', 'engineer', 'reviewer'],
	/** Revoke anyone's token (everyone may revoke their own). */
	'token.revoke_any': ['owner']
} as const satisfies Record<string, readonly Role[]>;

export type Action = keyof typeof RIGHTS;
export const ACTIONS = Object.keys(RIGHTS) as Action[];

export function isRole(v: unknown): v is Role {
	return typeof v === 'string' && (ROLES as readonly string[]).includes(v);
}

/** May a member with `role` do `action`? */
export function can(role: Role | null | undefined, action: Action): boolean {
	if (!role) return false;
	return (RIGHTS[action] as readonly Role[]).includes(role);
}

export function atLeast(role: Role, least: Role): boolean {
	return ROLE_RANK[role] >= ROLE_RANK[least];
}

/** The lesser of two roles: a token's effective role is min(its role, its creator's current role). */
export function minRole(a: Role, b: Role): Role {
	return ROLE_RANK[a] <= ROLE_RANK[b] ? a : b;
}

/** Roles a member may grant to an API token they create. */
export function grantableTokenRoles(role: Role): Role[] {
	return ROLES.filter((r) => ROLE_RANK[r] <= ROLE_RANK[role]);
}
