import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { countMembers } from '$lib/server/repositories/teams';
import { listPendingInvitations } from '$lib/server/repositories/invitations';
import { listActiveTokens } from '$lib/server/repositories/api-tokens';
import { can } from '$lib/permissions';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, params, url }) => {
	const { team, role, user } = await requireTeamRole(locals, params.slug, 'team.view', { redirectFrom: url });
	const owner = can(role, 'members.manage');
	const [members, pending, tokens] = await Promise.all([
		countMembers(db, team.id),
		owner ? listPendingInvitations(db, team.id).then((l) => l.length) : Promise.resolve(null),
		listActiveTokens(db, team.id, user.id).then((l) => l.length)
	]);
	return { counts: { members, pending, myTokens: tokens } };
};
