import { error, json } from '@sveltejs/kit';
import { apiRoute, readJson } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { findCircuit, findVersion } from '$lib/server/repositories/circuits';
import { insertBreakpoint, listBreakpoints } from '$lib/server/repositories/breakpoints';
import { createBreakpointSchema } from '$lib/schemas/review';
import type { BreakpointCreatedResponse, BreakpointListResponse } from '$lib/api/types';
import type { RequestHandler } from './$types';

async function versionOf(teamId: string, circuitId: string, version: number) {
	const circuit = await findCircuit(db, teamId, circuitId);
	const v = circuit ? await findVersion(db, circuit.id, version) : undefined;
	if (!circuit || !v) error(404, { message: 'No such circuit version in this team.', code: 'not_found' });
	return v;
}

/** GET ?circuit={id}&version={n}: the breakpoints saved on that version, with notes and comments. */
export const GET: RequestHandler = apiRoute(async ({ locals, params, url }) => {
	const { team } = await requireTeamRole(locals, params.slug, 'trace.replay');
	const circuitId = url.searchParams.get('circuit') ?? '';
	const version = Number(url.searchParams.get('version'));
	if (!/^[a-z2-7]{24}$/.test(circuitId) || !Number.isInteger(version) || version < 1 || version > 999_999_999) error(400, { message: 'Give ?circuit={id}&version={n}.', code: 'bad_request' });
	const v = await versionOf(team.id, circuitId, version);
	return json({ breakpoints: await listBreakpoints(db, team.id, v.id) } satisfies BreakpointListResponse);
});

export const POST: RequestHandler = apiRoute(async ({ locals, params, request }) => {
	const { team, user } = await requireTeamRole(locals, params.slug, 'breakpoint.create');
	const body = await readJson(request, createBreakpointSchema);
	const v = await versionOf(team.id, body.circuitId, body.version);
	const id = await insertBreakpoint(db, { teamId: team.id, circuitId: body.circuitId, versionId: v.id, authorId: user.id, spec: body.breakpoint });
	const saved = (await listBreakpoints(db, team.id, v.id)).find((b) => b.id === id)!;
	return json({ breakpoint: saved } satisfies BreakpointCreatedResponse, { status: 201 });
});
