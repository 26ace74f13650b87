import { error } from '@sveltejs/kit';
import { dev } from '$app/environment';
import { outboxAllowed } from '$lib/server/config';
import { readOutbox } from '$lib/server/outbox';
import type { PageServerLoad } from './$types';

// Development and tests only: what the local mail fake caught, and of that only the mail addressed
// to the signed-in user (it holds reset and invitation links: anything else would hand over
// accounts). 404 for everyone else, and in every `npm start` or production build.
export const load: PageServerLoad = async ({ locals }) => {
	if (!outboxAllowed(process.env, dev) || !locals.user) error(404, { message: 'Not found', code: 'not_found' });
	return { messages: await readOutbox(locals.user.email) };
};
