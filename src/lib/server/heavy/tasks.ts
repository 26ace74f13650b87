// The heavy work a request can start, as plain functions of plain data (no database, no request):
// reading an uploaded file, validating a posted document and counting its gates, running a trace,
// drawing a report's board, exporting OpenQASM. They run in the worker-thread pool (pool.ts,
// worker.ts), never on the web process's event loop. Each is bounded by work budgets of its own
// (lowering limits, WorkBudget in the importer); the pool adds a time and a memory limit around
// them, so a case the budgets miss kills one worker, not the server.
//
// A refusal the user should read is thrown as SvelteKit's error(status, …) (trace-compute already
// does): the worker sends it back as data and the web process throws it again as the same error.
import { error } from '@sveltejs/kit';
import { parseCircuitDocument } from '$lib/quantum/schema';
import type { CircuitDocument } from '$lib/quantum/circuit';
import { lowerCircuit, LoweringError } from '$lib/quantum/lower';
import { exportQasm, QasmExportError } from '$lib/quantum/qasm/export';
import { importCircuitText, type ImportResult } from '../circuit-import';
import { countLoweredGates, MAX_COUNTED_GATES } from '../gate-count';
import { computeTraceSummary, drawBoardAt, type BoardPicture, type ServerInputs } from '../trace-compute';
import type { TraceSummaryInput } from '$lib/schemas/review';

/** Lowered gates and block calls at most expanded for one export, and the most text one answer carries. */
export const MAX_EXPORT_GATES = 500_000;
export const MAX_EXPORT_CALLS = 20_000;
export const MAX_EXPORT_BYTES = 16 * 1024 * 1024;

export type ReadDocumentResult = { ok: true; document: CircuitDocument; gateCount: number } | { ok: false; message: string };

/**
 * A posted document (JSON text from a form, or an already parsed JSON value from an API body):
 * parsed, validated with every issue's JSON path, and its gates counted for the circuits list.
 */
function readDocument(a: { json?: unknown; text?: string; maxBytes?: number }): ReadDocumentResult {
	let json = a.json;
	if (a.text !== undefined) {
		if (a.maxBytes !== undefined && a.text.length > a.maxBytes) return { ok: false, message: `The circuit is larger than ${a.maxBytes} bytes.` };
		try {
			json = JSON.parse(a.text);
		} catch (e) {
			return { ok: false, message: `The circuit was not valid JSON (${(e as Error).message}).` };
		}
	}
	const parsed = parseCircuitDocument(json);
	if (!parsed.ok) return { ok: false, message: parsed.issues.slice(0, 5).map((i) => `${i.path}: ${i.message}`).join('; ') };
	const size = sizeUp(parsed.document);
	return 'refusal' in size ? { ok: false, message: size.refusal } : { ok: true, document: parsed.document, gateCount: size.gateCount };
}

/**
 * Gate count for the circuits list, and a refusal for a document the workbench could never open:
 * one whose block calls expand past the lowering's call limit (a few nested blocks calling each
 * other thirty times make hundreds of millions of calls and no gate: issue 10). Past the counting
 * bound on gates the document is kept with a count of 0, as before (the workbench says why).
 */
function sizeUp(doc: CircuitDocument): { gateCount: number } | { refusal: string } {
	try {
		return { gateCount: lowerCircuit(doc, { limits: { maxGates: MAX_COUNTED_GATES } }).gateCount };
	} catch (e) {
		if (e instanceof LoweringError && /block calls/.test(e.message))
			return { refusal: `${e.message}. The workbench could not open it: call the block fewer times or nest fewer levels.` };
		return { gateCount: 0 };
	}
}

/** An uploaded file (OpenQASM 2/3 or an Orrery JSON document), with its gate count when it reads. */
function importFile(a: { name: string; text: string }): ImportResult & { gateCount?: number } {
	const r = importCircuitText(a.name, a.text);
	if (!r.ok) return r;
	const size = sizeUp(r.document);
	return 'refusal' in size ? { ok: false, errors: [`${a.name}: ${size.refusal}`] } : { ...r, gateCount: size.gateCount };
}

/** A saved version as OpenQASM text (400 with a sentence when it cannot be, or would be too large). */
function exportText(a: { doc: CircuitDocument; version: 2 | 3 }): string {
	let text: string;
	try {
		const lowered = lowerCircuit(a.doc, { limits: { maxGates: MAX_EXPORT_GATES, maxCalls: MAX_EXPORT_CALLS } });
		text = exportQasm(lowered, { version: a.version });
	} catch (e) {
		if (e instanceof LoweringError || e instanceof QasmExportError || e instanceof RangeError) error(400, { message: e.message, code: 'bad_request' });
		throw e;
	}
	if (text.length > MAX_EXPORT_BYTES)
		error(400, {
			message: `The export would be ${(text.length / 2 ** 20).toFixed(1)} MiB; one request returns at most ${MAX_EXPORT_BYTES / 2 ** 20} MiB. Convert it with the command line (npm run orrery -- convert).`,
			code: 'bad_request'
		});
	return text;
}

export const tasks = {
	readDocument,
	importFile,
	countGates: (a: { doc: CircuitDocument }): number => countLoweredGates(a.doc),
	traceSummary: (a: { doc: CircuitDocument; inputs: ServerInputs }): TraceSummaryInput => computeTraceSummary(a.doc, a.inputs),
	boardAt: (a: { doc: CircuitDocument; inputs: ServerInputs; step: number; caption: string[] }): BoardPicture => drawBoardAt(a.doc, a.inputs, a.step, a.caption),
	exportText,
	/** For tests of the pool itself: spin for `ms` (a task that never yields), or grow memory until the limit. */
	spin: (a: { ms: number }): number => {
		const end = Date.now() + a.ms;
		let n = 0;
		while (Date.now() < end) n++;
		return n;
	},
	hog: (): number => {
		const keep: number[][] = [];
		for (;;) keep.push(new Array(1_000_000).fill(keep.length));
	}
};

export type Tasks = typeof tasks;
export type TaskName = keyof Tasks;
