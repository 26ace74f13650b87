/**
 * Resource counts of a lowered circuit: qubits, gates by kind, rotations by angle, depth and
 * multi-qubit gate counts. Angles in turns: a rotation of ±1/2^k turn is R_k (= 2π/2^k rad).
 */
import { formatTurns, reduceSigned } from '../angle.js';
import { GATE_KINDS, type LoweredCircuit } from '../circuit.js';

/** Counts for one circuit. */
export interface ResourceCounts {
	qubits: number;
	gates: number;
	byKind: Record<string, number>;
	/** `R_k` (±1/2^k turn, i.e. ±2π/2^k) → count; other exact angles by their signed turns; inexact under `inexact`. */
	rotations: Record<string, number>;
	depth: number;
	twoQubitGates: number;
	/** Gates on three or more qubits (ccx, mcp with ≥ 2 controls, …). */
	multiQubitGates: number;
}

/** Count resources (depth: greedy layering, every gate one layer on all its qubits). */
export function countResources(c: LoweredCircuit): ResourceCounts {
	const byKind: Record<string, number> = {};
	const rotations: Record<string, number> = {};
	const level = new Int32Array(c.qubitCount);
	let depth = 0;
	let two = 0;
	let multi = 0;
	for (let g = 0; g < c.gateCount; g++) {
		const kind = GATE_KINDS[c.kinds[g]];
		byKind[kind] = (byKind[kind] ?? 0) + 1;
		if (kind === 'reset') continue; // a checked claim, not a gate: no layer, no qubits used
		const s = c.qubitStart[g];
		const e = c.qubitStart[g + 1];
		let d = 0;
		for (let i = s; i < e; i++) d = Math.max(d, level[c.qubitList[i]]);
		d++;
		for (let i = s; i < e; i++) level[c.qubitList[i]] = d;
		if (d > depth) depth = d;
		if (e - s === 2) two++;
		else if (e - s > 2) multi++;
		const ai = c.angleIndex[g];
		if (ai >= 0) {
			const a = c.angles[ai];
			let key: string;
			if (!a.exact) key = 'inexact';
			else {
				const sg = reduceSigned(a);
				key = sg.exact && (sg.num === 1n || sg.num === -1n) ? `R_${sg.exp}` : formatTurns(sg);
			}
			rotations[key] = (rotations[key] ?? 0) + 1;
		}
	}
	return { qubits: c.qubitCount, gates: c.gateCount, byKind, rotations, depth, twoQubitGates: two, multiQubitGates: multi };
}
