import { json } from '@sveltejs/kit';
import { apiRoute } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { listMembers } from '$lib/server/repositories/teams';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = apiRoute(async ({ locals, params }) => {
	const { team } = await requireTeamRole(locals, params.slug, 'members.view');
	const members = (await listMembers(db, team.id)).map((m) => ({
		id: m.user_id,
		email: m.email,
		name: m.name,
		role: m.role,
		joinedAt: new Date(m.joined_at).toISOString()
	}));
	return json({ members });
});
