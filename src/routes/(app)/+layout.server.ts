import { db } from '$lib/server/db';
import { requireUser } from '$lib/server/guard';
import { listMyTeams } from '$lib/server/repositories/teams';
import type { LayoutServerLoad } from './$types';

export const load: LayoutServerLoad = async ({ locals, url, depends }) => {
	depends('app:teams');
	const user = requireUser(locals, { redirectFrom: url });
	const teams = (await listMyTeams(db, user.id)).map(({ slug, name, role }) => ({ slug, name, role }));
	return { user, teams };
};
