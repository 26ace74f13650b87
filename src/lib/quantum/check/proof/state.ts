/**
 * What the Fourier-form prover tracks while it walks the gates: per qubit a classical ANF, a
 * Fourier phase polynomial (with the X mask it carries) or a verified section value bit; the
 * global phase; what it found so far. Qubit order: flat (register offset + index, index 0 = LSB);
 * angles in turns.
 */
import { addAngles, dyadic, formatTurns, isZeroSigned, negateAngle, reduceSigned, scaleAngle, subtractAngles, type Angle } from '../../angle.js';
import { gateProvenance, qubitLabel, type LoweredCircuit, type PlacedRegister } from '../../circuit.js';
import type { IntPoly } from '../spec.js';
import type { ProofGoal, RegisterMismatch, SectionInfo, WrongTerm } from '../proof.js';
import { anfToPoly, MAX_POLY_TERMS, oneMinusTwice, Outside, polyTimes, productOf, type Anf } from './poly.js';

/** One contribution to a phase term: gate index and the amount it added (turns). */
export type Contribution = [number, Angle];
export interface PhaseTerm {
	angle: Angle;
	from: Contribution[];
}

/** A qubit: classical (`c`, its ANF), Fourier (`f`, phase polynomial, X mask, level, register) or a bit of a verified section value (`v`). */
export type QState = { kind: 'c'; anf: Anf } | FourierQubit | { kind: 'v'; reg: string; bit: number };
/**
 * A Fourier qubit: its stored phase polynomial, the X mask it carries (the qubit's actual phase
 * is (1 − 2·mask)·phase), its level and register.
 */
export type FourierQubit = { kind: 'f'; phase: Map<string, PhaseTerm>; mask: Anf; level: number; reg: string };

/** The prover's state over one circuit. */
export interface Prover {
	readonly c: LoweredCircuit;
	readonly goal: ProofGoal;
	readonly regOfQubit: PlacedRegister[];
	readonly state: QState[];
	/** Value polynomials of registers that came out of a verified section. */
	readonly regValue: Map<string, IntPoly>;
	readonly sections: SectionInfo[];
	readonly wrongTerms: WrongTerm[];
	readonly registerMismatches: RegisterMismatch[];
	/** Gates already judged as part of a QFT or an inverse QFT. */
	readonly consumed: Uint8Array;
	/** The global phase as a multilinear polynomial over input bits (monomial → turns), unless ignored. */
	readonly global: Map<string, PhaseTerm>;
	termsChecked: number;
}

/** Start: input registers' qubits hold their own bit, every other qubit 0. */
export function startProver(c: LoweredCircuit, goal: ProofGoal): Prover {
	const regOfQubit: PlacedRegister[] = [];
	for (const r of c.registers) for (let i = 0; i < r.size; i++) regOfQubit.push(r);
	const state: QState[] = [];
	for (let q = 0; q < c.qubitCount; q++) state.push({ kind: 'c', anf: goal.inputs.has(regOfQubit[q].name) ? new Map([[String(q), []]]) : new Map() });
	return { c, goal, regOfQubit, state, regValue: new Map(), sections: [], wrongTerms: [], registerMismatches: [], consumed: new Uint8Array(c.gateCount), global: new Map(), termsChecked: 0 };
}

export const qname = (p: Prover, q: number): string => qubitLabel(p.c.registers, q);
/** A monomial key in words (`a[0]*b[1]`, `1` for the constant). */
export const termName = (p: Prover, key: string): string => (key === '' ? '1' : key.split('.').map((x) => qname(p, Number(x))).join('*'));
export const lineOf = (p: Prover, g: number): number => gateProvenance(p.c, g).source?.line ?? -1;
export const inRegister = (q: number, r: PlacedRegister): boolean => q >= r.offset && q < r.offset + r.size;
export const qubitsOf = (c: LoweredCircuit, g: number): number[] => Array.from(c.qubitList.subarray(c.qubitStart[g], c.qubitStart[g + 1]));

/** Add θ·poly to the global phase (the constant term is allowed and dropped). */
export function addGlobal(p: Prover, poly: IntPoly, theta: Angle, g: number, scaleBy: bigint = 1n): void {
	for (const [k, v] of poly) {
		if (k === '') continue; // a constant global phase is allowed
		const a = scaleAngle(theta, v * scaleBy);
		const t = p.global.get(k);
		if (t) {
			t.angle = addAngles(t.angle, a);
			if (t.from.length < 24) t.from.push([g, a]);
		} else p.global.set(k, { angle: a, from: [[g, a]] });
	}
	if (p.global.size > MAX_POLY_TERMS) throw new Outside('the global phase polynomial grew beyond 4 million terms', g);
}

/**
 * Add θ·∏factors·(1 − 2·mask) to a Fourier qubit's phase polynomial, and the whole-state phase
 * its flips owe for it.
 *
 * An X^c on (|0⟩ + e^{iφ}|1⟩) puts c·φ on the whole state. Flip i adds cᵢ·φᵢ = kᵢ·Sᵢ, with
 * kᵢ = cᵢ·(1 − 2·mᵢ) and Sᵢ the stored phase then (the sum of the increments sⱼ made before it).
 * Summed over the flips that is Σⱼ sⱼ·(W − Wⱼ), where W = Σ kᵢ and Wⱼ is that sum when sⱼ was
 * made. For bits kᵢ = mᵢ₊₁ − mᵢ, so W telescopes to the mask's own polynomial: nothing to keep.
 * Each increment pays −sⱼ·mask now; what is left, mask·S at the inverse QFT, is 0 unless the
 * qubit is still flipped there, and then the inverse QFT refutes the section on its value
 * (`checkLevelsAndMasks`) before any phase is compared. So a flip costs nothing, not the whole
 * phase polynomial (the quarter-angle lowering flips product qubits often).
 */
export function addPhase(p: Prover, f: FourierQubit, theta: Angle, factors: Anf[], g: number): void {
	let poly = productOf(factors, g);
	if (f.mask.size) {
		const m = anfToPoly(f.mask, g);
		poly = polyTimes(poly, oneMinusTwice(m), g);
		if (!p.goal.ignorePhase) {
			if (!theta.exact) throw new Outside(`gate ${g} adds an inexact phase to a flipped Fourier qubit`, g);
			addGlobal(p, polyTimes(poly, m, g), theta, g, -1n);
		}
	}
	for (const [k, v] of poly) {
		const a = scaleAngle(theta, v);
		const t = f.phase.get(k);
		if (t) {
			t.angle = addAngles(t.angle, a);
			t.from.push([g, a]);
		} else f.phase.set(k, { angle: a, from: [[g, a]] });
	}
	if (f.phase.size > MAX_POLY_TERMS) throw new Outside('a phase polynomial grew beyond 4 million terms', g);
}

/** Register value as an integer polynomial, from classical bits or a verified section value. */
export function valueOf(p: Prover, r: PlacedRegister, g: number): IntPoly {
	const st = p.state.slice(r.offset, r.offset + r.size);
	if (st.every((s, j) => s.kind === 'v' && s.reg === r.name && s.bit === j)) return p.regValue.get(r.name)!;
	const out: IntPoly = new Map();
	st.forEach((s, j) => {
		if (s.kind !== 'c') throw new Outside(`register ${r.name} enters a QFT with ${qname(p, r.offset + j)} not in a known basis state`, g);
		for (const [k, v] of anfToPoly(s.anf, g)) {
			const x = (out.get(k) ?? 0n) + (v << BigInt(j));
			if (x === 0n) out.delete(k);
			else out.set(k, x);
		}
	});
	return out;
}

/** The ANF of a classical qubit used as a control (or a phase gate's qubit); anything else is outside the form. */
export function anfOf(p: Prover, q: number, g: number, role: string): Anf {
	const s = p.state[q];
	if (s.kind === 'c') return s.anf;
	if (s.kind === 'v') throw new Outside(`gate ${g} uses ${qname(p, q)} as a ${role} after an inverse QFT; the prover does not expand computed sums bit by bit`, g);
	throw new Outside(`gate ${g} uses ${qname(p, q)} as a ${role} while it is in the Fourier basis`, g);
}

/** Record a coefficient that differs from the required one (at most 500), with the gates that explain the difference. */
export function pushWrong(p: Prover, target: string, term: string, want: Angle, got: Angle, from: Contribution[], where: WrongTerm['where'], d: ReturnType<typeof reduceSigned>, neighbours: number[] = [], monomial: number[] | null = null): void {
	if (p.wrongTerms.length >= 500) return;
	const dA: Angle = d.exact ? dyadic(d.num, d.exp) : { exact: false, turns: d.turns - Math.floor(d.turns) };
	const same = (x: Angle, y: Angle) => isZeroSigned(reduceSigned(subtractAngles(x, y)), 1e-12);
	const gates = from.map(([g, a]) => {
		const exact = same(a, dA) || same(negateAngle(a), dA);
		return { gate: g, turns: formatTurns(reduceSigned(a)), explains: exact || same(scaleAngle(a, 2n), dA), exact };
	});
	p.wrongTerms.push({
		target,
		term,
		expectedTurns: formatTurns(reduceSigned(want)),
		actualTurns: formatTurns(reduceSigned(got)),
		gates,
		lines: [...new Set(from.map(([g]) => lineOf(p, g)).filter((l) => l > 0))],
		where,
		differenceTurns: formatTurns(d),
		neighbours,
		monomial
	});
}
