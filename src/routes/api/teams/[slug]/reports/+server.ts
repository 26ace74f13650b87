import { json } from '@sveltejs/kit';
import { apiRoute } from '$lib/server/api';
import { requireTeamRole } from '$lib/server/guard';
import { openReport, readReportRequest } from '$lib/server/review';
import { reportListPage } from '$lib/server/lists';
import { routes } from '$lib/routes';
import type { ReportCreatedResponse } from '$lib/api/types';
import type { RequestHandler } from './$types';

/** GET ?status=&severity=&assignee=&circuit=&sort=&page=&perPage= (the reports page loads the same). */
export const GET: RequestHandler = apiRoute(async ({ locals, params, url }) => {
	const { team } = await requireTeamRole(locals, params.slug, 'report.view');
	return json(await reportListPage(team, url));
});

/** JSON (optionally `snapshotBase64`), or multipart with `report` (JSON text) and a `snapshot` PNG file. */
export const POST: RequestHandler = apiRoute(async ({ locals, params, request }) => {
	const access = await requireTeamRole(locals, params.slug, 'report.create');
	const { input, snapshot } = await readReportRequest(request);
	const { id, mailed } = await openReport(access, input, snapshot);
	return json({ id, mailed, links: { page: routes.report(access.team.slug, id), replay: routes.replay(access.team.slug, input.traceId, input.step, id) } } satisfies ReportCreatedResponse, { status: 201 });
});
