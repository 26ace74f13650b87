import { error, redirect } from '@sveltejs/kit';
import { hashPassword, startSession } from '$lib/server/auth';
import { db } from '$lib/server/db';
import { isDuplicateKey } from '$lib/server/errors';
import { formFailure, parseForm } from '$lib/server/forms';
import { requireAccount } from '$lib/server/guard';
import { acceptInvitation, invitationProblem, lookupInvitation } from '$lib/server/repositories/invitations';
import { findUserByEmail, insertUser } from '$lib/server/repositories/users';
import { inviteSignUpSchema } from '$lib/schemas/auth';
import { routes } from '$lib/routes';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ params, locals }) => {
	const found = await lookupInvitation(db, params.token);
	if (found.state !== 'ok') return { problem: invitationProblem(found.state), invitation: null };
	const inv = found.invitation;
	const view = { email: inv.email, role: inv.role, teamName: inv.teamName, invitedByName: inv.invitedByName };
	if (locals.user) {
		return { problem: null, invitation: view, signedInAs: locals.user.email, matches: locals.user.email === inv.email, accountExists: true };
	}
	const accountExists = (await findUserByEmail(db, inv.email)) !== undefined;
	return { problem: null, invitation: view, signedInAs: null, matches: false, accountExists };
};

export const actions: Actions = {
	accept: async ({ params, locals }) => {
		const user = requireAccount(locals);
		const { teamSlug } = await acceptInvitation(db, params.token, user);
		redirect(303, routes.team(teamSlug));
	},
	/** A new account for the invited address, then accept, in that order; the address comes from the invitation. */
	signup: async ({ params, request, cookies }) => {
		const form = await parseForm(request, inviteSignUpSchema);
		if (!form.ok) return form.failure;
		const found = await lookupInvitation(db, params.token);
		if (found.state !== 'ok') error(410, { message: invitationProblem(found.state), code: 'gone' });
		let user;
		try {
			user = await insertUser(db, { email: found.invitation.email, name: form.data.name, passwordHash: await hashPassword(form.data.password) });
		} catch (e) {
			if (isDuplicateKey(e)) return formFailure(400, 'An account with this address exists already: sign in to accept.', form.raw);
			throw e;
		}
		await startSession(cookies, user.id);
		const { teamSlug } = await acceptInvitation(db, params.token, user);
		redirect(303, routes.team(teamSlug));
	}
};
