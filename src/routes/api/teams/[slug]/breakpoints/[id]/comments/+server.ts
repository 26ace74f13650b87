import { error, json } from '@sveltejs/kit';
import { apiRoute, readJson } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { addBreakpointComment, findBreakpoint } from '$lib/server/repositories/breakpoints';
import { commentSchema } from '$lib/schemas/review';
import type { CommentCreatedResponse } from '$lib/api/types';
import type { RequestHandler } from './$types';

// Commenting on a breakpoint is part of annotating it (reviewers may).
export const POST: RequestHandler = apiRoute(async ({ locals, params, request }) => {
	const { team, user } = await requireTeamRole(locals, params.slug, 'breakpoint.annotate');
	const { body } = await readJson(request, commentSchema);
	if (!(await findBreakpoint(db, team.id, params.id))) error(404, { message: 'No such breakpoint in this team.', code: 'not_found' });
	return json({ id: await addBreakpointComment(db, params.id, user.id, body) } satisfies CommentCreatedResponse, { status: 201 });
});
