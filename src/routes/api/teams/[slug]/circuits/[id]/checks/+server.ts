import { error, json } from '@sveltejs/kit';
import { apiRoute, readJson } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { findCircuit, findVersion } from '$lib/server/repositories/circuits';
import { enqueueCheck, readProgress } from '$lib/server/checks/enqueue';
import { listCircuitChecks } from '$lib/server/checks/store';
import { checkView } from '$lib/server/checks/view';
import { checkRequestSchema } from '$lib/schemas/checks';
import type { CheckQueuedResponse, CircuitChecksResponse } from '$lib/api/types';
import type { RequestHandler } from './$types';

const NOT_FOUND = { message: 'No such circuit in this team.', code: 'not_found' };

/** GET: the circuit's server checks, newest first (the first one with its progress). */
export const GET: RequestHandler = apiRoute(async ({ locals, params }) => {
	const access = await requireTeamRole(locals, params.slug, 'check.view');
	const circuit = await findCircuit(db, access.team.id, params.id);
	if (!circuit) error(404, NOT_FOUND);
	const rows = await listCircuitChecks(db, circuit.id, 10);
	const latest = rows[0] ? checkView(rows[0], await readProgress(db, rows[0])) : null;
	return json({ latest, checks: rows.map((r) => checkView(r, null)) } satisfies CircuitChecksResponse, { headers: { 'cache-control': 'no-store' } });
});

/** POST {version?}: queue a server check of that version (default the latest). 202 with the queued check. */
export const POST: RequestHandler = apiRoute(async ({ locals, params, request }) => {
	const access = await requireTeamRole(locals, params.slug, 'check.run');
	const circuit = await findCircuit(db, access.team.id, params.id);
	if (!circuit) error(404, NOT_FOUND);
	const body = await readJson(request, checkRequestSchema);
	const version = body.version ?? circuit.latest_version;
	const v = await findVersion(db, circuit.id, version);
	if (!v) error(404, { message: `This circuit has no version ${version}.`, code: 'not_found' });
	if (!v.document.specs?.length) error(422, { message: `Version ${version} has no specs, so there is nothing to check; add one such as "b = a + b mod 8".`, code: 'unprocessable' });
	const reported = body.ok !== undefined;
	const row = await enqueueCheck(db, { teamId: access.team.id, circuitId: circuit.id, version, userId: access.user.id, reason: reported ? 'push' : 'request' });
	if (!row) error(404, { message: `This circuit has no version ${version}.`, code: 'not_found' });
	return json(
		reported
			? ({ check: checkView(row, null), reported: { by: 'command line', ok: body.ok, verdictSet: false }, message: 'A client cannot set a verdict: the server queued its own check of this version.' } satisfies CheckQueuedResponse)
			: ({ check: checkView(row, null) } satisfies CheckQueuedResponse),
		{ status: 202 }
	);
});
