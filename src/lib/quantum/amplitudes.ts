/**
 * Amplitude engine: a dense state vector in one Float64Array (interleaved re, im) over a
 * transferable ArrayBuffer.
 *
 * Qubit order: flat qubit q is bit q of the basis index (little-endian), so register value bits
 * map to index bits at the register's offset. Angles: kernels take radians as (cos, sin) pairs;
 * {@link applyLoweredGate} converts the circuit's turns.
 *
 * Kernels are written for speed: in place, no allocation per call, matrix entries copied to
 * locals, plain loops with masks and shifts, sizes checked once at the public entry.
 */
import { GateCode, type LoweredCircuit } from './circuit.js';
import { toTurns } from './angle.js';

/** Default qubit limits: 24 in a browser, 26 on a server. */
export const AMPLITUDE_QUBIT_LIMITS = { browser: 24, server: 26 } as const;

/** A state vector of `qubitCount` qubits: `data[2i]`, `data[2i+1]` = re, im of amplitude i (qubit q = bit q of i). */
export interface StateVector {
	qubitCount: number;
	data: Float64Array;
	/** The first reset whose claim "this qubit is |0⟩ here" failed on this state, if any. */
	resetFailure?: ResetFailure;
}

/**
 * A failed reset claim: at gate `gate` qubit `qubit` would be found 1 with probability `p1`
 * (> {@link RESET_TOLERANCE}). The engines leave the state as it was (a reset is checked, never applied).
 */
export interface ResetFailure {
	gate: number;
	qubit: number;
	p1: number;
}

/** Largest probability of finding 1 at a reset that still counts as |0⟩ (float rounding). */
export const RESET_TOLERANCE = 1e-9;

/** Probability of finding qubit q in 1 (qubit order: index bit q). */
export function probabilityOne(s: StateVector, q: number): number {
	const d = s.data;
	const stride = 1 << q;
	const dim = 1 << s.qubitCount;
	let p = 0;
	for (let hi = stride; hi < dim; hi += stride << 1) for (let i = hi; i < hi + stride; i++) p += d[2 * i] * d[2 * i] + d[2 * i + 1] * d[2 * i + 1];
	return p;
}

/** Allocate |0…0⟩ on `qubitCount` qubits (little-endian); throws above `maxQubits` (default 24). */
export function createState(qubitCount: number, maxQubits: number = AMPLITUDE_QUBIT_LIMITS.browser): StateVector {
	if (!Number.isInteger(qubitCount) || qubitCount < 0) throw new RangeError(`qubit count must be a non-negative integer, got ${qubitCount}`);
	if (qubitCount > maxQubits)
		throw new RangeError(`amplitude engine limit: ${qubitCount} qubits need 2^${qubitCount} amplitudes (${fmtBytes(16 * 2 ** qubitCount)}); the limit here is ${maxQubits} qubits`);
	if (qubitCount > 30) throw new RangeError('amplitude engine supports at most 30 qubits (32-bit index masks)');
	const data = new Float64Array(new ArrayBuffer(16 * 2 ** qubitCount));
	data[0] = 1;
	return { qubitCount, data };
}

function fmtBytes(b: number): string {
	return b >= 2 ** 30 ? `${(b / 2 ** 30).toFixed(1)} GiB` : `${(b / 2 ** 20).toFixed(1)} MiB`;
}

/** Set the state to basis state |index⟩ (little-endian). */
export function setBasisState(s: StateVector, index: number): void {
	s.data.fill(0);
	s.data[2 * index] = 1;
}

/** Copy a state (new buffer). */
export function cloneState(s: StateVector): StateVector {
	return { qubitCount: s.qubitCount, data: s.data.slice(), ...(s.resetFailure ? { resetFailure: { ...s.resetFailure } } : {}) };
}

// ---------------------------------------------------------------------------------------------
// Fast kernels (internal: callers validated qubit indices).

/** Hadamard on qubit q. */
export function kernelH(d: Float64Array, n: number, q: number): void {
	const stride = 1 << q;
	const dim = 1 << n;
	const r = Math.SQRT1_2;
	for (let hi = 0; hi < dim; hi += stride << 1) {
		const end = hi + stride;
		for (let i = hi; i < end; i++) {
			const a = i << 1;
			const b = (i + stride) << 1;
			const ar = d[a];
			const ai = d[a + 1];
			const br = d[b];
			const bi = d[b + 1];
			d[a] = (ar + br) * r;
			d[a + 1] = (ai + bi) * r;
			d[b] = (ar - br) * r;
			d[b + 1] = (ai - bi) * r;
		}
	}
}

/** General one-qubit unitary [[m00, m01], [m10, m11]] on qubit q, applied where all `cmask` bits are set (cmask = 0: uncontrolled). */
export function kernelU(
	d: Float64Array,
	n: number,
	q: number,
	cmask: number,
	m00r: number,
	m00i: number,
	m01r: number,
	m01i: number,
	m10r: number,
	m10i: number,
	m11r: number,
	m11i: number
): void {
	const stride = 1 << q;
	const dim = 1 << n;
	for (let hi = 0; hi < dim; hi += stride << 1) {
		const end = hi + stride;
		for (let i = hi; i < end; i++) {
			if ((i & cmask) !== cmask) continue;
			const a = i << 1;
			const b = (i + stride) << 1;
			const ar = d[a];
			const ai = d[a + 1];
			const br = d[b];
			const bi = d[b + 1];
			d[a] = m00r * ar - m00i * ai + m01r * br - m01i * bi;
			d[a + 1] = m00r * ai + m00i * ar + m01r * bi + m01i * br;
			d[b] = m10r * ar - m10i * ai + m11r * br - m11i * bi;
			d[b + 1] = m10r * ai + m10i * ar + m11r * bi + m11i * br;
		}
	}
}

/**
 * Multiply by e^{iθ} (given as cos, sin) every amplitude whose index has all bits of `mask` set
 * (mask = controls | target): p, cp and mcp. Only the 2^(n−popcount) touched amplitudes are visited.
 */
export function kernelPhase(d: Float64Array, n: number, mask: number, c: number, s: number): void {
	const free = ((1 << n) - 1) & ~mask;
	let sub = 0;
	for (;;) {
		const a = (sub | mask) << 1;
		const re = d[a];
		const im = d[a + 1];
		d[a] = re * c - im * s;
		d[a + 1] = re * s + im * c;
		if (sub === free) break;
		sub = (sub - free) & free;
	}
}

/** diag(e^{iα}, e^{iβ}) on qubit q (rz uses α = −θ/2, β = θ/2). */
export function kernelDiag(d: Float64Array, n: number, q: number, c0: number, s0: number, c1: number, s1: number): void {
	const stride = 1 << q;
	const dim = 1 << n;
	for (let hi = 0; hi < dim; hi += stride << 1) {
		const end = hi + stride;
		for (let i = hi; i < end; i++) {
			const a = i << 1;
			const b = (i + stride) << 1;
			const ar = d[a];
			const ai = d[a + 1];
			const br = d[b];
			const bi = d[b + 1];
			d[a] = ar * c0 - ai * s0;
			d[a + 1] = ar * s0 + ai * c0;
			d[b] = br * c1 - bi * s1;
			d[b + 1] = br * s1 + bi * c1;
		}
	}
}

/** X on qubit t where all `cmask` bits are set (x, cx, ccx, mcx); visits only indices with the controls set and t clear. */
export function kernelMcx(d: Float64Array, n: number, cmask: number, t: number): void {
	const tm = 1 << t;
	const fixed = cmask | tm;
	const free = ((1 << n) - 1) & ~fixed;
	let sub = 0;
	for (;;) {
		const i = sub | cmask;
		const a = i << 1;
		const b = (i | tm) << 1;
		const re = d[a];
		const im = d[a + 1];
		d[a] = d[b];
		d[a + 1] = d[b + 1];
		d[b] = re;
		d[b + 1] = im;
		if (sub === free) break;
		sub = (sub - free) & free;
	}
}

/** Swap qubits p and q. */
export function kernelSwap(d: Float64Array, n: number, p: number, q: number): void {
	const pm = 1 << p;
	const qm = 1 << q;
	const free = ((1 << n) - 1) & ~(pm | qm);
	let sub = 0;
	for (;;) {
		const a = (sub | pm) << 1;
		const b = (sub | qm) << 1;
		const re = d[a];
		const im = d[a + 1];
		d[a] = d[b];
		d[a + 1] = d[b + 1];
		d[b] = re;
		d[b + 1] = im;
		if (sub === free) break;
		sub = (sub - free) & free;
	}
}

// ---------------------------------------------------------------------------------------------
// Reference kernel: deliberately plain (out of place, one formula for every gate) so the fast
// kernels can be checked against it.

/**
 * Reference: apply the one-qubit matrix m (row-major re/im pairs, length 8) to qubit `target`
 * where all `controls` are 1, reading `input` and writing `out` (both interleaved re/im).
 */
export function referenceApply(input: Float64Array, out: Float64Array, n: number, controls: number[], target: number, m: Float64Array | number[]): void {
	const dim = 2 ** n;
	for (let i = 0; i < dim; i++) {
		let ok = true;
		for (const c of controls) if (((i >> c) & 1) === 0) ok = false;
		if (!ok) {
			out[2 * i] = input[2 * i];
			out[2 * i + 1] = input[2 * i + 1];
			continue;
		}
		const bit = (i >> target) & 1;
		const i0 = i & ~(1 << target);
		const i1 = i0 | (1 << target);
		const r0 = 2 * (bit * 2); // row `bit`, column 0
		const r1 = r0 + 2; // row `bit`, column 1
		const re = m[r0] * input[2 * i0] - m[r0 + 1] * input[2 * i0 + 1] + m[r1] * input[2 * i1] - m[r1 + 1] * input[2 * i1 + 1];
		const im = m[r0] * input[2 * i0 + 1] + m[r0 + 1] * input[2 * i0] + m[r1] * input[2 * i1 + 1] + m[r1 + 1] * input[2 * i1];
		out[2 * i] = re;
		out[2 * i + 1] = im;
	}
}

/** Reference swap of qubits p, q (out of place). */
export function referenceSwap(input: Float64Array, out: Float64Array, n: number, p: number, q: number): void {
	const dim = 2 ** n;
	for (let i = 0; i < dim; i++) {
		const bp = (i >> p) & 1;
		const bq = (i >> q) & 1;
		let j = i;
		if (bp !== bq) j = i ^ (1 << p) ^ (1 << q);
		out[2 * i] = input[2 * j];
		out[2 * i + 1] = input[2 * j + 1];
	}
}

// ---------------------------------------------------------------------------------------------
// Lowered-circuit driver.

/** Per-circuit cos/sin of every angle (radians from turns), computed once. */
export interface GateTables {
	cos: Float64Array;
	sin: Float64Array;
	/** cos/sin of half the angle (rz). */
	cosHalf: Float64Array;
	sinHalf: Float64Array;
}

/** Precompute cos/sin tables of a circuit's angles (turns → radians). */
export function buildGateTables(c: LoweredCircuit): GateTables {
	const k = c.angles.length;
	const t: GateTables = { cos: new Float64Array(k), sin: new Float64Array(k), cosHalf: new Float64Array(k), sinHalf: new Float64Array(k) };
	for (let i = 0; i < k; i++) {
		const a = c.angles[i];
		const turns = toTurns(a);
		// Exact dyadic values with small denominators get exact cos/sin where possible (0, ¼, ½, ¾ turn).
		const th = 2 * Math.PI * turns;
		t.cos[i] = exactCos(turns) ?? Math.cos(th);
		t.sin[i] = exactCos(turns - 0.25) ?? Math.sin(th);
		t.cosHalf[i] = Math.cos(th / 2);
		t.sinHalf[i] = Math.sin(th / 2);
	}
	return t;
}

function exactCos(turns: number): number | null {
	const t = turns - Math.floor(turns);
	if (t === 0) return 1;
	if (t === 0.25 || t === 0.75) return 0;
	if (t === 0.5) return -1;
	return null;
}

/** Apply gate g of circuit c to state s (qubit order: flat qubit = index bit). */
export function applyLoweredGate(s: StateVector, c: LoweredCircuit, t: GateTables, g: number): void {
	const d = s.data;
	const n = s.qubitCount;
	const q0 = c.qubitStart[g];
	const q1 = c.qubitStart[g + 1];
	const ql = c.qubitList;
	const nc = c.controlCounts[g];
	const ai = c.angleIndex[g];
	switch (c.kinds[g]) {
		case GateCode.h:
			kernelH(d, n, ql[q0]);
			return;
		case GateCode.x:
		case GateCode.cx:
		case GateCode.ccx:
		case GateCode.mcx: {
			let cm = 0;
			for (let i = q0; i < q0 + nc; i++) cm |= 1 << ql[i];
			kernelMcx(d, n, cm, ql[q1 - 1]);
			return;
		}
		case GateCode.swap:
			kernelSwap(d, n, ql[q0], ql[q0 + 1]);
			return;
		case GateCode.p:
		case GateCode.cp:
		case GateCode.mcp: {
			let m = 0;
			for (let i = q0; i < q1; i++) m |= 1 << ql[i];
			kernelPhase(d, n, m, t.cos[ai], t.sin[ai]);
			return;
		}
		case GateCode.rz:
			kernelDiag(d, n, ql[q0], t.cosHalf[ai], -t.sinHalf[ai], t.cosHalf[ai], t.sinHalf[ai]);
			return;
		case GateCode.u: {
			const M = c.matrices[c.matrixIndex[g]];
			let cm = 0;
			for (let i = q0; i < q0 + nc; i++) cm |= 1 << ql[i];
			kernelU(d, n, ql[q1 - 1], cm, M[0][0][0], M[0][0][1], M[0][1][0], M[0][1][1], M[1][0][0], M[1][0][1], M[1][1][0], M[1][1][1]);
			return;
		}
		case GateCode.reset: {
			// Checked, not applied: the state stays as it is; the first failed claim is kept.
			if (s.resetFailure) return;
			const p1 = probabilityOne(s, ql[q0]);
			if (p1 > RESET_TOLERANCE) s.resetFailure = { gate: g, qubit: ql[q0], p1 };
			return;
		}
	}
	throw new Error(`unknown gate kind ${c.kinds[g]} at gate ${g}`);
}

/** Apply gates [from, to) of circuit c; checks sizes once. */
export function applyLoweredGates(s: StateVector, c: LoweredCircuit, t: GateTables, from: number, to: number): void {
	if (s.qubitCount !== c.qubitCount) throw new RangeError(`state has ${s.qubitCount} qubits, circuit ${c.qubitCount}`);
	if (from < 0 || to > c.gateCount || from > to) throw new RangeError(`gate range ${from}..${to} outside 0..${c.gateCount}`);
	for (let g = from; g < to; g++) applyLoweredGate(s, c, t, g);
}

// ---------------------------------------------------------------------------------------------
// Read-outs.

/** Bloch vector (x, y, z) of the reduced state of qubit q, written to out[3q..3q+2] (qubit order: index bit q). */
export function blochVector(s: StateVector, q: number, out: Float64Array = new Float64Array(3), at = 0): Float64Array {
	const d = s.data;
	const stride = 1 << q;
	const dim = 1 << s.qubitCount;
	let p0 = 0;
	let p1 = 0;
	let cr = 0;
	let ci = 0;
	for (let hi = 0; hi < dim; hi += stride << 1) {
		const end = hi + stride;
		for (let i = hi; i < end; i++) {
			const a = i << 1;
			const b = (i + stride) << 1;
			const ar = d[a];
			const aim = d[a + 1];
			const br = d[b];
			const bim = d[b + 1];
			p0 += ar * ar + aim * aim;
			p1 += br * br + bim * bim;
			// ρ01 = Σ a·conj(b)
			cr += ar * br + aim * bim;
			ci += aim * br - ar * bim;
		}
	}
	out[at] = 2 * cr;
	out[at + 1] = -2 * ci;
	out[at + 2] = p0 - p1;
	return out;
}

/** Bloch vectors of all qubits: out[3q..3q+2] = (x, y, z) of qubit q. */
export function allBlochVectors(s: StateVector, out: Float64Array = new Float64Array(3 * s.qubitCount)): Float64Array {
	for (let q = 0; q < s.qubitCount; q++) blochVector(s, q, out, 3 * q);
	return out;
}

/** Marginal distribution of a register (offset, size): out[v] = P(register = v), v little-endian. */
export function registerDistribution(s: StateVector, offset: number, size: number): Float64Array {
	if (offset < 0 || size < 0 || offset + size > s.qubitCount) throw new RangeError('register outside the state');
	if (size > 24) throw new RangeError('register too large for a marginal distribution (max 24 qubits)');
	const out = new Float64Array(1 << size);
	const d = s.data;
	const dim = 1 << s.qubitCount;
	const mask = (1 << size) - 1;
	for (let i = 0; i < dim; i++) {
		const re = d[2 * i];
		const im = d[2 * i + 1];
		out[(i >>> offset) & mask] += re * re + im * im;
	}
	return out;
}

/** Total probability Σ|a_i|² (should stay 1). */
export function stateNorm(s: StateVector): number {
	let t = 0;
	const d = s.data;
	for (let i = 0; i < d.length; i++) t += d[i] * d[i];
	return t;
}
