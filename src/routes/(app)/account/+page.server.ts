import { isHttpError, redirect } from '@sveltejs/kit';
import { db } from '$lib/server/db';
import { endSession, hashPassword, verifyPassword } from '$lib/server/auth';
import { formFailure, parseForm } from '$lib/server/forms';
import { requireAccount, requireTeamRole } from '$lib/server/guard';
import { removeMember, listMyTeams } from '$lib/server/repositories/teams';
import {
	deleteUser,
	endOtherSessions,
	findUserById,
	getReportMail,
	LastOwnerError,
	listSessions,
	setReportMail,
	teamsOnlyOwnedBy,
	updatePasswordHash,
	updateUserName
} from '$lib/server/repositories/users';
import { deleteAccountSchema, displayNameSchema, leaveTeamSchema, mailSettingsSchema, passwordChangeSchema } from '$lib/schemas/account';
import { routes } from '$lib/routes';
import type { Actions, PageServerLoad } from './$types';

// The account page: every action checks the session itself (an API token is refused: these are
// a person's own settings), and the ones that could lock someone out need the current password.

export const load: PageServerLoad = async ({ locals, url }) => {
	const user = requireAccount(locals, { redirectFrom: url });
	return {
		account: { name: user.name, email: user.email, reportMail: await getReportMail(db, user.id) },
		sessions: await listSessions(db, user.id, locals.session?.id ?? null),
		memberships: (await listMyTeams(db, user.id)).map(({ slug, name, role }) => ({ slug, name, role })),
		onlyOwnerOf: await teamsOnlyOwnedBy(db, user.id)
	};
};

async function checkPassword(userId: string, password: string): Promise<boolean> {
	const row = await findUserById(db, userId);
	return row ? verifyPassword(row.password_hash, password) : false;
}

export const actions: Actions = {
	name: async ({ locals, request }) => {
		const user = requireAccount(locals);
		const form = await parseForm(request, displayNameSchema);
		if (!form.ok) return form.failure;
		await updateUserName(db, user.id, form.data.name);
		return { saved: 'name' as const };
	},
	password: async ({ locals, request }) => {
		const user = requireAccount(locals);
		const form = await parseForm(request, passwordChangeSchema);
		if (!form.ok) return form.failure;
		if (!(await checkPassword(user.id, form.data.currentPassword))) return formFailure(400, 'That is not your current password.', form.raw, 'currentPassword');
		await updatePasswordHash(db, user.id, await hashPassword(form.data.password));
		// A new password ends every other session: whoever knew the old one is signed out.
		const ended = await endOtherSessions(db, user.id, locals.session?.id ?? null);
		return { saved: 'password' as const, ended };
	},
	signOutOthers: async ({ locals }) => {
		const user = requireAccount(locals);
		return { saved: 'sessions' as const, ended: await endOtherSessions(db, user.id, locals.session?.id ?? null) };
	},
	mail: async ({ locals, request }) => {
		const user = requireAccount(locals);
		const form = await parseForm(request, mailSettingsSchema);
		if (!form.ok) return form.failure;
		await setReportMail(db, user.id, form.data.reportMail === 'on');
		return { saved: 'mail' as const };
	},
	leave: async ({ locals, request }) => {
		requireAccount(locals);
		const form = await parseForm(request, leaveTeamSchema);
		if (!form.ok) return form.failure;
		const { team, user } = await requireTeamRole(locals, form.data.team, 'team.view');
		try {
			await removeMember(db, team.id, user.id);
		} catch (e) {
			if (isHttpError(e) && e.status === 409) return formFailure(409, `You are the only owner of "${team.name}": make someone else an owner before you leave.`, form.raw, 'team');
			throw e;
		}
		return { saved: 'left' as const, team: team.name };
	},
	delete: async ({ locals, request, cookies }) => {
		const user = requireAccount(locals);
		const form = await parseForm(request, deleteAccountSchema);
		if (!form.ok) return form.failure;
		if (!(await checkPassword(user.id, form.data.currentPassword))) return formFailure(400, 'That is not your current password.', form.raw, 'currentPassword');
		try {
			await deleteUser(db, user.id);
		} catch (e) {
			if (e instanceof LastOwnerError) return formFailure(409, e.message, form.raw, 'delete');
			throw e;
		}
		await endSession(cookies, undefined);
		redirect(303, routes.home());
	}
};
