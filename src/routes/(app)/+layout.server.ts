import { db } from '$lib/server/db';
import { requireUser } from '$lib/server/guard';
import { listMyTeams } from '$lib/server/repositories/teams';
import type { LayoutServerLoad } from './$types';

export const load: LayoutServerLoad = async ({ locals, url, request, depends }) => {
	depends('app:teams');
	// A page view without a session goes to sign-in; a form post without one answers 401.
	const user = requireUser(locals, request.method === 'GET' ? { redirectFrom: url } : undefined);
	const teams = (await listMyTeams(db, user.id)).map(({ slug, name, role }) => ({ slug, name, role }));
	return { user, teams };
};
