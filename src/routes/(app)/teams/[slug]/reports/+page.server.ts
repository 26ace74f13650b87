import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { reportListPage } from '$lib/server/lists';
import { listCircuits } from '$lib/server/repositories/circuits';
import { listMembers } from '$lib/server/repositories/teams';
import type { PageServerLoad } from './$types';

// The table (the same function as GET /api/teams/{slug}/reports, so the same query string) and the filter choices.
export const load: PageServerLoad = async ({ locals, params, url }) => {
	const access = await requireTeamRole(locals, params.slug, 'report.view', { redirectFrom: url });
	const [list, circuits, members] = await Promise.all([reportListPage(access.team, url), listCircuits(db, access.team.id), listMembers(db, access.team.id)]);
	return {
		list,
		circuits: circuits.map((c) => ({ id: c.id, title: c.title })),
		people: members.map((m) => ({ id: m.user_id, name: m.name }))
	};
};
