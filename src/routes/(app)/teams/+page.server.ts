import { redirect } from '@sveltejs/kit';
import { db } from '$lib/server/db';
import { parseForm } from '$lib/server/forms';
import { requireAccount } from '$lib/server/guard';
import { createTeam } from '$lib/server/repositories/teams';
import { createTeamSchema } from '$lib/schemas/team';
import { routes } from '$lib/routes';
import type { Actions } from './$types';

export const actions: Actions = {
	create: async ({ locals, request }) => {
		const user = requireAccount(locals);
		const form = await parseForm(request, createTeamSchema);
		if (!form.ok) return form.failure;
		const team = await createTeam(db, form.data.name, user.id);
		redirect(303, routes.team(team.slug));
	}
};
