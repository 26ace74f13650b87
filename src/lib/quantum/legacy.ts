/**
 * Names the product had before it was called Orrery. Documents saved under the old format name
 * still open: {@link upgradeLegacyDocument} rewrites the name, and the next save stores the new one.
 * This module (with its test and the start scripts' legacy-names.sh) is the only place the old
 * name may appear.
 */
import { CIRCUIT_FORMAT } from './circuit.js';

/** Format name of circuit documents saved before the rename. */
export const LEGACY_CIRCUIT_FORMATS: readonly string[] = ['phasewright.circuit'];

/** Returns the same JSON value with a legacy format name replaced by the current one (no copy when nothing changes). */
export function upgradeLegacyDocument(json: unknown): unknown {
	if (json && typeof json === 'object' && !Array.isArray(json)) {
		const format = (json as { format?: unknown }).format;
		if (typeof format === 'string' && LEGACY_CIRCUIT_FORMATS.includes(format)) return { ...(json as object), format: CIRCUIT_FORMAT };
	}
	return json;
}
