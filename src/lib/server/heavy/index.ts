// What requests call for heavy work: each runs in the worker-thread pool (pool.ts), never on the
// web process. Limits past which a request is refused: see pool.ts and DEVELOPERS.md ("Heavy work
// off the web process").
import { isHttpError } from '@sveltejs/kit';
import type { CircuitDocument } from '$lib/quantum/circuit';
import { MAX_CIRCUIT_UPLOAD } from '$lib/schemas/circuits';
import type { ServerInputs } from '../trace-compute';
import { runHeavy } from './pool';

export { runHeavy, heavyLimits } from './pool';

export type UploadResult = { ok: true; document: CircuitDocument; warnings: string[]; gateCount: number } | { ok: false; status: number; errors: string[] };

/** Read an uploaded circuit (OpenQASM 2.0 / 3.0 or an Orrery JSON document) in the pool; refusals as messages for the form. */
export async function importUpload(file: File): Promise<UploadResult> {
	if (file.size > MAX_CIRCUIT_UPLOAD) return { ok: false, status: 413, errors: [`${file.name} is ${file.size} bytes; the limit is ${MAX_CIRCUIT_UPLOAD} bytes.`] };
	const text = await file.text();
	try {
		const r = await runHeavy('importFile', { name: file.name, text }, `Reading ${file.name}`);
		return r.ok ? { ok: true, document: r.document, warnings: r.warnings, gateCount: r.gateCount ?? 0 } : { ok: false, status: 400, errors: r.errors };
	} catch (e) {
		if (isHttpError(e)) return { ok: false, status: e.status, errors: [e.body.message] };
		throw e;
	}
}

export type PostedDocument = { ok: true; document: CircuitDocument; gateCount: number } | { ok: false; status: number; message: string };

/**
 * A document posted by a save (JSON text) or in an API body (parsed JSON): validated in the pool,
 * with every issue's JSON path, refused when the workbench could not open it, and its gates counted.
 */
export async function readPostedDocument(posted: { text: string; maxBytes: number } | { json: unknown }, what = 'Checking the circuit'): Promise<PostedDocument> {
	if ('text' in posted && posted.text.length > posted.maxBytes) return { ok: false, status: 413, message: `The circuit is larger than ${posted.maxBytes} bytes.` };
	try {
		const r = await runHeavy('readDocument', posted, what);
		return r.ok ? r : { ok: false, status: 400, message: r.message };
	} catch (e) {
		if (isHttpError(e)) return { ok: false, status: e.status, message: e.body.message };
		throw e;
	}
}

/** Gate count of a document already validated (a template, a duplicate), for the circuits list. */
export function countGates(doc: CircuitDocument): Promise<number> {
	return runHeavy('countGates', { doc }, "Counting the circuit's gates");
}

/** The summary a browser would send with a trace, computed on the server (422 past its bounds). */
export function traceSummary(doc: CircuitDocument, inputs: ServerInputs) {
	return runHeavy('traceSummary', { doc, inputs }, "Running the trace's circuit");
}

/** A report's dial board drawn on the server. */
export function boardAt(doc: CircuitDocument, inputs: ServerInputs, step: number, caption: string[]) {
	return runHeavy('boardAt', { doc, inputs, step, caption }, "Drawing the report's dial board");
}

/** A saved version as OpenQASM 2 or 3 text (400 when it cannot be written). */
export function exportText(doc: CircuitDocument, version: 2 | 3) {
	return runHeavy('exportText', { doc, version }, `Writing OpenQASM ${version}`);
}
