import { error } from '@sveltejs/kit';
import { apiRoute } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { findReportBoardSvg } from '$lib/server/repositories/reports';
import type { RequestHandler } from './$types';

// GET …/reports/{id}/board: the dial board at the report's step, drawn on the server when the
// report was opened (SVG). The text in it is escaped when drawn; served with a CSP that allows no
// script or fetch and as its own type, so opening it directly is as inert as the <img>.
export const GET: RequestHandler = apiRoute(async ({ locals, params }) => {
	const { team } = await requireTeamRole(locals, params.slug, 'report.view');
	const svg = await findReportBoardSvg(db, team.id, params.id);
	if (svg === null) error(404, { message: 'This report has no server-drawn board.', code: 'not_found' });
	return new Response(svg, {
		headers: {
			'content-type': 'image/svg+xml; charset=utf-8',
			'x-content-type-options': 'nosniff',
			'content-security-policy': "default-src 'none'; style-src 'unsafe-inline'; sandbox",
			'cache-control': 'private, max-age=3600'
		}
	});
});
