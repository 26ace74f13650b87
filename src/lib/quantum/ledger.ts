/**
 * Exact ledger engine: runs a lowered circuit on a product state, one record per qubit, exactly.
 *
 * Qubit order: flat qubits (register offset + index, index 0 = LSB). Angles: turns, stored as
 * BigInt numerators over one circuit-wide denominator 2^E (E = largest angle exponent + 2), so
 * adding a phase is one BigInt add and mask: O(1) per gate, O(k) for a gate with k controls.
 *
 * Each qubit is `classical` (bit), `fourier` (|0⟩ + e^{2πiφ}|1⟩, φ exact unless an inexact angle
 * touched it) or `pure` (a general single-qubit state α|0⟩ + β|1⟩ in floats). Rules:
 * - h: classical b → fourier φ = b/2; fourier with φ ∈ {0, ½} exactly → classical (an inexact φ
 *   within 1e-6 turn of 0 or ½ too, with the dropped probability recorded); any other
 *   fourier → pure; pure → pure.
 * - x / cx / ccx / mcx with classical controls act classically (x on fourier: φ → −φ and a
 *   global phase φ). One superposed control is allowed only when the target is fourier with
 *   φ = 0 (no-op) or φ = ½ (phase kick-back of ½ turn onto the control).
 * - p / cp / mcp are symmetric in their qubits: any classical 0 → no-op; all classical 1 →
 *   global phase; exactly one superposed qubit → that qubit gets the phase; two or more → entangling.
 * - rz: p plus a global phase; u: makes the qubit pure; swap exchanges records.
 * Anything else would entangle: {@link applyLedgerGate} returns false and the caller hands the
 * state over to the amplitude engine ({@link ledgerToAmplitudes}).
 */
import { GateCode, type LoweredCircuit } from './circuit.js';
import { dyadic, floatTurns, type Angle } from './angle.js';
import { createState, RESET_TOLERANCE, type ResetFailure, type StateVector } from './amplitudes.js';

/** Per-qubit state kind codes of the ledger. */
export const LedgerKind = { classical: 0, fourier: 1, pure: 2 } as const;

/** Contribution kinds recorded per qubit. */
export const ContributionKind = {
	/** +gate angle (p, cp, mcp, rz) */
	phase: 0,
	/** H turned a classical bit into a Fourier qubit: amount = bit/2 */
	origin: 1,
	/** H turned a Fourier qubit with φ ∈ {0,½} back into a classical bit */
	collapse: 2,
	/** the qubit left the exact form (became a general pure state) */
	leave: 3,
	/** X on a Fourier qubit: amount −2φ (explicit) */
	negate: 4,
	/** phase kick-back of ½ turn from a CNOT onto its superposed control */
	kickback: 5,
	/** swap exchanged this record with another qubit */
	swap: 6
} as const;

/** Precomputed per-circuit data of the ledger (angle numerators over 2^E). */
export interface LedgerTables {
	exp: number;
	mask: bigint;
	half: bigint;
	/** numerator over 2^E of each angle, or null when the angle is inexact */
	num: (bigint | null)[];
	/** θ/2 numerators (rz global phase) */
	halfNum: (bigint | null)[];
	turns: Float64Array;
}

/** Build ledger tables for a circuit (angles in turns). */
export function buildLedgerTables(c: LoweredCircuit): LedgerTables {
	let maxExp = 0;
	for (const a of c.angles) if (a.exact && a.exp > maxExp) maxExp = a.exp;
	const E = maxExp + 2;
	const mask = (1n << BigInt(E)) - 1n;
	const num: (bigint | null)[] = [];
	const halfNum: (bigint | null)[] = [];
	const turns = new Float64Array(c.angles.length);
	c.angles.forEach((a, i) => {
		if (a.exact) {
			num.push((a.num << BigInt(E - a.exp)) & mask);
			halfNum.push((a.num << BigInt(E - a.exp - 1)) & mask);
			turns[i] = Number(a.num) / 2 ** a.exp;
		} else {
			num.push(null);
			halfNum.push(null);
			turns[i] = a.turns;
		}
	});
	return { exp: E, mask, half: 1n << BigInt(E - 1), num, halfNum, turns };
}

/** Ledger state of all qubits (flat order). `phase[q]` is φ·2^E exactly; `extra[q]` adds inexact turns. */
export interface LedgerState {
	qubitCount: number;
	kind: Uint8Array;
	bit: Uint8Array;
	phase: bigint[];
	extra: Float64Array;
	inexact: Uint8Array;
	/** α re, α im, β re, β im per qubit, for `pure` qubits */
	amp: Float64Array;
	globalPhase: bigint;
	globalExtra: number;
	/**
	 * Probability dropped so far by reading an inexact Fourier qubit whose phase is within
	 * {@link NEAR_CLASSICAL_TURNS} of 0 or ½ as classical at an H (sin²(π·δ) each). 0 when every
	 * angle was exact.
	 */
	dropped: number;
	/** How many H gates did so. */
	nearCollapses: number;
	/** The first reset whose claim "this qubit is |0⟩ here" failed (the state is left as it was). */
	resetFailure: ResetFailure | null;
}

/**
 * An inexact Fourier qubit whose phase lies within this many turns of 0 or ½ is read as a classical
 * bit at an H (dropping probability sin²(π·δ) ≤ 1e-11, recorded in `dropped`), so float angles
 * alone never force the amplitude engine.
 */
export const NEAR_CLASSICAL_TURNS = 1e-6;

/** Grow-only contribution log (struct of arrays). */
export interface ContributionLog {
	length: number;
	gate: Int32Array;
	qubit: Int32Array;
	kind: Uint8Array;
	/** explicit amounts (numerator over 2^E) for `negate` entries, by log index */
	explicit: Map<number, bigint>;
	/** partner qubit of `swap` entries, by log index */
	partner: Map<number, number>;
}

/** Fresh ledger with every qubit classical, bits from `bits` (flat order). */
export function createLedgerState(qubitCount: number, bits?: ArrayLike<number>): LedgerState {
	const s: LedgerState = {
		qubitCount,
		kind: new Uint8Array(qubitCount),
		bit: new Uint8Array(qubitCount),
		phase: new Array<bigint>(qubitCount).fill(0n),
		extra: new Float64Array(qubitCount),
		inexact: new Uint8Array(qubitCount),
		amp: new Float64Array(4 * qubitCount),
		globalPhase: 0n,
		globalExtra: 0,
		dropped: 0,
		nearCollapses: 0,
		resetFailure: null
	};
	if (bits) for (let q = 0; q < qubitCount; q++) s.bit[q] = bits[q] ? 1 : 0;
	return s;
}

/** Deep copy of a ledger state (for keyframes). */
export function cloneLedgerState(s: LedgerState): LedgerState {
	return {
		qubitCount: s.qubitCount,
		kind: s.kind.slice(),
		bit: s.bit.slice(),
		phase: s.phase.slice(),
		extra: s.extra.slice(),
		inexact: s.inexact.slice(),
		amp: s.amp.slice(),
		globalPhase: s.globalPhase,
		globalExtra: s.globalExtra,
		dropped: s.dropped,
		nearCollapses: s.nearCollapses,
		resetFailure: s.resetFailure && { ...s.resetFailure }
	};
}

/** Empty contribution log. */
export function createContributionLog(capacity = 1024): ContributionLog {
	return { length: 0, gate: new Int32Array(capacity), qubit: new Int32Array(capacity), kind: new Uint8Array(capacity), explicit: new Map(), partner: new Map() };
}

function logPush(log: ContributionLog, gate: number, qubit: number, kind: number): number {
	if (log.length === log.gate.length) {
		const cap = log.gate.length * 2;
		const g = new Int32Array(cap);
		g.set(log.gate);
		const q = new Int32Array(cap);
		q.set(log.qubit);
		const k = new Uint8Array(cap);
		k.set(log.kind);
		log.gate = g;
		log.qubit = q;
		log.kind = k;
	}
	const i = log.length++;
	log.gate[i] = gate;
	log.qubit[i] = qubit;
	log.kind[i] = kind;
	return i;
}

const TAU = 2 * Math.PI;

/** Current phase of a fourier qubit in float turns. */
/** 0 or 1 when φ (turns) is within {@link NEAR_CLASSICAL_TURNS} of 0 or ½ (mod 1), else −1. */
function nearClassical(phi: number): number {
	const x = phi - Math.floor(phi);
	if (x <= NEAR_CLASSICAL_TURNS || 1 - x <= NEAR_CLASSICAL_TURNS) return 0;
	if (Math.abs(x - 0.5) <= NEAR_CLASSICAL_TURNS) return 1;
	return -1;
}

function phaseTurns(s: LedgerState, t: LedgerTables, q: number): number {
	return Number(s.phase[q]) / 2 ** t.exp + s.extra[q];
}

/** Turn qubit q into a general pure state (α, β) = (a, b·e^{2πiφ})-style amplitudes from its current record. */
function toPure(s: LedgerState, t: LedgerTables, q: number): void {
	const o = 4 * q;
	if (s.kind[q] === LedgerKind.classical) {
		const b = s.bit[q];
		s.amp[o] = b ? 0 : 1;
		s.amp[o + 1] = 0;
		s.amp[o + 2] = b ? 1 : 0;
		s.amp[o + 3] = 0;
	} else if (s.kind[q] === LedgerKind.fourier) {
		const ph = TAU * phaseTurns(s, t, q);
		s.amp[o] = Math.SQRT1_2;
		s.amp[o + 1] = 0;
		s.amp[o + 2] = Math.SQRT1_2 * Math.cos(ph);
		s.amp[o + 3] = Math.SQRT1_2 * Math.sin(ph);
	}
	s.kind[q] = LedgerKind.pure;
}

function pureMatrix(s: LedgerState, q: number, m00r: number, m00i: number, m01r: number, m01i: number, m10r: number, m10i: number, m11r: number, m11i: number): void {
	const o = 4 * q;
	const ar = s.amp[o];
	const ai = s.amp[o + 1];
	const br = s.amp[o + 2];
	const bi = s.amp[o + 3];
	s.amp[o] = m00r * ar - m00i * ai + m01r * br - m01i * bi;
	s.amp[o + 1] = m00r * ai + m00i * ar + m01r * bi + m01i * br;
	s.amp[o + 2] = m10r * ar - m10i * ai + m11r * br - m11i * bi;
	s.amp[o + 3] = m10r * ai + m10i * ar + m11r * bi + m11i * br;
}

/** Add phase (angle index ai, turns) to the |1⟩ component of non-classical qubit q. */
function addPhase(s: LedgerState, t: LedgerTables, q: number, ai: number, g: number, log: ContributionLog | null): void {
	if (s.kind[q] === LedgerKind.fourier) {
		const n = t.num[ai];
		if (n !== null) s.phase[q] = (s.phase[q] + n) & t.mask;
		else {
			s.extra[q] += t.turns[ai];
			s.inexact[q] = 1;
		}
		if (log) logPush(log, g, q, ContributionKind.phase);
	} else {
		const th = TAU * t.turns[ai];
		const c = Math.cos(th);
		const sn = Math.sin(th);
		const o = 4 * q;
		const br = s.amp[o + 2];
		const bi = s.amp[o + 3];
		s.amp[o + 2] = br * c - bi * sn;
		s.amp[o + 3] = br * sn + bi * c;
		if (log) logPush(log, g, q, ContributionKind.phase);
	}
}

function addGlobal(s: LedgerState, t: LedgerTables, ai: number, half: boolean, sign: 1 | -1): void {
	const n = half ? t.halfNum[ai] : t.num[ai];
	if (n !== null) s.globalPhase = (sign === 1 ? s.globalPhase + n : s.globalPhase - n) & t.mask;
	else s.globalExtra += (sign * t.turns[ai]) / (half ? 2 : 1);
}

/** Apply X to qubit q (any kind). */
function applyX(s: LedgerState, t: LedgerTables, q: number, g: number, log: ContributionLog | null): void {
	const k = s.kind[q];
	if (k === LedgerKind.classical) s.bit[q] ^= 1;
	else if (k === LedgerKind.fourier) {
		// X(|0⟩ + e^{iφ}|1⟩) = e^{iφ}(|0⟩ + e^{−iφ}|1⟩)
		const old = s.phase[q];
		s.globalPhase = (s.globalPhase + old) & t.mask;
		s.globalExtra += s.extra[q];
		s.phase[q] = (t.mask + 1n - old) & t.mask;
		s.extra[q] = -s.extra[q];
		if (log) {
			const i = logPush(log, g, q, ContributionKind.negate);
			log.explicit.set(i, (t.mask + 1n - ((old << 1n) & t.mask)) & t.mask);
		}
	} else pureMatrix(s, q, 0, 0, 1, 0, 1, 0, 0, 0);
}

/**
 * Apply gate g to the ledger; returns false (state unchanged) if the gate would entangle.
 * `log` null skips recording (replays from keyframes).
 */
export function applyLedgerGate(s: LedgerState, c: LoweredCircuit, t: LedgerTables, g: number, log: ContributionLog | null): boolean {
	const q0 = c.qubitStart[g];
	const q1 = c.qubitStart[g + 1];
	const ql = c.qubitList;
	const kind = c.kinds[g];
	switch (kind) {
		case GateCode.h: {
			const q = ql[q0];
			const k = s.kind[q];
			if (k === LedgerKind.classical) {
				s.kind[q] = LedgerKind.fourier;
				s.phase[q] = s.bit[q] ? t.half : 0n;
				s.extra[q] = 0;
				s.inexact[q] = 0;
				if (log) logPush(log, g, q, ContributionKind.origin);
			} else if (k === LedgerKind.fourier && s.inexact[q] === 0 && (s.phase[q] === 0n || s.phase[q] === t.half)) {
				s.kind[q] = LedgerKind.classical;
				s.bit[q] = s.phase[q] === 0n ? 0 : 1;
				if (log) logPush(log, g, q, ContributionKind.collapse);
			} else if (k === LedgerKind.fourier && s.inexact[q] !== 0 && nearClassical(phaseTurns(s, t, q)) >= 0) {
				// Float angles that should have cancelled: |0⟩ + e^{2πi(b/2+δ)}|1⟩ → |b⟩ up to sin²(πδ).
				const f = phaseTurns(s, t, q);
				const b = nearClassical(f);
				const d = f - Math.round(f * 2) / 2;
				s.kind[q] = LedgerKind.classical;
				s.bit[q] = b;
				s.inexact[q] = 0;
				s.extra[q] = 0;
				s.dropped += Math.sin(Math.PI * d) ** 2;
				// The kept amplitude is e^{iπδ}·cos(πδ): a global phase of δ/2 turn.
				s.globalExtra += d / 2;
				s.nearCollapses++;
				if (log) logPush(log, g, q, ContributionKind.collapse);
			} else {
				if (k === LedgerKind.fourier && log) logPush(log, g, q, ContributionKind.leave);
				toPure(s, t, q);
				const r = Math.SQRT1_2;
				pureMatrix(s, q, r, 0, r, 0, r, 0, -r, 0);
			}
			return true;
		}
		case GateCode.x:
		case GateCode.cx:
		case GateCode.ccx:
		case GateCode.mcx: {
			const nc = c.controlCounts[g];
			const tq = ql[q1 - 1];
			let superposed = -1;
			for (let i = q0; i < q0 + nc; i++) {
				const q = ql[i];
				if (s.kind[q] === LedgerKind.classical) {
					if (s.bit[q] === 0) return true;
				} else if (superposed >= 0) return false;
				else superposed = q;
			}
			if (superposed < 0) {
				applyX(s, t, tq, g, log);
				return true;
			}
			// One superposed control: fine only if the target is an X eigenstate (|+⟩ or |−⟩).
			if (s.kind[tq] !== LedgerKind.fourier || s.inexact[tq]) return false;
			if (s.phase[tq] === 0n) return true;
			if (s.phase[tq] !== t.half) return false;
			if (s.kind[superposed] === LedgerKind.fourier) {
				s.phase[superposed] = (s.phase[superposed] + t.half) & t.mask;
				if (log) logPush(log, g, superposed, ContributionKind.kickback);
			} else {
				pureMatrix(s, superposed, 1, 0, 0, 0, 0, 0, -1, 0);
				if (log) logPush(log, g, superposed, ContributionKind.kickback);
			}
			return true;
		}
		case GateCode.swap: {
			const a = ql[q0];
			const b = ql[q0 + 1];
			let tmp: number = s.kind[a];
			s.kind[a] = s.kind[b];
			s.kind[b] = tmp;
			tmp = s.bit[a];
			s.bit[a] = s.bit[b];
			s.bit[b] = tmp;
			const ph = s.phase[a];
			s.phase[a] = s.phase[b];
			s.phase[b] = ph;
			tmp = s.extra[a];
			s.extra[a] = s.extra[b];
			s.extra[b] = tmp;
			tmp = s.inexact[a];
			s.inexact[a] = s.inexact[b];
			s.inexact[b] = tmp;
			for (let i = 0; i < 4; i++) {
				tmp = s.amp[4 * a + i];
				s.amp[4 * a + i] = s.amp[4 * b + i];
				s.amp[4 * b + i] = tmp;
			}
			if (log) {
				log.partner.set(logPush(log, g, a, ContributionKind.swap), b);
				log.partner.set(logPush(log, g, b, ContributionKind.swap), a);
			}
			return true;
		}
		case GateCode.p:
		case GateCode.cp:
		case GateCode.mcp: {
			const ai = c.angleIndex[g];
			if (t.num[ai] === 0n) return true;
			let superposed = -1;
			for (let i = q0; i < q1; i++) {
				const q = ql[i];
				if (s.kind[q] === LedgerKind.classical) {
					if (s.bit[q] === 0) return true;
				} else if (superposed >= 0) return false;
				else superposed = q;
			}
			if (superposed < 0) addGlobal(s, t, ai, false, 1);
			else addPhase(s, t, superposed, ai, g, log);
			return true;
		}
		case GateCode.rz: {
			// rz(θ) = e^{−iθ/2}·p(θ)
			const ai = c.angleIndex[g];
			const q = ql[q0];
			addGlobal(s, t, ai, true, -1);
			if (s.kind[q] === LedgerKind.classical) {
				if (s.bit[q]) addGlobal(s, t, ai, false, 1);
			} else addPhase(s, t, q, ai, g, log);
			return true;
		}
		case GateCode.u: {
			if (c.controlCounts[g] !== 0) return false;
			const q = ql[q0];
			if (s.kind[q] === LedgerKind.fourier && log) logPush(log, g, q, ContributionKind.leave);
			toPure(s, t, q);
			const M = c.matrices[c.matrixIndex[g]];
			pureMatrix(s, q, M[0][0][0], M[0][0][1], M[0][1][0], M[0][1][1], M[1][0][0], M[1][0][1], M[1][1][0], M[1][1][1]);
			return true;
		}
		case GateCode.reset: {
			// Checked, not applied (see GateName): a classical 0 passes; anything else fails the claim.
			if (s.resetFailure) return true;
			const q = ql[q0];
			const p1 = ledgerProbabilityOne(s, q);
			if (p1 > RESET_TOLERANCE) s.resetFailure = { gate: g, qubit: q, p1 };
			return true;
		}
	}
	return false;
}

/** Probability of finding qubit q in 1 in the ledger's product state. */
export function ledgerProbabilityOne(s: LedgerState, q: number): number {
	const k = s.kind[q];
	return k === LedgerKind.classical ? s.bit[q] : k === LedgerKind.fourier ? 0.5 : s.amp[4 * q + 2] ** 2 + s.amp[4 * q + 3] ** 2;
}

/** Human reason why gate g entangles in the current ledger state. */
export function entanglingReason(s: LedgerState, c: LoweredCircuit, g: number): string {
	const qs: number[] = [];
	for (let i = c.qubitStart[g]; i < c.qubitStart[g + 1]; i++) if (s.kind[c.qubitList[i]] !== LedgerKind.classical) qs.push(c.qubitList[i]);
	const src = c.itemSources[c.itemOf[g]];
	return `gate ${g}${src ? ` (line ${src.line})` : ''} acts on ${qs.length} qubits in superposition (q${qs.join(', q')}) and would entangle them`;
}

/** Exact phase φ of a fourier qubit as an {@link Angle} in turns (inexact if a float angle touched it). */
export function ledgerPhase(s: LedgerState, t: LedgerTables, q: number): Angle {
	if (s.inexact[q]) return floatTurns(phaseTurns(s, t, q));
	return dyadic(s.phase[q], t.exp);
}

/** Global phase accumulated by the ledger, in turns. */
export function ledgerGlobalPhase(s: LedgerState, t: LedgerTables): Angle {
	if (s.globalExtra !== 0) return floatTurns(Number(s.globalPhase) / 2 ** t.exp + s.globalExtra);
	return dyadic(s.globalPhase, t.exp);
}

/**
 * Expand the product state into a state vector (flat qubit q = index bit q), including the
 * ledger's global phase. Throws above `maxQubits`.
 */
export function ledgerToAmplitudes(s: LedgerState, t: LedgerTables, maxQubits: number): StateVector {
	const sv = createState(s.qubitCount, maxQubits);
	if (s.resetFailure) sv.resetFailure = { ...s.resetFailure };
	const d = sv.data;
	const g = TAU * (Number(s.globalPhase) / 2 ** t.exp + s.globalExtra);
	d[0] = Math.cos(g);
	d[1] = Math.sin(g);
	let size = 1;
	for (let q = 0; q < s.qubitCount; q++) {
		let ar: number, ai: number, br: number, bi: number;
		const k = s.kind[q];
		if (k === LedgerKind.classical) {
			ar = s.bit[q] ? 0 : 1;
			ai = 0;
			br = s.bit[q] ? 1 : 0;
			bi = 0;
		} else if (k === LedgerKind.fourier) {
			const ph = TAU * phaseTurns(s, t, q);
			ar = Math.SQRT1_2;
			ai = 0;
			br = Math.SQRT1_2 * Math.cos(ph);
			bi = Math.SQRT1_2 * Math.sin(ph);
		} else {
			ar = s.amp[4 * q];
			ai = s.amp[4 * q + 1];
			br = s.amp[4 * q + 2];
			bi = s.amp[4 * q + 3];
		}
		// new[i + size] = old[i]·β, new[i] = old[i]·α; iterate downwards so old values are read first.
		for (let i = size - 1; i >= 0; i--) {
			const re = d[2 * i];
			const im = d[2 * i + 1];
			d[2 * (i + size)] = re * br - im * bi;
			d[2 * (i + size) + 1] = re * bi + im * br;
			d[2 * i] = re * ar - im * ai;
			d[2 * i + 1] = re * ai + im * ar;
		}
		size *= 2;
	}
	return sv;
}
