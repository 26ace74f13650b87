/**
 * Unitary of a small lowered circuit and comparison of unitaries up to global phase, for checking
 * decompositions (a ccp lowering, an imported gate, an OpenQASM 2 export) against each other.
 *
 * Qubit order: flat qubit q is bit q of the basis index (little-endian). The matrix is returned
 * column by column: column j is the circuit applied to |j⟩, entries interleaved (re, im).
 */
import { buildGateTables, applyLoweredGates, createState, setBasisState } from '../amplitudes.js';
import { GateCode, type LoweredCircuit } from '../circuit.js';

/** Largest circuit whose unitary we build (2^10 columns of 2^10 amplitudes). */
export const MAX_UNITARY_QUBITS = 10;

/** A dense unitary: `columns[j]` = U|j⟩ as interleaved (re, im) pairs. */
export interface DenseUnitary {
	qubitCount: number;
	columns: Float64Array[];
}

/** Unitary of a lowered circuit (≤ 10 qubits), from the amplitude engine run on every basis state. */
export function circuitUnitary(c: LoweredCircuit): DenseUnitary {
	if (c.qubitCount > MAX_UNITARY_QUBITS) throw new RangeError(`unitary of ${c.qubitCount} qubits is too large (limit ${MAX_UNITARY_QUBITS})`);
	// A reset is a claim about the state (the qubit is |0⟩ there), not a gate: a circuit holding one has
	// no unitary to compare, and treating it as the identity would hide a failed claim.
	for (let g = 0; g < c.gateCount; g++)
		if (c.kinds[g] === GateCode.reset) {
			const line = c.itemSources[c.itemOf[g]]?.line;
			throw new RangeError(`step ${g + 1}${line ? ` (line ${line})` : ''} is a reset, a claim that the qubit is |0⟩ there, not a gate: a circuit with resets has no unitary to compare; check it against its spec instead`);
		}
	const t = buildGateTables(c);
	const dim = 1 << c.qubitCount;
	const columns: Float64Array[] = [];
	const s = createState(c.qubitCount);
	for (let j = 0; j < dim; j++) {
		setBasisState(s, j);
		applyLoweredGates(s, c, t, 0, c.gateCount);
		columns.push(s.data.slice());
	}
	return { qubitCount: c.qubitCount, columns };
}

/**
 * max |A_ij − e^{iφ} B_ij| for the global phase φ that best aligns B with A (0 means equal up to
 * global phase). A and B must have the same size.
 */
export function unitaryDistance(a: DenseUnitary, b: DenseUnitary): number {
	if (a.qubitCount !== b.qubitCount) return Infinity;
	let re = 0;
	let im = 0;
	for (let j = 0; j < a.columns.length; j++) {
		const x = a.columns[j];
		const y = b.columns[j];
		for (let i = 0; i < x.length; i += 2) {
			re += x[i] * y[i] + x[i + 1] * y[i + 1];
			im += x[i + 1] * y[i] - x[i] * y[i + 1];
		}
	}
	const r = Math.hypot(re, im);
	const c = r > 1e-300 ? re / r : 1;
	const s = r > 1e-300 ? im / r : 0;
	let worst = 0;
	for (let j = 0; j < a.columns.length; j++) {
		const x = a.columns[j];
		const y = b.columns[j];
		for (let i = 0; i < x.length; i += 2) {
			const yr = c * y[i] - s * y[i + 1];
			const yi = s * y[i] + c * y[i + 1];
			worst = Math.max(worst, Math.hypot(x[i] - yr, x[i + 1] - yi));
		}
	}
	return worst;
}

/**
 * The block of U acting on the qubits other than `ancillas`, for inputs with every ancilla in
 * |0⟩, and how much amplitude leaks to outputs with an ancilla not back in |0⟩ (0 when the
 * ancillas are returned clean). Qubit order: the kept qubits, in their flat order, form the index
 * of the result (little-endian).
 */
export function restrictToCleanAncillas(u: DenseUnitary, ancillas: number[]): { unitary: DenseUnitary; leak: number } {
	const keep: number[] = [];
	for (let q = 0; q < u.qubitCount; q++) if (!ancillas.includes(q)) keep.push(q);
	let amask = 0;
	for (const q of ancillas) amask |= 1 << q;
	const spread = (k: number) => {
		let full = 0;
		for (let i = 0; i < keep.length; i++) if (k & (1 << i)) full |= 1 << keep[i];
		return full;
	};
	const dim = 1 << keep.length;
	const columns: Float64Array[] = [];
	let leak = 0;
	for (let j = 0; j < dim; j++) {
		const col = u.columns[spread(j)];
		const out = new Float64Array(2 * dim);
		for (let i = 0; i < dim; i++) {
			const r = spread(i);
			out[2 * i] = col[2 * r];
			out[2 * i + 1] = col[2 * r + 1];
		}
		for (let r = 0; r < col.length / 2; r++) if (r & amask) leak = Math.max(leak, Math.hypot(col[2 * r], col[2 * r + 1]));
		columns.push(out);
	}
	return { unitary: { qubitCount: keep.length, columns }, leak };
}
