import { error } from '@sveltejs/kit';
import { db } from './db';
import { invitationMail, sendMail } from './mail';
import { createInvitation } from './repositories/invitations';
import type { TeamAccess } from './guard';
import type { InviteInput } from '$lib/schemas/team';

/**
 * Invite someone by e-mail (the guard has checked members.manage). Shared by the members page
 * and POST /api/teams/{slug}/invitations. 409 when the address is a member already.
 */
export async function inviteToTeam(access: TeamAccess, input: InviteInput) {
	const member = await db('memberships as m')
		.join('users as u', 'u.id', 'm.user_id')
		.where({ 'm.team_id': access.team.id, 'u.email': input.email })
		.first('u.id');
	if (member) error(409, { message: `${input.email} is already a member of this team.`, code: 'conflict' });
	const { invitation, token } = await createInvitation(db, { teamId: access.team.id, email: input.email, role: input.role, invitedBy: access.user.id });
	await sendMail(invitationMail({ to: input.email, teamName: access.team.name, role: input.role, inviterName: access.user.name, token }));
	return { id: invitation.id, email: invitation.email, role: invitation.role, expiresAt: invitation.expires_at.toISOString() };
}
