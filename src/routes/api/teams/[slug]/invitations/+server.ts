import { json } from '@sveltejs/kit';
import { apiRoute, readJson } from '$lib/server/api';
import { requireTeamRole } from '$lib/server/guard';
import { inviteToTeam } from '$lib/server/team-actions';
import { inviteSchema } from '$lib/schemas/team';
import type { RequestHandler } from './$types';

/** Owner only. The link goes to the invitee by e-mail; it is never in this answer. */
export const POST: RequestHandler = apiRoute(async ({ locals, params, request }) => {
	const access = await requireTeamRole(locals, params.slug, 'members.manage');
	const input = await readJson(request, inviteSchema);
	return json(await inviteToTeam(access, input), { status: 201 });
});
