import { redirect } from '@sveltejs/kit';
import { startSession, verifyAgainstDummy, verifyPassword } from '$lib/server/auth';
import { db } from '$lib/server/db';
import { formFailure, parseForm } from '$lib/server/forms';
import { landingFor } from '$lib/server/landing';
import { limits, TooManyAttempts } from '$lib/server/rate-limit';
import { findUserByEmail } from '$lib/server/repositories/users';
import { signInSchema } from '$lib/schemas/auth';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	if (locals.user) redirect(303, await landingFor(locals.user.id, url.searchParams.get('next')));
};

const GENERIC = 'That e-mail and password do not match an account.';

export const actions: Actions = {
	default: async ({ request, cookies, url, getClientAddress, setHeaders }) => {
		const form = await parseForm(request, signInSchema);
		if (!form.ok) return form.failure;
		const { email, password } = form.data;
		const address = getClientAddress();
		try {
			await limits.signIn.check(email, address);
		} catch (e) {
			if (!(e instanceof TooManyAttempts)) throw e;
			setHeaders({ 'retry-after': String(e.retryAfterSeconds) });
			return formFailure(429, e.message, form.raw);
		}
		const user = await findUserByEmail(db, email);
		const ok = user ? await verifyPassword(user.password_hash, password) : await verifyAgainstDummy(password);
		if (!user || !ok) {
			await limits.signIn.fail(email, address);
			return formFailure(400, GENERIC, form.raw);
		}
		await limits.signIn.succeed(email);
		await startSession(cookies, user.id);
		redirect(303, await landingFor(user.id, url.searchParams.get('next')));
	}
};
