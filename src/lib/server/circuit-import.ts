import { parseCircuitDocument } from '$lib/quantum/schema';
import { importQasm } from '$lib/quantum/qasm/import';
import type { CircuitDocument } from '$lib/quantum/circuit';

/** Most bytes an imported circuit may take once stored (as its JSON text). */
export const MAX_STORED_DOCUMENT = 4 * 1024 * 1024;

export type ImportResult = { ok: true; document: CircuitDocument; warnings: string[] } | { ok: false; errors: string[] };

/**
 * Read an uploaded circuit (OpenQASM 2.0 / 3.0 or an Orrery JSON document). Requests call it in the
 * worker pool (heavy/index.ts importUpload). Tell the formats apart by content first (a JSON document starts with "{"), then by name. */
export function importCircuitText(name: string, text: string): ImportResult {
	const trimmed = text.trimStart();
	if (trimmed.startsWith('{') || /\.json$/i.test(name)) return importJson(name, text);
	try {
		const r = importQasm(text, { file: name });
		const stored = JSON.stringify(r.document).length;
		if (stored > MAX_STORED_DOCUMENT)
			return { ok: false, errors: [`${name}: the circuit would take ${(stored / 2 ** 20).toFixed(1)} MiB stored; the limit is ${MAX_STORED_DOCUMENT / 2 ** 20} MiB. Split it, or use gate definitions and broadcasts.`] };
		// Notes say how printed decimals and decomposed gates were read, so the user can see it. The
		// document is spread into plain data (the importer's makes its body when first read).
		return { ok: true, document: { ...r.document }, warnings: [...r.warnings.map((w) => `${name}:${w.line}:${w.column}: ${w.message}`), ...r.notes.map((n) => `${name}: ${n}`)] };
	} catch (e) {
		// QasmError messages already read "file:line:column: what is wrong, what was expected".
		return { ok: false, errors: [(e as Error).message] };
	}
}

function importJson(name: string, text: string): ImportResult {
	let json: unknown;
	try {
		json = JSON.parse(text);
	} catch (e) {
		return { ok: false, errors: [`${name}: not valid JSON (${(e as Error).message})`] };
	}
	const parsed = parseCircuitDocument(json);
	if (!parsed.ok) return { ok: false, errors: parsed.issues.slice(0, 20).map((i) => `${name}: ${i.path}: ${i.message}`) };
	return { ok: true, document: parsed.document, warnings: [] };
}
