import { redirect } from '@sveltejs/kit';
import { hashPassword, startSession } from '$lib/server/auth';
import { db } from '$lib/server/db';
import { isDuplicateKey } from '$lib/server/errors';
import { formFailure, parseForm } from '$lib/server/forms';
import { insertUser } from '$lib/server/repositories/users';
import { landingFor } from '$lib/server/landing';
import { signUpSchema } from '$lib/schemas/auth';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	if (locals.user) redirect(303, await landingFor(locals.user.id, url.searchParams.get('next')));
};

export const actions: Actions = {
	default: async ({ request, cookies, url }) => {
		const form = await parseForm(request, signUpSchema);
		if (!form.ok) return form.failure;
		const { name, email, password } = form.data;
		let userId: string;
		try {
			userId = (await insertUser(db, { name, email, passwordHash: await hashPassword(password) })).id;
		} catch (e) {
			if (isDuplicateKey(e)) {
				return formFailure(400, 'An account with this address exists already. Sign in, or reset the password.', form.raw, 'email');
			}
			throw e;
		}
		await startSession(cookies, userId);
		redirect(303, await landingFor(userId, url.searchParams.get('next')));
	}
};
