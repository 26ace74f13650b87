import { json } from '@sveltejs/kit';
import { apiRoute, readJson } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireAccount } from '$lib/server/guard';
import { createTeam } from '$lib/server/repositories/teams';
import { createTeamSchema } from '$lib/schemas/team';
import type { RequestHandler } from './$types';

/** Create a team; the caller becomes its owner. Not with an API token (tokens belong to one team). */
export const POST: RequestHandler = apiRoute(async ({ locals, request }) => {
	const user = requireAccount(locals);
	const { name } = await readJson(request, createTeamSchema);
	const team = await createTeam(db, name, user.id);
	return json({ slug: team.slug, name: team.name }, { status: 201 });
});
