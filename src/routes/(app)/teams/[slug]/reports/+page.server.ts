import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { listCircuits } from '$lib/server/repositories/circuits';
import { listMembers } from '$lib/server/repositories/teams';
import type { PageServerLoad } from './$types';

// The filter choices; the rows come from the JSON API in +page.ts.
export const load: PageServerLoad = async ({ locals, params, url }) => {
	const access = await requireTeamRole(locals, params.slug, 'report.view', { redirectFrom: url });
	return {
		circuits: (await listCircuits(db, access.team.id)).map((c) => ({ id: c.id, title: c.title })),
		people: (await listMembers(db, access.team.id)).map((m) => ({ id: m.user_id, name: m.name }))
	};
};
