import { error, json } from '@sveltejs/kit';
import { apiRoute } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { requestCancel } from '$lib/server/checks/enqueue';
import { findTeamCheck, findCheck } from '$lib/server/checks/store';
import { checkView } from '$lib/server/checks/view';
import type { CheckCancelledResponse } from '$lib/api/types';
import type { RequestHandler } from './$types';

/** POST: cancel a queued or running check; its shards stop after their current chunk of inputs. 409 when it already finished. */
export const POST: RequestHandler = apiRoute(async ({ locals, params }) => {
	const access = await requireTeamRole(locals, params.slug, 'check.cancel');
	const row = await findTeamCheck(db, access.team.id, params.id);
	if (!row) error(404, { message: 'No such check in this team.', code: 'not_found' });
	const done = await requestCancel(db, row.id, access.user.id);
	if (!done) error(409, { message: `This check already ended (${row.status}).`, code: 'conflict' });
	return json({ check: checkView((await findCheck(db, row.id))!, null) } satisfies CheckCancelledResponse);
});
