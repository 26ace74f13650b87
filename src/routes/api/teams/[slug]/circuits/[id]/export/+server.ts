import { error } from '@sveltejs/kit';
import { apiRoute } from '$lib/server/api';
import { db } from '$lib/server/db';
import { requireTeamRole } from '$lib/server/guard';
import { findCircuit, findVersion } from '$lib/server/repositories/circuits';
import { exportQasm, QasmExportError } from '$lib/quantum/qasm/export';
import { lowerCircuit, LoweringError } from '$lib/quantum/lower';
import { serializeCircuitDocument } from '$lib/quantum/schema';
import type { RequestHandler } from './$types';

/** Lowered gates and block calls at most expanded for one export, and the most text one answer carries. */
const MAX_EXPORT_GATES = 500_000;
const MAX_EXPORT_CALLS = 20_000;
const MAX_EXPORT_BYTES = 16 * 1024 * 1024;

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
	let text: string;
	try {
		const lowered = lowerCircuit(version.document, { limits: { maxGates: MAX_EXPORT_GATES, maxCalls: MAX_EXPORT_CALLS } });
		text = exportQasm(lowered, { version: format === 'qasm3' ? 3 : 2 });
		if (text.length > MAX_EXPORT_BYTES)
			error(400, { message: `The export would be ${(text.length / 2 ** 20).toFixed(1)} MiB; one request returns at most ${MAX_EXPORT_BYTES / 2 ** 20} MiB. Convert it with the command line (npm run orrery -- convert).`, code: 'bad_request' });
	} catch (e) {
		if (e instanceof LoweringError || e instanceof QasmExportError || e instanceof RangeError) error(400, { message: e.message, code: 'bad_request' });
		throw e;
	}
	return new Response(text, {
		headers: { 'content-type': 'text/plain; charset=utf-8', 'content-disposition': `attachment; filename="${base}.${format === 'qasm3' ? 'qasm3' : 'qasm'}"` }
	});
});
