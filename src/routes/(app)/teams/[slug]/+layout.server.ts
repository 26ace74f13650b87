import { requireTeamRole } from '$lib/server/guard';
import { can } from '$lib/permissions';
import type { LayoutServerLoad } from './$types';

export const load: LayoutServerLoad = async ({ locals, params, url, request }) => {
	const redirectFrom = request.method === 'GET' ? url : undefined;
	const { team, role } = await requireTeamRole(locals, params.slug, 'team.view', { redirectFrom });
	return {
		team: { slug: team.slug, name: team.name },
		role,
		rights: { manageMembers: can(role, 'members.manage'), createTokens: can(role, 'token.create') }
	};
};
