import { error } from '@sveltejs/kit';
import { config } from '$lib/server/config';
import { readOutbox } from '$lib/server/outbox';
import type { PageServerLoad } from './$types';

// Development only: what the local mail fake caught. 404 unless ORRERY_DEV_OUTBOX=1.
export const load: PageServerLoad = async () => {
	if (!config.devOutbox) error(404, { message: 'Not found', code: 'not_found' });
	return { messages: await readOutbox() };
};
