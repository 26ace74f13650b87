import { json } from '@sveltejs/kit';
import { apiRoute } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireUser } from '$lib/server/guard';
import { listMyTeams } from '$lib/server/repositories/teams';
import { minRole } from '$lib/permissions';
import type { RequestHandler } from './$types';

/** Who the caller is and their teams. With a token: only the token's team, at the token's effective role. */
export const GET: RequestHandler = apiRoute(async ({ locals }) => {
	const user = requireUser(locals);
	let teams = await listMyTeams(db, user.id);
	const token = locals.token;
	if (token) teams = teams.filter((t) => t.id === token.teamId).map((t) => ({ ...t, role: minRole(t.role, token.role) }));
	return json({ user: { id: user.id, email: user.email, name: user.name }, teams: teams.map(({ slug, name, role }) => ({ slug, name, role })) });
});
