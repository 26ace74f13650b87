import { error, json } from '@sveltejs/kit';
import { apiRoute, readJson } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { saveTrace } from '$lib/server/debugging';
import { listTraces, traceView } from '$lib/server/repositories/traces';
import { createTraceSchema, traceQuerySchema } from '$lib/schemas/debugging';
import { routes } from '$lib/routes';
import type { RequestHandler } from './$types';

/** GET ?circuit=&author=&diverged=yes|no&from=YYYY-MM-DD&to=YYYY-MM-DD&sort=&page=&perPage= */
export const GET: RequestHandler = apiRoute(async ({ locals, params, url }) => {
	const { team } = await requireTeamRole(locals, params.slug, 'trace.replay');
	const q = traceQuerySchema.safeParse(Object.fromEntries(url.searchParams));
	if (!q.success) error(400, { message: q.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; '), code: 'bad_request' });
	const { rows, total } = await listTraces(db, team.id, q.data);
	return json({
		traces: rows.map((r) => ({ ...traceView(r, false), links: { replay: routes.replay(team.slug, r.id) } })),
		page: q.data.page,
		perPage: q.data.perPage,
		total,
		pages: Math.max(1, Math.ceil(total / q.data.perPage))
	});
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
		},
		{ status: 201 }
	);
});
