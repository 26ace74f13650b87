import { error, json } from '@sveltejs/kit';
import { apiRoute, readJson } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { addReportComment, findReport } from '$lib/server/repositories/reports';
import { commentSchema } from '$lib/schemas/debugging';
import type { RequestHandler } from './$types';

export const POST: RequestHandler = apiRoute(async ({ locals, params, request }) => {
	const { team, user } = await requireTeamRole(locals, params.slug, 'report.comment');
	const { body } = await readJson(request, commentSchema);
	if (!(await findReport(db, team.id, params.id))) error(404, { message: 'No such report in this team.', code: 'not_found' });
	return json({ id: await addReportComment(db, team.id, params.id, user.id, body) }, { status: 201 });
});
