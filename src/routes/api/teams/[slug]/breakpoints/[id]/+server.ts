import { error, json } from '@sveltejs/kit';
import { apiRoute, readJson } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { annotateBreakpoint, deleteBreakpoint, StaleRevisionError } from '$lib/server/repositories/breakpoints';
import { annotateSchema } from '$lib/schemas/review';
import type { BreakpointAnnotatedResponse } from '$lib/api/types';
import type { RequestHandler } from './$types';

const NOT_FOUND = { message: 'No such breakpoint in this team.', code: 'not_found' };

/** `{ note, revision }`: replace the note (markdown); 409 when someone edited it since `revision`. */
export const PATCH: RequestHandler = apiRoute(async ({ locals, params, request }) => {
	const { team, user } = await requireTeamRole(locals, params.slug, 'breakpoint.annotate');
	const { note, revision } = await readJson(request, annotateSchema);
	try {
		const next = await annotateBreakpoint(db, team.id, params.id, user.id, note, revision);
		if (!next) error(404, NOT_FOUND);
		return json({ id: params.id, revision: next } satisfies BreakpointAnnotatedResponse);
	} catch (e) {
		if (e instanceof StaleRevisionError) error(409, { message: e.message, code: 'conflict' });
		throw e;
	}
});

export const DELETE: RequestHandler = apiRoute(async ({ locals, params }) => {
	const { team, user } = await requireTeamRole(locals, params.slug, 'breakpoint.delete');
	if (!(await deleteBreakpoint(db, team.id, params.id, user.id))) error(404, NOT_FOUND);
	return new Response(null, { status: 204 });
});
