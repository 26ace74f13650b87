import { error, json } from '@sveltejs/kit';
import { apiRoute } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { openReport, readReportRequest } from '$lib/server/debugging';
import { listReports } from '$lib/server/repositories/reports';
import { reportQuerySchema } from '$lib/schemas/debugging';
import { routes } from '$lib/routes';
import type { RequestHandler } from './$types';

/** GET ?status=&severity=&assignee=&circuit=&sort=&page=&perPage= */
export const GET: RequestHandler = apiRoute(async ({ locals, params, url }) => {
	const { team } = await requireTeamRole(locals, params.slug, 'report.view');
	const q = reportQuerySchema.safeParse(Object.fromEntries(url.searchParams));
	if (!q.success) error(400, { message: q.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; '), code: 'bad_request' });
	const { rows, total } = await listReports(db, team.id, q.data);
	return json({
		reports: rows.map(({ description: _d, descriptionHtml: _h, ...r }) => ({ ...r, links: { page: routes.report(team.slug, r.id) } })),
		page: q.data.page,
		perPage: q.data.perPage,
		total,
		pages: Math.max(1, Math.ceil(total / q.data.perPage))
	});
});

/** JSON (optionally `snapshotBase64`), or multipart with `report` (JSON text) and a `snapshot` PNG file. */
export const POST: RequestHandler = apiRoute(async ({ locals, params, request }) => {
	const access = await requireTeamRole(locals, params.slug, 'report.create');
	const { input, snapshot } = await readReportRequest(request);
	const { id, mailed } = await openReport(access, input, snapshot);
	return json({ id, mailed, links: { page: routes.report(access.team.slug, id), replay: routes.replay(access.team.slug, input.traceId, input.step, id) } }, { status: 201 });
});
