import { error, json } from '@sveltejs/kit';
import { apiRoute, readJson } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { rethrowReportConflict } from '$lib/server/review';
import { deleteReport, findReport, listReportComments, reportHistory, updateReport } from '$lib/server/repositories/reports';
import { updateReportSchema } from '$lib/schemas/review';
import { eventsOfChange, notifyReportEvent } from '$lib/server/report-mail';
import { can } from '$lib/permissions';
import { routes } from '$lib/routes';
import type { RequestHandler } from './$types';

const NOT_FOUND = { message: 'No such report in this team.', code: 'not_found' };

export const GET: RequestHandler = apiRoute(async ({ locals, params }) => {
	const { team } = await requireTeamRole(locals, params.slug, 'report.view');
	const r = await findReport(db, team.id, params.id);
	if (!r) error(404, NOT_FOUND);
	const strip = (p: typeof r.assignee) => (p ? { id: p.id, name: p.name } : null);
	return json({
		report: {
			...r,
			assignee: strip(r.assignee),
			reviewer: strip(r.reviewer),
			comments: await listReportComments(db, r.id),
			history: await reportHistory(db, team.id, r.id),
			links: { page: routes.report(team.slug, r.id), replay: routes.replay(team.slug, r.trace.id, r.step, r.id), snapshot: r.snapshot ? routes.api.attachment(team.slug, r.snapshot.id) : null, board: r.board ? routes.api.reportBoard(team.slug, r.id) : null }
		}
	});
});

/**
 * `{ revision, status?, assigneeId?, reviewerId?, severity? }`. A status change needs
 * report.status (reviewers too); the other fields need report.edit.
 */
export const PATCH: RequestHandler = apiRoute(async ({ locals, params, request }) => {
	const body = await readJson(request, updateReportSchema);
	const editsFields = body.assigneeId !== undefined || body.reviewerId !== undefined || body.severity !== undefined;
	const access = await requireTeamRole(locals, params.slug, body.status && !editsFields ? 'report.status' : 'report.edit');
	if (body.status && !can(access.role, 'report.status')) error(403, { message: 'Your role in this team does not allow this.', code: 'forbidden' });
	const before = await findReport(db, access.team.id, params.id);
	if (!before) error(404, NOT_FOUND);
	try {
		const r = await updateReport(db, access.team.id, params.id, access.user.id, body);
		const now = (await findReport(db, access.team.id, params.id))!;
		let mailed = 0;
		for (const event of eventsOfChange(before, now)) mailed += await notifyReportEvent(db, { teamId: access.team.id, team: access.team, actor: access.user, report: now }, event);
		return json({ id: params.id, status: now.status, revision: r.revision, changed: r.changed, mailed });
	} catch (e) {
		rethrowReportConflict(e);
	}
});

export const DELETE: RequestHandler = apiRoute(async ({ locals, params }) => {
	const { team, user } = await requireTeamRole(locals, params.slug, 'report.delete');
	if (!(await deleteReport(db, team.id, params.id, user.id))) error(404, NOT_FOUND);
	return new Response(null, { status: 204 });
});
