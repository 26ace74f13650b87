import { error } from '@sveltejs/kit';
import { db } from './db';
import { invitationMail, sendMail } from './mail';
import { createInvitation, findPendingInvitation, renewInvitation } from './repositories/invitations';
import type { TeamAccess } from './guard';
import type { InviteInput } from '$lib/schemas/team';

const day = (d: Date) => new Date(d).toISOString().slice(0, 10);

/**
 * Invite someone by e-mail (the guard has checked members.manage). Shared by the members page
 * and POST /api/teams/{slug}/invitations. 409 when the address is a member already, or has a
 * pending invitation (one address, one pending row, one mail: "Send again" renews it instead).
 * The team row is locked while checking, so two invitations at once cannot both pass.
 */
export async function inviteToTeam(access: TeamAccess, input: InviteInput) {
	const email = input.email.toLowerCase();
	const { invitation, token } = await db.transaction(async (trx) => {
		await trx('teams').where({ id: access.team.id }).forUpdate().first('id');
		const member = await trx('memberships as m').join('users as u', 'u.id', 'm.user_id').where({ 'm.team_id': access.team.id, 'u.email': email }).first('u.id');
		if (member) error(409, { message: `${email} is already a member of this team.`, code: 'conflict' });
		const pending = await findPendingInvitation(trx, access.team.id, email);
		if (pending)
			error(409, {
				message: `${email} already has a pending invitation (sent ${day(pending.created_at)}, valid until ${day(pending.expires_at)}). Use "Send again" in the list of open invitations to mail a fresh link.`,
				code: 'conflict'
			});
		return createInvitation(trx, { teamId: access.team.id, email, role: input.role, invitedBy: access.user.id });
	});
	await sendMail(invitationMail({ to: email, teamName: access.team.name, role: input.role, inviterName: access.user.name, token }));
	return { id: invitation.id, email: invitation.email, role: invitation.role, expiresAt: invitation.expires_at.toISOString() };
}

/** "Send again": a fresh link for a pending invitation; the old link then says it was replaced. 404 when not pending. */
export async function resendInvitation(access: TeamAccess, invitationId: string) {
	const renewed = await renewInvitation(db, access.team.id, invitationId, access.user.id);
	if (!renewed) error(404, { message: 'No such open invitation.', code: 'not_found' });
	const { invitation, token } = renewed;
	await sendMail(invitationMail({ to: invitation.email, teamName: access.team.name, role: invitation.role, inviterName: access.user.name, token }));
	return { id: invitation.id, email: invitation.email, role: invitation.role, expiresAt: invitation.expires_at.toISOString() };
}
