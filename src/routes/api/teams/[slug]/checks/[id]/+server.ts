import { error, json } from '@sveltejs/kit';
import { apiRoute } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { readProgress } from '$lib/server/checks/enqueue';
import { findTeamCheck } from '$lib/server/checks/store';
import { checkView } from '$lib/server/checks/view';
import type { RequestHandler } from './$types';

/** GET: one server check with its progress (shards done, inputs/s, estimate); the browser polls this while it runs. */
export const GET: RequestHandler = apiRoute(async ({ locals, params }) => {
	const access = await requireTeamRole(locals, params.slug, 'check.view');
	const row = await findTeamCheck(db, access.team.id, params.id);
	if (!row) error(404, { message: 'No such check in this team.', code: 'not_found' });
	return json({ check: checkView(row, await readProgress(db, row)) }, { headers: { 'cache-control': 'no-store' } });
});
