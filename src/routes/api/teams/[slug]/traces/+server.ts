import { json } from '@sveltejs/kit';
import { apiRoute, readJson } from '$lib/server/api';
import { requireTeamRole } from '$lib/server/guard';
import { saveTrace } from '$lib/server/review';
import { traceListPage } from '$lib/server/lists';
import { createTraceSchema } from '$lib/schemas/review';
import { routes } from '$lib/routes';
import type { TraceCreatedResponse } from '$lib/api/types';
import type { RequestHandler } from './$types';

/** GET ?circuit=&author=&diverged=yes|no&from=YYYY-MM-DD&to=YYYY-MM-DD&sort=&page=&perPage= (the traces page loads the same). */
export const GET: RequestHandler = apiRoute(async ({ locals, params, url }) => {
	const { team } = await requireTeamRole(locals, params.slug, 'trace.replay');
	return json(await traceListPage(team, url));
});

export const POST: RequestHandler = apiRoute(async ({ locals, params, request }) => {
	const access = await requireTeamRole(locals, params.slug, 'trace.create');
	const body = await readJson(request, createTraceSchema);
	const saved = await saveTrace(access, body);
	return json(
		{
			id: saved.id,
			computedBy: saved.computedBy,
			circuit: { id: saved.circuitId, version: saved.version, addedVersion: saved.addedVersion },
			firstDivergence: saved.firstDivergence,
			lastStep: saved.lastStep,
			links: { replay: routes.replay(access.team.slug, saved.id), api: routes.api.trace(access.team.slug, saved.id), circuit: routes.circuit(access.team.slug, saved.circuitId) }
		} satisfies TraceCreatedResponse,
		{ status: 201 }
	);
});
