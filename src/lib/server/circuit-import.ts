import { parseCircuitDocument } from '$lib/quantum/schema';
import type { CircuitDocument } from '$lib/quantum/circuit';
import { MAX_CIRCUIT_UPLOAD } from '$lib/schemas/circuits';

export type ImportResult = { ok: true; document: CircuitDocument; warnings: string[] } | { ok: false; errors: string[] };

/** Read an uploaded circuit: a Phasewright JSON document (OpenQASM once its importer is wired). */
export async function importCircuitFile(file: File): Promise<ImportResult> {
	if (file.size > MAX_CIRCUIT_UPLOAD) return { ok: false, errors: [`${file.name} is ${file.size} bytes; the limit is ${MAX_CIRCUIT_UPLOAD} bytes.`] };
	const text = await file.text();
	return importCircuitText(file.name, text);
}

export function importCircuitText(name: string, text: string): ImportResult {
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
