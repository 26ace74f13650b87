import { error, redirect } from '@sveltejs/kit';
import { db } from './db';
import { findMembership, findTeamBySlug, type TeamRow } from './repositories/teams';
import { atLeast, can, isRole, minRole, type Action, type Role } from '$lib/permissions';
import { routes } from '$lib/routes';

// The one server-side check every action, endpoint and team page load goes through.
// A layout's guard does not protect actions or +server routes, so each calls this itself.

export type SignedInUser = { id: string; email: string; name: string };
export type TeamAccess = { user: SignedInUser; team: TeamRow; role: Role; viaToken: boolean };

type GuardOptions = {
	/** On a page load, send a visitor without a session to sign-in (and back) instead of a 401. */
	redirectFrom?: URL;
};

function unauthenticated(opts?: GuardOptions): never {
	if (opts?.redirectFrom) redirect(303, routes.signIn(opts.redirectFrom.pathname + opts.redirectFrom.search));
	error(401, { message: 'Sign in first.', code: 'unauthorized' });
}

/** 401 without a session or token. */
export function requireUser(locals: App.Locals, opts?: GuardOptions): SignedInUser {
	if (!locals.user) unauthenticated(opts);
	return locals.user;
}

/** For things that make sense only for a person at a browser or for a whole account (not a team token). */
export function requireAccount(locals: App.Locals, opts?: GuardOptions): SignedInUser {
	const user = requireUser(locals, opts);
	if (locals.token) error(403, { message: 'API tokens are bound to one team and cannot do this.', code: 'forbidden' });
	return user;
}

const NOT_FOUND = { message: 'No such team, or you are not a member of it.', code: 'not_found' };

/**
 * Resolve `teamSlug` for the signed-in user and check the role.
 * `need` is either a least role ('engineer') or a named action ('report.status').
 * 401 without a session or token; 404 when the team does not exist, the user is not a member,
 * or a token is bound to another team (the same answer, so existence does not leak);
 * 403 when the role may not. With a token, the role is min(token role, creator's current role).
 */
export async function requireTeamRole(
	locals: App.Locals,
	teamSlug: string,
	need: Role | Action,
	opts?: GuardOptions
): Promise<TeamAccess> {
	const user = requireUser(locals, opts);
	const team = await findTeamBySlug(db, teamSlug);
	if (!team) error(404, NOT_FOUND);
	if (locals.token && locals.token.teamId !== team.id) error(404, NOT_FOUND);
	const membership = await findMembership(db, team.id, user.id);
	if (!membership) error(404, NOT_FOUND);
	const role = locals.token && isRole(locals.token.role) ? minRole(locals.token.role, membership.role) : membership.role;
	const allowed = isRole(need) ? atLeast(role, need) : can(role, need);
	if (!allowed) error(403, { message: 'Your role in this team does not allow this.', code: 'forbidden' });
	return { user, team, role, viaToken: locals.token !== null };
}
