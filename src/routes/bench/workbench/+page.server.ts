import { error } from '@sveltejs/kit';
import { config } from '$lib/server/config';
import type { PageServerLoad } from './$types';

// Only for `npm run bench` (ORRERY_BENCH_PAGES=1): the workbench's first render of a wide circuit.
export const load: PageServerLoad = async ({ url }) => {
	if (!config.benchPages) error(404, { message: 'Not found', code: 'not_found' });
	return { bits: Math.max(2, Math.min(16, Number(url.searchParams.get('bits') ?? 16))) };
};
