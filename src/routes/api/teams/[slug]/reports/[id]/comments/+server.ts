import { error, json } from '@sveltejs/kit';
import { apiRoute, readJson } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { addReportComment, findReport } from '$lib/server/repositories/reports';
import { commentSchema } from '$lib/schemas/review';
import { notifyReportEvent } from '$lib/server/report-mail';
import type { RequestHandler } from './$types';

export const POST: RequestHandler = apiRoute(async ({ locals, params, request }) => {
	const { team, user } = await requireTeamRole(locals, params.slug, 'report.comment');
	const { body } = await readJson(request, commentSchema);
	const report = await findReport(db, team.id, params.id);
	if (!report) error(404, { message: 'No such report in this team.', code: 'not_found' });
	const id = await addReportComment(db, team.id, params.id, user.id, body);
	const mailed = await notifyReportEvent(db, { teamId: team.id, team, actor: user, report }, { kind: 'comment', body });
	return json({ id, mailed }, { status: 201 });
});
