/**
 * Frames and checksums: what each qubit holds, read from the ledger or from a state vector, its
 * comparison with what it should hold, and the canonical frame text hashed for checksums.
 *
 * Checksums: FNV-1a 32-bit (offset basis 0x811c9dc5, prime 0x01000193) over the UTF-16 code
 * units of {@link canonicalFrameText}: `<engine>|<step>|` then per qubit `c0`/`c1` (classical),
 * `f<num>/<exp>` (exact Fourier phase num/2^exp turn, reduced), `F<turns to 9 decimals>`
 * (inexact Fourier phase) or `m<x>,<y>,<z>` (Bloch vector, 9 decimals), joined by `;`.
 * Qubit order: flat (register offset + index, index 0 = LSB); angles in turns.
 */
import { allBlochVectors, registerDistribution, type StateVector } from '../amplitudes.js';
import { divergence, dyadic, floatTurns, formatRadians, formatTurns, isZeroSigned, type Angle, type SignedAngle } from '../angle.js';
import type { LoweredCircuit } from '../circuit.js';
import { LedgerKind, ledgerPhase, type LedgerState, type LedgerTables } from '../ledger.js';
import type { ExpectedState, QubitState } from './types.js';

/** FNV-1a 32-bit hash of a string's UTF-16 code units, as 8 hex digits. */
export function fnv1a(text: string): string {
	let h = 0x811c9dc5;
	for (let i = 0; i < text.length; i++) {
		h ^= text.charCodeAt(i);
		h = Math.imul(h, 0x01000193) >>> 0;
	}
	return h.toString(16).padStart(8, '0');
}

const fix9 = (x: number) => {
	const s = x.toFixed(9);
	return s === '-0.000000000' ? '0.000000000' : s;
};

/** Canonical text of a frame's qubit states (see module docs); hashed for checksums. */
export function canonicalFrameText(engine: string, step: number, states: QubitState[]): string {
	const parts: string[] = [];
	for (const s of states) {
		if (s.kind === 'classical') parts.push(`c${s.bit}`);
		else if (s.kind === 'fourier') parts.push(s.angle.exact ? `f${s.angle.num}/${s.angle.exp}` : `F${fix9(s.angle.turns)}`);
		else parts.push(`m${fix9(s.bloch[0])},${fix9(s.bloch[1])},${fix9(s.bloch[2])}`);
	}
	return `${engine}|${step}|${parts.join(';')}`;
}

/** Checksum of a frame: FNV-1a of its canonical text. */
export function checksumOf(engine: string, step: number, states: QubitState[]): string {
	return fnv1a(canonicalFrameText(engine, step, states));
}

/** A qubit's state from its Bloch vector: classical at the poles, Fourier on the equator (within `tol`), else mixed. */
export function classifyBloch(x: number, y: number, z: number, tol: number): QubitState {
	const len = Math.sqrt(x * x + y * y + z * z);
	if (z > 1 - tol) return { kind: 'classical', bit: 0 };
	if (z < -1 + tol) return { kind: 'classical', bit: 1 };
	if (len > 1 - tol && Math.abs(z) < tol) {
		const a = floatTurns(Math.atan2(y, x) / (2 * Math.PI));
		return { kind: 'fourier', angle: a, turns: formatTurns(a), radians: formatRadians(a) };
	}
	return { kind: 'mixed', bloch: [x, y, z], length: len };
}

function fourierState(a: Angle): QubitState {
	return { kind: 'fourier', angle: a, turns: formatTurns(a), radians: formatRadians(a) };
}

/** Compare actual with expected (turns). */
export function compareState(actual: QubitState, expected: ExpectedState, tol: number): { matches: boolean; divergence: SignedAngle | null } {
	if (expected.kind === 'classical') return { matches: actual.kind === 'classical' && actual.bit === expected.bit, divergence: null };
	if (actual.kind !== 'fourier') return { matches: false, divergence: null };
	const d = divergence(actual.angle, expected.angle);
	return { matches: isZeroSigned(d, tol), divergence: d };
}

/** What qubit q holds in a ledger state. */
export function ledgerQubitState(s: LedgerState, t: LedgerTables, q: number, tol: number): QubitState {
	const k = s.kind[q];
	if (k === LedgerKind.classical) return { kind: 'classical', bit: s.bit[q] ? 1 : 0 };
	if (k === LedgerKind.fourier) return fourierState(ledgerPhase(s, t, q));
	const o = 4 * q;
	const ar = s.amp[o];
	const ai = s.amp[o + 1];
	const br = s.amp[o + 2];
	const bi = s.amp[o + 3];
	const x = 2 * (ar * br + ai * bi);
	const y = -2 * (ai * br - ar * bi);
	const z = ar * ar + ai * ai - br * br - bi * bi;
	return classifyBloch(x, y, z, tol);
}

/** Every qubit's state in a ledger state. */
export function statesFromLedger(s: LedgerState, t: LedgerTables, tol: number): QubitState[] {
	const out: QubitState[] = [];
	for (let q = 0; q < s.qubitCount; q++) out.push(ledgerQubitState(s, t, q, tol));
	return out;
}

/** Every qubit's state in a state vector (from its reduced Bloch vector). */
export function statesFromAmplitudes(s: StateVector, tol: number): QubitState[] {
	const b = allBlochVectors(s);
	const out: QubitState[] = [];
	for (let q = 0; q < s.qubitCount; q++) out.push(classifyBloch(b[3 * q], b[3 * q + 1], b[3 * q + 2], tol));
	return out;
}

/** Same text as canonicalFrameText(…, statesFromLedger(s)) for exact/classical qubits, built directly. */
export function ledgerCanonicalText(s: LedgerState, t: LedgerTables, step: number, tol: number): string {
	const parts: string[] = [];
	for (let q = 0; q < s.qubitCount; q++) {
		if (s.kind[q] === LedgerKind.classical) parts.push(s.bit[q] ? 'c1' : 'c0');
		else if (s.kind[q] === LedgerKind.fourier && !s.inexact[q]) {
			const a = dyadic(s.phase[q], t.exp);
			parts.push(`f${a.num}/${a.exp}`);
		} else return canonicalFrameText('ledger', step, statesFromLedger(s, t, tol));
	}
	return `ledger|${step}|${parts.join(';')}`;
}

/** Register values where every qubit of the register is classical, and (state vector, ≤ 12 qubits) marginal distributions. */
export function registerReadout(c: LoweredCircuit, states: QubitState[], amplitudes: StateVector | null): { registerValues: Record<string, bigint | null>; distributions: Record<string, number[]> } {
	const registerValues: Record<string, bigint | null> = {};
	const distributions: Record<string, number[]> = {};
	for (const r of c.registers) {
		let v = 0n;
		let ok = true;
		for (let i = 0; i < r.size; i++) {
			const s = states[r.offset + i];
			if (s.kind !== 'classical') ok = false;
			else if (s.bit) v |= 1n << BigInt(i);
		}
		registerValues[r.name] = ok ? v : null;
		if (amplitudes && r.size <= 12) distributions[r.name] = Array.from(registerDistribution(amplitudes, r.offset, r.size));
	}
	return { registerValues, distributions };
}

export function describeExpected(e: ExpectedState): string {
	const note = e.note ? `; ${e.note}` : '';
	return e.kind === 'classical' ? `|${e.bit}⟩${note}` : `Fourier phase ${formatTurns(e.angle)} (level ${e.level}, value ${e.value}${note})`;
}

export function describeState(s: QubitState): string {
	if (s.kind === 'classical') return `|${s.bit}⟩`;
	if (s.kind === 'fourier') return `Fourier phase ${s.turns}`;
	return `mixed state, Bloch (${s.bloch.map((x) => x.toFixed(4)).join(', ')})`;
}
