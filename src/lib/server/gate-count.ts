import type { CircuitDocument } from '$lib/quantum/circuit';
import { lowerCircuit } from '$lib/quantum/lower';

/** Most gates the server lowers just to count them (a save must not start unbounded work). */
export const MAX_COUNTED_GATES = 1_000_000;
/** Most block calls expanded for that count (calls that make no gate are work too). */
export const MAX_COUNTED_CALLS = 20_000;

/**
 * Gate count after lowering, for the circuits list; 0 when the document does not lower or is past
 * the bound (the workbench says why). Requests run it in the worker pool (heavy/tasks.ts).
 */
export function countLoweredGates(doc: CircuitDocument): number {
	try {
		return lowerCircuit(doc, { limits: { maxGates: MAX_COUNTED_GATES, maxCalls: MAX_COUNTED_CALLS } }).gateCount;
	} catch {
		return 0;
	}
}
