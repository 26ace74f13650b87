/**
 * Prover for circuits of Fourier form: a QFT on a register, a section of phases with classical
 * controls, an inverse QFT — found from the lowered gates themselves (swaps, levels, sections
 * inside multiply blocks included). Inside a section every Fourier qubit's phase is a multilinear
 * polynomial in the input bits (monomial → exact dyadic coefficient in turns); the circuit is right
 * for every input exactly when each coefficient equals the spec's required coefficient mod 1 turn.
 *
 * Classical qubits are tracked as XOR-of-monomials (ANF) over input bits, so CNOT parities and
 * Toffoli ancillas are exact; a phase on a qubit holding f is expanded with
 * [f₁⊕…⊕f_r] = Σ_{∅≠T} (−2)^{|T|−1} ∏_T f. A Fourier qubit hit by X^f carries f as a mask: a
 * phase θ on it then adds θ·(1 − 2f) to its coefficient (and a per-input global phase).
 *
 * Qubit order: input bit = flat qubit (register offset + index, index 0 = LSB). Angles: turns.
 * Cost: O(expanded terms) per gate; an n-bit multiplier with native ccp is O(n³) map updates.
 *
 * This file is the entry and the walk over the gates; the parts are in proof/: sections.ts (find
 * and probe a QFT or inverse QFT), poly.ts (ANF and polynomial building), state.ts (what is tracked
 * per qubit), gates.ts (one step per gate kind) and compare.ts (section and end comparisons).
 */
import { GateCode, type LoweredCircuit } from '../circuit.js';
import type { IntPoly } from './spec.js';
import { compareGlobalPhase, compareRegistersAtEnd } from './proof/compare.js';
import { enterSection, flip, leaveSection, phaseGate } from './proof/gates.js';
import { Mismatch, Outside } from './proof/poly.js';
import { lineOf, qname, qubitsOf, startProver, type Prover } from './proof/state.js';

/** A coefficient that differs from what the spec requires. */
export interface WrongTerm {
	/** Qubit whose phase holds the term, e.g. `p[5]`. */
	target: string;
	/** Monomial over input bits, e.g. `a[2]*b[1]` (`1` for the constant term). */
	term: string;
	expectedTurns: string;
	actualTurns: string;
	/** Gates (lowered indices) that added to this term, with their amounts; `explains` when the amount accounts for the error (±difference, or half of it: a sign slip). */
	gates: { gate: number; turns: string; explains: boolean; exact: boolean }[];
	/** For a term nothing added to: gates next to where it belongs (same target, or same term on another target). */
	neighbours: number[];
	lines: number[];
	/** `section` (between QFT and inverse), `qft` / `iqft` (the transforms themselves), `phase` (the global phase, which must not depend on the input). */
	where: 'section' | 'qft' | 'iqft' | 'register' | 'phase';
	/** The monomial as flat input qubits (empty for the constant term); null for QFT-internal terms. */
	monomial?: number[] | null;
	/** Exact difference actual − expected, reduced to (−½, ½] turn (as text). */
	differenceTurns: string;
}

/** A register that does not end as the spec (or "unchanged") requires, from classical tracking. */
export interface RegisterMismatch {
	register: string;
	qubit: string;
	holds: string;
	expected: string;
	gates: number[];
	lines: number[];
}

/** One Fourier section found in the circuit. */
export interface SectionInfo {
	register: string;
	qftGates: [number, number];
	iqftGates: [number, number];
	levels: number[];
	layout: 'swapped' | 'unswapped' | 'permuted';
	required: 'spec' | 'inferred';
}

/** Outcome of {@link proveCircuit}. */
export interface ProofResult {
	/** `proved`: right for every input; `refuted`: wrong terms found; `outside`: not of Fourier form (see `reason`). */
	status: 'proved' | 'refuted' | 'outside';
	reason?: string;
	/** Gate at which the form broke (outside), if any. */
	atGate?: number;
	sections: SectionInfo[];
	wrongTerms: WrongTerm[];
	registerMismatches: RegisterMismatch[];
	termsChecked: number;
}

/** What the prover must establish: per output register its required value polynomial over the input bits (null = not polynomial). */
export interface ProofGoal {
	/** Registers whose starting value varies (their bits are the variables); others start at 0. */
	inputs: Set<string>;
	/** Skip the global-phase check (values only). */
	ignorePhase?: boolean;
	/** Output register → required value as an integer polynomial (mod 2^size). */
	outputs: Map<string, IntPoly>;
}

/**
 * Prove (or refute) a lowered circuit against the goal for every input at once. Qubit order:
 * input bit = flat qubit; angles in turns. Returns `outside` with the gate and the reason when the
 * circuit leaves the Fourier form, so only a sweep can judge it.
 */
export function proveCircuit(c: LoweredCircuit, goal: ProofGoal): ProofResult {
	const p = startProver(c, goal);
	const finish = (status: ProofResult['status']): ProofResult => ({ status, sections: p.sections, wrongTerms: p.wrongTerms, registerMismatches: p.registerMismatches, termsChecked: p.termsChecked });
	try {
		if (walkGates(p)) return finish('refuted');
		compareRegistersAtEnd(p);
		compareGlobalPhase(p);
		return finish(p.wrongTerms.length || p.registerMismatches.length ? 'refuted' : 'proved');
	} catch (e) {
		if (e instanceof Mismatch) {
			p.registerMismatches.push({ register: '', qubit: '', holds: e.message, expected: 'matching levels', gates: [e.gate], lines: [lineOf(p, e.gate)] });
			return { status: 'refuted', reason: e.message, atGate: e.gate, sections: p.sections, wrongTerms: p.wrongTerms, registerMismatches: p.registerMismatches, termsChecked: p.termsChecked };
		}
		if (e instanceof Outside) return { status: 'outside', reason: e.message, atGate: e.gate, sections: p.sections, wrongTerms: p.wrongTerms, registerMismatches: p.registerMismatches, termsChecked: p.termsChecked };
		throw e;
	}
}

/** Every gate in order (those inside a judged QFT or inverse QFT skipped); true as soon as a section is refuted. */
function walkGates(p: Prover): boolean {
	const c = p.c;
	for (let g = 0; g < c.gateCount; g++) {
		if (p.consumed[g]) continue;
		const k = c.kinds[g];
		const qs = qubitsOf(c, g);
		switch (k) {
			case GateCode.h: {
				const r = p.regOfQubit[qs[0]];
				const refuted = p.state[qs[0]].kind !== 'f' ? enterSection(p, g, r) : leaveSection(p, g, r);
				if (refuted) return true;
				break;
			}
			case GateCode.x:
			case GateCode.cx:
			case GateCode.ccx:
			case GateCode.mcx:
				flip(p, g, qs, c.controlCounts[g]);
				break;
			case GateCode.swap:
				[p.state[qs[0]], p.state[qs[1]]] = [p.state[qs[1]], p.state[qs[0]]];
				break;
			case GateCode.p:
			case GateCode.rz:
			case GateCode.cp:
			case GateCode.mcp:
				phaseGate(p, g, k, qs);
				break;
			case GateCode.u:
				throw new Outside(`gate ${g} is a general single-qubit gate (u) on ${qname(p, qs[0])}; the prover handles h, x-type, swap and phase gates only`, g);
			case GateCode.reset:
				throw new Outside(`gate ${g} is a reset on ${qname(p, qs[0])}; its claim (the qubit is |0⟩ there) is checked by the general prover`, g);
			default:
				throw new Outside(`gate ${g} has a kind the Fourier-form prover does not know`, g);
		}
	}
	return false;
}
