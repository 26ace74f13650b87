import { error, json } from '@sveltejs/kit';
import { z } from 'zod';
import { apiRoute, readJson } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { findCircuit, recordCheck } from '$lib/server/repositories/circuits';
import type { RequestHandler } from './$types';

const checkSchema = z.object({
	version: z.number().int().min(1),
	ok: z.boolean(),
	method: z.enum(['sweep', 'proof', 'sweep+proof']),
	cases: z.number().int().min(0),
	failed: z.number().int().min(0),
	exhaustive: z.boolean()
});

// POST …/checks: record the outcome of a check run in a browser or by the command line, so the
// circuits table shows the last status. The outcome is the caller's word; the table says so.
export const POST: RequestHandler = apiRoute(async ({ locals, params, request }) => {
	const access = await requireTeamRole(locals, params.slug, 'trace.create');
	const circuit = await findCircuit(db, access.team.id, params.id);
	if (!circuit) error(404, { message: 'No such circuit in this team.', code: 'not_found' });
	const body = await readJson(request, checkSchema);
	if (body.version > circuit.latest_version) error(400, { message: `version ${body.version} does not exist yet`, code: 'bad_request' });
	const what = body.method === 'sweep+proof' ? 'proof and sweep' : 'sweep';
	const summary = body.ok
		? `v${body.version}: ${what} passed, ${body.cases} input${body.cases === 1 ? '' : 's'}${body.exhaustive ? ' (all)' : ''}; by ${access.user.name}`
		: `v${body.version}: ${body.failed} of ${body.cases} inputs fail (${what}); by ${access.user.name}`;
	await recordCheck(db, circuit.id, body.ok ? 'pass' : 'fail', summary);
	return json({ status: body.ok ? 'pass' : 'fail', summary }, { status: 201 });
});
