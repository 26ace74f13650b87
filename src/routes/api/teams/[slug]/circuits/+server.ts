import { error, json } from '@sveltejs/kit';
import { z } from 'zod';
import { apiRoute } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { listCircuitsPage } from '$lib/server/repositories/circuits';
import { circuitCheckView } from '$lib/server/checks/view';
import { routes } from '$lib/routes';
import type { RequestHandler } from './$types';

const emptyToUndefined = (v: unknown) => (v === '' ? undefined : v);
const querySchema = z.object({
	page: z.preprocess(emptyToUndefined, z.coerce.number().int().min(1).max(100_000).default(1)),
	perPage: z.preprocess(emptyToUndefined, z.coerce.number().int().min(1).max(100).default(20))
});

/** GET ?page=&perPage=: the team's circuits, newest change first, each with its latest server check. */
export const GET: RequestHandler = apiRoute(async ({ locals, params, url }) => {
	const { team } = await requireTeamRole(locals, params.slug, 'circuit.view');
	const q = querySchema.safeParse(Object.fromEntries(url.searchParams));
	if (!q.success) error(400, { message: q.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; '), code: 'bad_request' });
	const { rows, total } = await listCircuitsPage(db, team.id, q.data.page, q.data.perPage);
	return json({
		circuits: rows.map((r) => ({
			id: r.id,
			title: r.title,
			latestVersion: r.latest_version,
			registers: r.register_summary,
			gateCount: r.gate_count,
			updatedAt: r.updated_at.toISOString(),
			check: circuitCheckView(r.check),
			links: { workbench: routes.circuit(team.slug, r.id) }
		})),
		page: q.data.page,
		perPage: q.data.perPage,
		total,
		pages: Math.max(1, Math.ceil(total / q.data.perPage))
	});
});
