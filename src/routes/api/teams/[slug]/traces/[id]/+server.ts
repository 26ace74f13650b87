import { error, json } from '@sveltejs/kit';
import { apiRoute } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { deleteTrace, findTrace, traceView } from '$lib/server/repositories/traces';
import { routes } from '$lib/routes';
import type { RequestHandler } from './$types';

const NOT_FOUND = { message: 'No such trace in this team.', code: 'not_found' };

export const GET: RequestHandler = apiRoute(async ({ locals, params }) => {
	const { team } = await requireTeamRole(locals, params.slug, 'trace.replay');
	const t = await findTrace(db, team.id, params.id);
	if (!t) error(404, NOT_FOUND);
	return json({ trace: { ...traceView(t, true), links: { replay: routes.replay(team.slug, t.id) } } });
});

export const DELETE: RequestHandler = apiRoute(async ({ locals, params }) => {
	const { team, user } = await requireTeamRole(locals, params.slug, 'trace.delete');
	if (!(await deleteTrace(db, team.id, params.id, user.id))) error(404, NOT_FOUND);
	return new Response(null, { status: 204 });
});
