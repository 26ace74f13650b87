import { redirect } from '@sveltejs/kit';
import { hashPassword, lucia, startSession } from '$lib/server/auth';
import { db } from '$lib/server/db';
import { formFailure, parseForm } from '$lib/server/forms';
import { landingFor } from '$lib/server/landing';
import { consumePasswordReset, findLiveReset } from '$lib/server/repositories/password-resets';
import { updatePasswordHash } from '$lib/server/repositories/users';
import { resetPasswordSchema } from '$lib/schemas/auth';
import type { Actions, PageServerLoad } from './$types';

const DEAD = 'This link has expired or has been used. Ask for a new one.';

export const load: PageServerLoad = async ({ params }) => {
	return { live: (await findLiveReset(db, params.token)) !== null };
};

export const actions: Actions = {
	default: async ({ request, params, cookies }) => {
		const form = await parseForm(request, resetPasswordSchema);
		if (!form.ok) return form.failure;
		const passwordHash = await hashPassword(form.data.password);
		const userId = await consumePasswordReset(db, params.token, (trx, id) => updatePasswordHash(trx, id, passwordHash));
		if (!userId) return formFailure(400, DEAD, form.raw);
		// Whoever knew the old password is out: every session of this user ends, then a fresh one starts here.
		await lucia.invalidateUserSessions(userId);
		await startSession(cookies, userId);
		redirect(303, await landingFor(userId));
	}
};
