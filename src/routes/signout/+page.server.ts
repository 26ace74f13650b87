import { redirect } from '@sveltejs/kit';
import { endSession } from '$lib/server/auth';
import { routes } from '$lib/routes';
import type { Actions, PageServerLoad } from './$types';

// Signing out changes state, so it is a POST (a form in the user menu); a GET just goes home.
export const load: PageServerLoad = async () => redirect(303, routes.home());

export const actions: Actions = {
	default: async ({ locals, cookies }) => {
		await endSession(cookies, locals.session?.id);
		redirect(303, routes.signIn());
	}
};
