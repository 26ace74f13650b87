/**
 * Symbolic execution of any lowered circuit over every basis input of a domain at once, without
 * recognising blocks. For a basis input x the circuits this product is for keep a product state:
 * every qubit is either
 * - classical: it holds the bit c(x), a reduced ordered BDD over the input bits, or
 * - Fourier: (|0⟩ + e^{2πi·φ(x)}|1⟩)/√2 with φ(x) = Σ θ_k·f_k(x) turns, θ_k exact dyadic and f_k
 *   a BDD (a sum of angle × Boolean terms, merged per BDD node: the node is canonical),
 * and the whole state carries a global phase γ(x) of the same form. Gates act on these records
 * exactly (see {@link symbolicProve}); whatever would entangle two qubits, a general u gate or an
 * inexact angle stops the run as `undecided`, naming the gate.
 *
 * An H on a Fourier qubit reads it back: the phase's bits are summed as a word (mod 1 turn); when
 * every bit below ½ is 0 on the domain the qubit becomes the classical bit "φ = ½", exactly — so an
 * inverse QFT of a register holding k·x/2^m yields the bits of x mod 2^m. Otherwise the run is
 * `undecided` with an input where the state is not a basis state.
 *
 * At the end: output registers must hold the spec's bits, other input registers their start bits,
 * every other qubit 0, and γ must be constant, each for every input of the domain (f ∧ domain);
 * a failure comes with a concrete input taken from the BDD. Variable order: one-bit registers
 * first, then the bits of the other input registers interleaved from the LSB, so that carries and
 * comparisons stay linear in size.
 *
 * Qubit order: flat qubits (register offset + index, index 0 = LSB). Angles: turns.
 */
import { addAngles, dyadic, formatTurns, reduceSigned, scaleAngle, halveAngle, negateAngle, type Angle, type DyadicAngle } from '../angle.js';
import { gateProvenance, GateCode, qubitLabel, type LoweredCircuit, type PlacedRegister } from '../circuit.js';
import { Bdd, BddLimit, FALSE, TRUE, WordOps, WordUnsupported, type Word } from './bdd.js';
import { compileNode, specBits } from './spec-words.js';
import type { Condition, Spec } from './spec.js';

/** Limits of one symbolic proof. */
export interface SymbolicLimits {
	/** Most BDD nodes (default 2,000,000). */
	maxNodes: number;
	/** Wall-clock budget in ms (default 20,000). */
	timeMs: number;
}
export const DEFAULT_SYMBOLIC_LIMITS: SymbolicLimits = { maxNodes: 2_000_000, timeMs: 20_000 };

/** A wrong output or dirty qubit, as a function of the inputs, with a concrete input where it is wrong. */
export interface BitMismatch {
	register: string;
	qubit: string;
	holds: string;
	expected: string;
	input: Record<string, string>;
	gates: number[];
	lines: number[];
	/** Set when the bit is wrong at a reset (the step after it), not at the end. */
	atStep?: number;
}

/** A term of the global phase that depends on the input (the phase must be constant over the domain). */
export interface PhaseTerm {
	/** `a[0]`, `a[1]*b[2]`, or a described function. */
	term: string;
	turns: string;
	gates: number[];
	lines: number[];
}

/** Outcome of {@link symbolicProve}. */
export interface SymbolicResult {
	status: 'proved' | 'refuted' | 'undecided';
	reason: string | null;
	/** What stopped an undecided run. */
	limit: 'nodes' | 'time' | 'unsupported' | 'not-basis' | null;
	atGate: number | null;
	gatesDone: number;
	domain: { conditions: string[]; count: string; total: string };
	mismatches: BitMismatch[];
	phaseTerms: PhaseTerm[];
	/** Two domain inputs whose global phases differ (when the phase is not constant). */
	phaseWitness: { inputs: [Record<string, string>, Record<string, string>]; turns: [string, string] } | null;
	/** Concrete inputs the prover found (for replay by the engines). */
	counterexamples: Record<string, string>[];
	nodes: number;
	ms: number;
}

/** What {@link symbolicProve} must establish. */
export interface SymbolicGoal {
	specs: Spec[];
	conditions: Condition[];
	/** Registers whose start value varies; every other register starts at 0. */
	inputs: string[];
	ignorePhase?: boolean;
	limits?: Partial<SymbolicLimits>;
}

interface Term {
	angle: DyadicAngle;
	gates: number[];
}
type Phase = Map<number, Term>;

class Stop extends Error {
	constructor(
		message: string,
		readonly gate: number,
		readonly limit: SymbolicResult['limit'],
		readonly witness: number | null = null
	) {
		super(message);
	}
}

const MAX_TERM_GATES = 24;

/** The variable order: flat input qubit → BDD level. */
export function inputOrder(registers: PlacedRegister[], inputs: string[]): Map<number, number> {
	const regs = registers.filter((r) => inputs.includes(r.name));
	const order = new Map<number, number>();
	let level = 0;
	for (const r of regs) if (r.size === 1) order.set(r.offset, level++);
	const wide = regs.filter((r) => r.size > 1);
	const top = Math.max(0, ...wide.map((r) => r.size));
	for (let i = 0; i < top; i++) for (const r of wide) if (i < r.size) order.set(r.offset + i, level++);
	return order;
}

/** Register words over the BDD variables of `order` (start values of the input registers). */
export function inputWords(bdd: Bdd, ops: WordOps, registers: PlacedRegister[], order: Map<number, number>, fixed?: Map<number, number>): Map<string, Word> {
	const env = new Map<string, Word>();
	for (const r of registers) {
		const bits = Array.from({ length: r.size }, (_, i) => {
			const l = order.get(r.offset + i);
			return l === undefined ? FALSE : (fixed?.get(l) ?? bdd.variable(l));
		});
		env.set(r.name, ops.unsigned(bits));
	}
	return env;
}

/** Input values of an assignment (inputs only). */
export function assignmentValues(a: Uint8Array, registers: PlacedRegister[], order: Map<number, number>, inputs: string[]): Record<string, string> {
	const out: Record<string, string> = {};
	for (const r of registers) {
		if (!inputs.includes(r.name)) continue;
		let v = 0n;
		for (let i = 0; i < r.size; i++) if (a[order.get(r.offset + i)!]) v |= 1n << BigInt(i);
		out[r.name] = v.toString();
	}
	return out;
}

/**
 * Prove, refute or leave undecided: the circuit meets `goal.specs` (values, and the global phase
 * unless ignored) for every input of the domain. Never throws for a limit; a bad spec the word
 * arithmetic cannot express gives `undecided` with the reason.
 */
export function symbolicProve(c: LoweredCircuit, goal: SymbolicGoal): SymbolicResult {
	const limits = { ...DEFAULT_SYMBOLIC_LIMITS, ...goal.limits };
	const t0 = Date.now();
	const order = inputOrder(c.registers, goal.inputs);
	const bdd = new Bdd(order.size, { maxNodes: limits.maxNodes, deadline: t0 + limits.timeMs });
	const ops = new WordOps(bdd);
	const regOf: PlacedRegister[] = [];
	for (const r of c.registers) for (let i = 0; i < r.size; i++) regOf.push(r);
	const qname = (q: number) => qubitLabel(c.registers, q);
	const levelName: string[] = [];
	for (const [q, l] of order) levelName[l] = qname(q);
	const lineOf = (g: number) => gateProvenance(c, g).source?.line ?? -1;
	const linesOf = (gs: number[]) => [...new Set(gs.map(lineOf).filter((l) => l > 0))].sort((a, b) => a - b);
	const result: SymbolicResult = {
		status: 'undecided',
		reason: null,
		limit: null,
		atGate: null,
		gatesDone: 0,
		domain: { conditions: goal.conditions.map((x) => x.text), count: '0', total: (1n << BigInt(order.size)).toString() },
		mismatches: [],
		phaseTerms: [],
		phaseWitness: null,
		counterexamples: [],
		nodes: 0,
		ms: 0
	};
	const values = (a: Uint8Array) => assignmentValues(a, c.registers, order, goal.inputs);
	const finish = () => {
		result.nodes = bdd.size;
		result.ms = Date.now() - t0;
		return result;
	};

	let dom = TRUE;
	let env = inputWords(bdd, ops, c.registers, order);
	try {
		for (const cond of goal.conditions) dom = bdd.and(dom, ops.truthy(compileNode(cond.expr, env, ops)));
	} catch (e) {
		if (e instanceof BddLimit || e instanceof WordUnsupported) {
			result.limit = e instanceof BddLimit ? e.limit : 'unsupported';
			result.reason = `the domain could not be built: ${e.message}`;
			return finish();
		}
		throw e;
	}
	result.domain.count = bdd.satCount(dom).toString();
	if (dom === FALSE) {
		result.status = 'undecided';
		result.limit = 'unsupported';
		result.reason = 'the domain is empty: no input satisfies every condition';
		return finish();
	}
	// An input bit the domain fixes (y == 1 fixes every bit of y) starts as that constant: every
	// function then agrees with the original on the domain, and everything is checked on the
	// domain only (f ∧ domain), so the verdict is the same with smaller decision diagrams.
	const fixed = new Map<number, number>();
	for (const l of order.values()) {
		const v = bdd.variable(l);
		if (bdd.and(dom, v) === FALSE) fixed.set(l, FALSE);
		else if (bdd.and(dom, bdd.not(v)) === FALSE) fixed.set(l, TRUE);
	}
	if (fixed.size) env = inputWords(bdd, ops, c.registers, order, fixed);

	// State
	const kind = new Uint8Array(c.qubitCount); // 0 classical, 1 Fourier
	const bit: number[] = [];
	const phase: (Phase | null)[] = [];
	const writers: number[][] = [];
	for (let q = 0; q < c.qubitCount; q++) {
		const l = order.get(q);
		bit.push(l === undefined ? FALSE : (fixed.get(l) ?? bdd.variable(l)));
		phase.push(null);
		writers.push([]);
	}
	const global: Phase = new Map();

	const addTerm = (p: Phase, f: number, a: Angle, g: number | number[]) => {
		if (f === FALSE) return;
		if (!a.exact) throw new Stop(`gate ${Array.isArray(g) ? g[0] : g} has an inexact angle; the prover needs exact k/2^m turns`, Array.isArray(g) ? g[0] : g, 'unsupported');
		if (a.num === 0n) return;
		const gs = Array.isArray(g) ? g : [g];
		const t = p.get(f);
		if (!t) {
			p.set(f, { angle: a, gates: gs.slice(0, MAX_TERM_GATES) });
			return;
		}
		t.angle = addAngles(t.angle, a) as DyadicAngle;
		for (const x of gs) if (t.gates.length < MAX_TERM_GATES && !t.gates.includes(x)) t.gates.push(x);
		if (t.angle.num === 0n) p.delete(f);
	};
	/** The last (at most 32) distinct gates that wrote qubit q, oldest first. */
	const wrote = (q: number, g: number) => {
		const w = writers[q];
		const at = w.indexOf(g);
		if (at >= 0) w.splice(at, 1);
		else if (w.length >= 32) w.shift();
		w.push(g);
	};

	/** Bits (LSB first) of Σ θ·f mod 1 turn, over 2^E with E the largest exponent. */
	const phaseBits = (p: Phase): { bits: number[]; exp: number } => {
		let E = 0;
		for (const t of p.values()) if (t.angle.exp > E) E = t.angle.exp;
		const acc: number[] = new Array(E).fill(FALSE);
		let constant = 0n;
		for (const [f, t] of p) {
			const k = t.angle.num << BigInt(E - t.angle.exp);
			if (f === TRUE) {
				constant += k;
				continue;
			}
			let carry = FALSE;
			for (let i = 0; i < E; i++) {
				const y = (k >> BigInt(i)) & 1n ? f : FALSE;
				if (y === FALSE && carry === FALSE) continue;
				const x = acc[i];
				const xy = bdd.xor(x, y);
				acc[i] = bdd.xor(xy, carry);
				carry = bdd.or(bdd.and(x, y), bdd.and(carry, xy));
			}
		}
		if (constant) {
			constant &= (1n << BigInt(E)) - 1n;
			let carry = FALSE;
			for (let i = 0; i < E; i++) {
				const y = (constant >> BigInt(i)) & 1n ? TRUE : FALSE;
				const x = acc[i];
				const xy = bdd.xor(x, y);
				acc[i] = bdd.xor(xy, carry);
				carry = bdd.or(bdd.and(x, y), bdd.and(carry, xy));
			}
		}
		return { bits: acc, exp: E };
	};
	const phaseAt = (p: Phase, a: Uint8Array): Angle => {
		let s: Angle = dyadic(0n, 0);
		for (const [f, t] of p) if (bdd.evaluate(f, a)) s = addAngles(s, t.angle);
		return s;
	};

	// A wrong bit is described on the domain only (what it holds elsewhere does not matter);
	// if simplifying hits a limit, the bit as held is described instead.
	const onDomain = (f: number): number => {
		try {
			return bdd.restrict(f, dom);
		} catch (e) {
			if (e instanceof BddLimit) return f;
			throw e;
		}
	};

	const g0 = 0;
	let g = g0;
	try {
		for (; g < c.gateCount; g++) {
			if ((g & 255) === 0 && Date.now() - t0 > limits.timeMs) throw new BddLimit('time', 'the proof passed its time limit');
			const k = c.kinds[g];
			const s = c.qubitStart[g];
			const e = c.qubitStart[g + 1];
			const nc = c.controlCounts[g];
			const ql = c.qubitList;
			switch (k) {
				case GateCode.h: {
					const q = ql[s];
					if (kind[q] === 0) {
						const p: Phase = new Map();
						addTerm(p, bit[q], dyadic(1n, 1), g);
						phase[q] = p;
						kind[q] = 1;
					} else {
						const p = phase[q]!;
						const { bits, exp } = phaseBits(p);
						let rest = FALSE;
						for (let i = 0; i < exp - 1; i++) rest = bdd.or(rest, bits[i]);
						const bad = bdd.and(rest, dom);
						if (bad !== FALSE) {
							throw new Stop(`after gate ${g} (H on ${qname(q)}) the state is not a basis state for some inputs: the phase it reads back is not 0 or ½ turn`, g, 'not-basis', bad);
						}
						bit[q] = exp === 0 ? FALSE : bits[exp - 1];
						for (const t of p.values()) for (const x of t.gates) wrote(q, x);
						phase[q] = null;
						kind[q] = 0;
					}
					wrote(q, g);
					break;
				}
				case GateCode.x:
				case GateCode.cx:
				case GateCode.ccx:
				case GateCode.mcx: {
					const t = ql[e - 1];
					let ctl = TRUE;
					for (let i = s; i < s + nc; i++) {
						const q = ql[i];
						if (kind[q] === 1) {
							if (kind[t] === 1 && phase[t]!.size === 0) {
								ctl = FALSE; // X on |+⟩ does nothing
								break;
							}
							throw new Stop(`gate ${g} is an X controlled by ${qname(q)}, a qubit in superposition (it would entangle)`, g, 'unsupported');
						}
						ctl = bdd.and(ctl, bit[q]);
						if (ctl === FALSE) break;
					}
					if (ctl === FALSE) break;
					if (kind[t] === 0) {
						bit[t] = bdd.xor(bit[t], ctl);
					} else {
						// X^k on (|0⟩ + e^{iφ}|1⟩): global += k·φ, φ → φ − 2kφ
						// The terms are read before any is changed: adding to p merges into terms by
						// their BDD key, and f∧ctl may be the key of a term not yet read.
						const p = phase[t]!;
						const before = [...p].map(([f, term]) => ({ f, angle: term.angle, gates: [...term.gates, g] }));
						for (const { f, angle, gates } of before) {
							const fk = bdd.and(f, ctl);
							addTerm(global, fk, angle, gates);
							addTerm(p, fk, scaleAngle(angle, -2n), gates);
						}
					}
					wrote(t, g);
					break;
				}
				case GateCode.swap: {
					const a = ql[s];
					const b = ql[s + 1];
					[kind[a], kind[b]] = [kind[b], kind[a]];
					[bit[a], bit[b]] = [bit[b], bit[a]];
					[phase[a], phase[b]] = [phase[b], phase[a]];
					[writers[a], writers[b]] = [writers[b], writers[a]];
					wrote(a, g);
					wrote(b, g);
					break;
				}
				case GateCode.p:
				case GateCode.cp:
				case GateCode.mcp:
				case GateCode.rz: {
					const theta = c.angles[c.angleIndex[g]];
					if (!theta.exact) throw new Stop(`gate ${g} has an inexact angle; the prover needs exact k/2^m turns`, g, 'unsupported');
					let fourier = -1;
					let ctl = TRUE;
					const targetQ = ql[e - 1];
					for (let i = s; i < e; i++) {
						const q = ql[i];
						if (kind[q] === 1) {
							if (k === GateCode.rz && i < s + nc) throw new Stop(`gate ${g} is an rz controlled by ${qname(q)}, a qubit in superposition`, g, 'unsupported');
							if (fourier >= 0) throw new Stop(`gate ${g} couples ${qname(fourier)} and ${qname(q)}, two qubits in superposition (it would entangle)`, g, 'unsupported');
							fourier = q;
						} else ctl = bdd.and(ctl, bit[q]);
					}
					if (k === GateCode.rz) {
						// rz(θ) = e^{−iθ/2}·p(θ) on the target, under the controls
						let rc = TRUE;
						for (let i = s; i < s + nc; i++) rc = bdd.and(rc, bit[ql[i]]);
						addTerm(global, rc, negateAngle(halveAngle(theta)), g);
					}
					if (ctl === FALSE) break;
					if (fourier < 0) addTerm(global, ctl, theta, g);
					else {
						addTerm(phase[fourier]!, ctl, theta, g);
						wrote(fourier, g);
					}
					void targetQ;
					break;
				}
				case GateCode.u:
					throw new Stop(`gate ${g} is a general single-qubit gate (u) on ${qname(ql[s])}; the prover handles h, X-type, swap and phase gates`, g, 'unsupported');
				case GateCode.reset: {
					// The claim "this qubit is |0⟩ here", for every input of the domain. A Fourier qubit
					// is found 1 with probability ½ on every input; a classical one where bit ∧ domain.
					// A failed claim is a mismatch; the state is left as it was and the walk goes on.
					const q = ql[s];
					const line = lineOf(g);
					const where = `0 at the reset at step ${g + 1}${line > 0 ? ` (line ${line})` : ''}, which claims it is |0⟩ there`;
					const bad = kind[q] === 1 ? dom : bdd.and(bit[q], dom);
					if (bad !== FALSE && result.mismatches.length < 50) {
						const a = bdd.anySat(bad)!;
						const gates = [...writers[q], g];
						result.mismatches.push({
							register: regOf[q].name,
							qubit: qname(q),
							holds: kind[q] === 1 ? 'a superposition (|0⟩ + e^{iφ}|1⟩)/√2, found 1 with probability ½' : describe(bdd, onDomain(bit[q]), levelName),
							expected: where,
							input: values(a),
							gates,
							lines: linesOf(gates),
							atStep: g + 1
						});
						if (result.counterexamples.length < 3) result.counterexamples.push(values(a));
					}
					break;
				}
				default:
					throw new Stop(`gate ${g} has a kind the prover does not know`, g, 'unsupported');
			}
		}
		result.gatesDone = c.gateCount;

		// Ending: every qubit classical and as required, the global phase constant.
		for (let q = 0; q < c.qubitCount; q++)
			if (kind[q] === 1) {
				const a = bdd.anySat(dom)!;
				result.mismatches.push({ register: regOf[q].name, qubit: qname(q), holds: 'a superposition (|0⟩ + e^{iφ}|1⟩)/√2: no inverse transform brought it back', expected: 'a basis state', input: values(a), gates: writers[q].slice(), lines: linesOf(writers[q]) });
				if (result.counterexamples.length < 3) result.counterexamples.push(values(a));
			}
		const specOf = new Map(goal.specs.map((sp) => [sp.out, sp]));
		for (const r of c.registers) {
			const sp = specOf.get(r.name);
			const want = sp ? specBits(sp, env, ops) : env.get(r.name)!.bits.slice(0, r.size);
			for (let i = 0; i < r.size; i++) {
				const q = r.offset + i;
				if (kind[q] === 1) continue;
				const diff = bdd.and(bdd.xor(bit[q], want[i]), dom);
				if (diff === FALSE) continue;
				const a = bdd.anySat(diff)!;
				if (result.mismatches.length < 50)
					result.mismatches.push({
						register: r.name,
						qubit: qname(q),
						holds: describe(bdd, onDomain(bit[q]), levelName),
						expected: sp ? `bit ${i} of ${sp.text.slice(sp.text.indexOf('=') + 1).trim()}: ${describe(bdd, onDomain(want[i]), levelName)}` : order.has(q) ? `${qname(q)} (unchanged)` : '0 (an ancilla or work qubit must come back clean)',
						input: values(a),
						gates: writers[q].slice(),
						lines: linesOf(writers[q])
					});
				if (result.counterexamples.length < 3) result.counterexamples.push(values(a));
			}
		}
		if (!goal.ignorePhase && global.size) {
			const { bits, exp } = phaseBits(global);
			let varying = -1;
			for (let i = 0; i < exp && varying < 0; i++) {
				const f = bdd.and(bits[i], dom);
				if (f !== FALSE && f !== dom) varying = i;
			}
			if (varying >= 0) {
				const a1 = bdd.anySat(dom)!;
				const v1 = bdd.evaluate(bits[varying], a1);
				const a2 = bdd.anySat(bdd.and(dom, v1 ? bdd.not(bits[varying]) : bits[varying]))!;
				const p1 = phaseAt(global, a1);
				const p2 = phaseAt(global, a2);
				result.phaseWitness = { inputs: [values(a1), values(a2)], turns: [formatTurns(reduceSigned(p1)), formatTurns(reduceSigned(p2))] };
				result.counterexamples.push(values(a1), values(a2));
				result.phaseTerms = phaseTermsOf(bdd, global, levelName, linesOf);
			}
		}
		result.status = result.mismatches.length || result.phaseWitness ? 'refuted' : 'proved';
		return finish();
	} catch (err) {
		result.gatesDone = g;
		// A reset claim already failed on a domain input: that settles it whatever stopped the walk later.
		if (result.mismatches.length && (err instanceof Stop || err instanceof BddLimit || err instanceof WordUnsupported)) {
			result.status = 'refuted';
			result.atGate = g;
			result.reason = `a reset claim fails; the walk then stopped at gate ${g}: ${(err as Error).message}`;
			return finish();
		}
		if (err instanceof Stop) {
			result.reason = err.message;
			result.limit = err.limit;
			result.atGate = err.gate;
			if (err.witness !== null) {
				const a = bdd.anySat(err.witness);
				if (a) result.counterexamples.push(values(a));
			}
			return finish();
		}
		if (err instanceof BddLimit) {
			result.limit = err.limit;
			result.atGate = g;
			result.reason = `${err.message} at gate ${g} of ${c.gateCount}${err.limit === 'nodes' ? ' (raise it with --proof-limit)' : ''}`;
			return finish();
		}
		if (err instanceof WordUnsupported) {
			result.limit = 'unsupported';
			result.reason = `the spec cannot be built as decision diagrams: ${err.message}`;
			return finish();
		}
		throw err;
	}
}

/** A Boolean function in words: `a[0]*b[1]`, `(1−a[0])`, or a summary for larger functions. */
export function describe(bdd: Bdd, f: number, names: string[]): string {
	if (f === FALSE) return '0';
	if (f === TRUE) return '1';
	const cube = bdd.cube(f);
	if (cube) return cube.map(([l, pos]) => (pos ? names[l] : `(1−${names[l]})`)).join('*');
	const sup = bdd.support(f);
	if (sup.length === 1) return `¬${names[sup[0]]}`;
	const shown = sup.slice(0, 6).map((l) => names[l]);
	return `a function of ${shown.join(', ')}${sup.length > 6 ? ` and ${sup.length - 6} more bits` : ''} (${bdd.nodeCount(f)} decision nodes)`;
}

/**
 * The input-dependent part of a phase as named terms: the exact multilinear polynomial over its
 * support when that has at most 12 bits (Möbius inversion of the values), else the terms as held.
 */
function phaseTermsOf(bdd: Bdd, p: Phase, names: string[], linesOf: (g: number[]) => number[]): PhaseTerm[] {
	const support = new Set<number>();
	for (const f of p.keys()) for (const l of bdd.support(f)) support.add(l);
	const sup = [...support].sort((a, b) => a - b);
	const out: PhaseTerm[] = [];
	if (sup.length <= 12) {
		const n = sup.length;
		const a = new Uint8Array(bdd.varCount);
		const vals: Angle[] = [];
		for (let m = 0; m < 1 << n; m++) {
			for (let i = 0; i < n; i++) a[sup[i]] = (m >> i) & 1;
			let s: Angle = dyadic(0n, 0);
			for (const [f, t] of p) if (bdd.evaluate(f, a)) s = addAngles(s, t.angle);
			vals.push(s);
		}
		for (let i = 0; i < n; i++) for (let m = 0; m < 1 << n; m++) if (m & (1 << i)) vals[m] = addAngles(vals[m], negateAngle(vals[m ^ (1 << i)]));
		for (let m = 1; m < 1 << n; m++) {
			const v = vals[m];
			if (v.exact && v.num === 0n) continue;
			const levels = sup.filter((_, i) => m & (1 << i));
			const gates = [...new Set([...p].filter(([f]) => { const s = bdd.support(f); return levels.every((l) => s.includes(l)); }).flatMap(([, t]) => t.gates))].sort((x, y) => x - y);
			out.push({ term: levels.map((l) => names[l]).join('*'), turns: formatTurns(reduceSigned(v)), gates, lines: linesOf(gates) });
			if (out.length >= 64) break;
		}
		return out;
	}
	for (const [f, t] of p) {
		if (f === TRUE) continue;
		out.push({ term: describe(bdd, f, names), turns: formatTurns(reduceSigned(t.angle)), gates: t.gates, lines: linesOf(t.gates) });
		if (out.length >= 64) break;
	}
	return out;
}
