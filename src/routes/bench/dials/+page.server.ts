import { error } from '@sveltejs/kit';
import { config } from '$lib/server/config';
import type { PageServerLoad } from './$types';

// Only for `npm run bench` (ORRERY_BENCH_PAGES=1): a dial board of many qubits, animated as if playing.
export const load: PageServerLoad = async ({ url }) => {
	if (!config.benchPages) error(404, { message: 'Not found', code: 'not_found' });
	const n = Math.max(1, Math.min(4096, Number(url.searchParams.get('qubits') ?? 256)));
	return { qubits: n, workbenchSize: url.searchParams.get('board') === 'workbench' };
};
