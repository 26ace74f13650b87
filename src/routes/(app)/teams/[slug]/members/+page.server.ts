import { error, isHttpError, redirect } from '@sveltejs/kit';
import { db } from '$lib/server/db';
import { formFailure, parseForm } from '$lib/server/forms';
import { requireTeamRole } from '$lib/server/guard';
import { inviteToTeam, resendInvitation } from '$lib/server/team-actions';
import { changeMemberRole, listMembers, removeMember } from '$lib/server/repositories/teams';
import { listPendingInvitations, revokeInvitation } from '$lib/server/repositories/invitations';
import { changeRoleSchema, invitationRefSchema, inviteSchema, memberRefSchema } from '$lib/schemas/team';
import { can } from '$lib/permissions';
import { routes } from '$lib/routes';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, params, url }) => {
	const { team, role, user } = await requireTeamRole(locals, params.slug, 'members.view', { redirectFrom: url });
	const members = (await listMembers(db, team.id)).map((m) => ({
		userId: m.user_id,
		name: m.name,
		email: m.email,
		role: m.role,
		joinedAt: new Date(m.joined_at).toISOString()
	}));
	const invitations = can(role, 'members.manage')
		? (await listPendingInvitations(db, team.id)).map((i) => ({
				id: i.id,
				email: i.email,
				role: i.role,
				invitedBy: i.invited_by_name,
				expiresAt: new Date(i.expires_at).toISOString()
			}))
		: [];
	return { members, invitations, meId: user.id };
};

/** A 409 (last owner, already a member) is shown next to the form rather than as an error page. */
async function asFormProblem<T>(raw: Record<string, string>, run: () => Promise<T>) {
	try {
		return await run();
	} catch (e) {
		if (isHttpError(e) && e.status === 409) return formFailure(409, e.body.message, raw);
		throw e;
	}
}

export const actions: Actions = {
	invite: async ({ locals, params, request }) => {
		const access = await requireTeamRole(locals, params.slug, 'members.manage');
		const form = await parseForm(request, inviteSchema);
		if (!form.ok) return form.failure;
		return asFormProblem(form.raw, async () => ({ invited: (await inviteToTeam(access, form.data)).email }));
	},
	resendInvite: async ({ locals, params, request }) => {
		const access = await requireTeamRole(locals, params.slug, 'members.manage');
		const form = await parseForm(request, invitationRefSchema);
		if (!form.ok) return form.failure;
		return { resent: (await resendInvitation(access, form.data.invitationId)).email };
	},
	revokeInvite: async ({ locals, params, request }) => {
		const { team } = await requireTeamRole(locals, params.slug, 'members.manage');
		const form = await parseForm(request, invitationRefSchema);
		if (!form.ok) return form.failure;
		if (!(await revokeInvitation(db, team.id, form.data.invitationId))) {
			error(404, { message: 'No such open invitation.', code: 'not_found' });
		}
		return { revoked: true };
	},
	changeRole: async ({ locals, params, request }) => {
		const { team } = await requireTeamRole(locals, params.slug, 'members.manage');
		const form = await parseForm(request, changeRoleSchema);
		if (!form.ok) return form.failure;
		return asFormProblem(form.raw, async () => {
			await changeMemberRole(db, team.id, form.data.userId, form.data.role);
			return { changed: true };
		});
	},
	remove: async ({ locals, params, request }) => {
		const { team } = await requireTeamRole(locals, params.slug, 'members.manage');
		const form = await parseForm(request, memberRefSchema);
		if (!form.ok) return form.failure;
		return asFormProblem(form.raw, async () => {
			await removeMember(db, team.id, form.data.userId);
			return { removed: true };
		});
	},
	leave: async ({ locals, params }) => {
		const { team, user } = await requireTeamRole(locals, params.slug, 'team.view');
		const result = await asFormProblem({}, () => removeMember(db, team.id, user.id));
		if (result) return result;
		redirect(303, routes.teams());
	}
};
