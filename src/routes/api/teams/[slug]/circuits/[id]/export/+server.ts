import { error } from '@sveltejs/kit';
import { apiRoute } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { findCircuit, findVersion } from '$lib/server/repositories/circuits';
import { exportText } from '$lib/server/heavy';
import { serializeCircuitDocument } from '$lib/quantum/schema';
import type { RequestHandler } from './$types';

// GET …/export?format=qasm3|qasm2|json[&version=N]: the saved circuit as a file.
export const GET: RequestHandler = apiRoute(async ({ locals, params, url }) => {
	const access = await requireTeamRole(locals, params.slug, 'circuit.view');
	const circuit = await findCircuit(db, access.team.id, params.id);
	if (!circuit) error(404, { message: 'No such circuit in this team.', code: 'not_found' });
	// Validated before it reaches SQL: `version=1 OR 1=1` is a 400 with a sentence, not a query error.
	const rawVersion = url.searchParams.get('version');
	if (rawVersion !== null && !/^[1-9]\d{0,8}$/.test(rawVersion)) error(400, { message: 'version must be a whole number from 1 up (the version to export).', code: 'bad_request' });
	const v = rawVersion === null ? circuit.latest_version : Number(rawVersion);
	const version = await findVersion(db, circuit.id, v);
	if (!version) error(404, { message: `This circuit has no version ${v}.`, code: 'not_found' });
	const format = url.searchParams.get('format') ?? 'qasm3';
	const base = `${circuit.title.replace(/[^A-Za-z0-9_-]+/g, '-').replace(/^-|-$/g, '') || 'circuit'}-v${version.version}`;
	if (format === 'json')
		return new Response(serializeCircuitDocument(version.document), {
			headers: { 'content-type': 'application/json; charset=utf-8', 'content-disposition': `attachment; filename="${base}.json"` }
		});
	if (format !== 'qasm3' && format !== 'qasm2') error(400, { message: 'format must be qasm3, qasm2 or json', code: 'bad_request' });
	// Lowered and written in the worker pool (400 when it cannot be written or would be too large).
	const text = await exportText(version.document, format === 'qasm3' ? 3 : 2);
	return new Response(text, {
		headers: { 'content-type': 'text/plain; charset=utf-8', 'content-disposition': `attachment; filename="${base}.${format === 'qasm3' ? 'qasm3' : 'qasm'}"` }
	});
});
