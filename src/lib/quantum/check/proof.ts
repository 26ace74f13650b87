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
 */
import { addAngles, dyadic, formatTurns, negateAngle, reduceSigned, scaleAngle, subtractAngles, isZeroSigned, ZERO_ANGLE, type Angle } from '../angle.js';
import { gateAt, gateProvenance, GateCode, qubitLabel, type LoweredCircuit, type PlacedRegister } from '../circuit.js';
import { mulKeys, registerPoly, type IntPoly } from './spec.js';

/** One contribution to a phase term: gate index and the amount it added (turns). */
type Contribution = [number, Angle];
interface PhaseTerm {
	angle: Angle;
	from: Contribution[];
}
/** XOR of monomials; each present monomial remembers the gates that toggled it in. */
type Anf = Map<string, number[]>;

type QState =
	| { kind: 'c'; anf: Anf }
	| { kind: 'f'; phase: Map<string, PhaseTerm>; mask: Anf; level: number; reg: string }
	| { kind: 'v'; reg: string; bit: number };

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

class Outside extends Error {
	constructor(
		message: string,
		readonly gate: number
	) {
		super(message);
	}
}

const MAX_ANF_TERMS_EXPANDED = 12;
const MAX_POLY_TERMS = 4_000_000;

/** Multilinear expansion of an ANF (XOR of monomials) as integer coefficients. */
function anfToPoly(anf: Anf | Iterable<string>, gate: number): IntPoly {
	const keys = anf instanceof Map ? [...anf.keys()] : [...anf];
	if (keys.length > MAX_ANF_TERMS_EXPANDED) throw new Outside(`a control holds an XOR of ${keys.length} terms; expanding it would take 2^${keys.length} terms`, gate);
	const out: IntPoly = new Map();
	const n = keys.length;
	for (let mask = 1; mask < 1 << n; mask++) {
		let key = '';
		let size = 0;
		for (let i = 0; i < n; i++)
			if (mask & (1 << i)) {
				key = mulKeys(key, keys[i]);
				size++;
			}
		const c = (-2n) ** BigInt(size - 1);
		const v = (out.get(key) ?? 0n) + c;
		if (v === 0n) out.delete(key);
		else out.set(key, v);
	}
	return out;
}

function polyTimes(a: IntPoly, b: IntPoly, gate: number): IntPoly {
	if (a.size === 1 && a.has('')) {
		const k = a.get('')!;
		return k === 1n ? b : new Map([...b].map(([x, c]) => [x, c * k]));
	}
	const out: IntPoly = new Map();
	for (const [ka, ca] of a)
		for (const [kb, cb] of b) {
			const k = mulKeys(ka, kb);
			const v = (out.get(k) ?? 0n) + ca * cb;
			if (v === 0n) out.delete(k);
			else out.set(k, v);
			if (out.size > 100_000) throw new Outside('a phase expands to more than 100000 terms', gate);
		}
	return out;
}

function anfXorProduct(target: Anf, factors: Anf[], gate: number): void {
	// product of ANFs over GF(2): pairwise unions, XOR-accumulated
	let prod = new Map<string, true>([['', true]]);
	for (const f of factors) {
		const next = new Map<string, true>();
		for (const a of prod.keys())
			for (const b of f.keys()) {
				const k = mulKeys(a, b);
				if (next.has(k)) next.delete(k);
				else next.set(k, true);
			}
		prod = next;
		if (prod.size > 4096) throw new Outside('a Toffoli product holds more than 4096 terms', gate);
	}
	for (const k of prod.keys()) {
		const w = target.get(k);
		if (w) target.delete(k);
		else target.set(k, [gate]);
	}
}

/**
 * Prove (or refute) a lowered circuit against the goal for every input at once. Qubit order:
 * input bit = flat qubit; angles in turns. Returns `outside` with the gate and the reason when the
 * circuit leaves the Fourier form, so only a sweep can judge it.
 */
export function proveCircuit(c: LoweredCircuit, goal: ProofGoal): ProofResult {
	const regOfQubit: PlacedRegister[] = [];
	for (const r of c.registers) for (let i = 0; i < r.size; i++) regOfQubit.push(r);
	const qname = (q: number) => qubitLabel(c.registers, q);
	const termName = (key: string) => (key === '' ? '1' : key.split('.').map((x) => qname(Number(x))).join('*'));
	const lineOf = (g: number) => gateProvenance(c, g).source?.line ?? -1;
	const state: QState[] = [];
	for (let q = 0; q < c.qubitCount; q++) {
		const r = regOfQubit[q];
		state.push({ kind: 'c', anf: goal.inputs.has(r.name) ? new Map([[String(q), []]]) : new Map() });
	}
	const regValue = new Map<string, IntPoly>();
	const sections: SectionInfo[] = [];
	const wrongTerms: WrongTerm[] = [];
	const registerMismatches: RegisterMismatch[] = [];
	const consumed = new Uint8Array(c.gateCount);
	let termsChecked = 0;
	/** The global phase as a multilinear polynomial over input bits (monomial → turns), unless ignored. */
	const global = new Map<string, PhaseTerm>();
	const addGlobal = (poly: IntPoly, theta: Angle, g: number, scaleBy: bigint = 1n) => {
		for (const [k, v] of poly) {
			if (k === '') continue; // a constant global phase is allowed
			const a = scaleAngle(theta, v * scaleBy);
			const t = global.get(k);
			if (t) {
				t.angle = addAngles(t.angle, a);
				if (t.from.length < 24) t.from.push([g, a]);
			} else global.set(k, { angle: a, from: [[g, a]] });
		}
		if (global.size > MAX_POLY_TERMS) throw new Outside('the global phase polynomial grew beyond 4 million terms', g);
	};

	const qubitsOf = (g: number) => Array.from(c.qubitList.subarray(c.qubitStart[g], c.qubitStart[g + 1]));
	const inRegister = (q: number, r: PlacedRegister) => q >= r.offset && q < r.offset + r.size;

	/** Segment of a QFT (mode qft) or inverse QFT (mode iqft) on r starting at gate g0. */
	const findSegment = (g0: number, r: PlacedRegister, mode: 'qft' | 'iqft'): number[] => {
		const fourier = new Uint8Array(r.size).fill(mode === 'qft' ? 0 : 1);
		let done = 0;
		const seg: number[] = [];
		for (let g = g0; g < c.gateCount; g++) {
			const qs = qubitsOf(g);
			const inside = qs.filter((q) => inRegister(q, r)).length;
			if (inside === 0) continue;
			if (inside !== qs.length) break;
			const k = c.kinds[g];
			const complete = done === r.size;
			if (k === GateCode.swap) {
				const [a, b] = qs.map((q) => q - r.offset);
				[fourier[a], fourier[b]] = [fourier[b], fourier[a]];
			} else if (complete) break;
			else if (k === GateCode.h) {
				const j = qs[0] - r.offset;
				if (fourier[j] !== (mode === 'qft' ? 0 : 1)) break;
				fourier[j] = mode === 'qft' ? 1 : 0;
				done++;
			} else if (k === GateCode.cp) {
				const [a, b] = qs.map((q) => q - r.offset);
				if (fourier[a] === fourier[b]) break;
			} else break;
			seg.push(g);
		}
		if (done !== r.size) throw new Outside(`the ${mode === 'qft' ? 'QFT' : 'inverse QFT'} on ${r.name} starting at gate ${g0} is incomplete: ${r.size - done} of its qubits never get their Hadamard in one run`, g0);
		return seg;
	};

	/**
	 * Check a QFT-like segment (inverse QFTs are passed reversed with negated angles) on symbolic
	 * bits y_j of r; returns the level of each qubit position and any wrong QFT terms.
	 */
	const probeSegment = (seg: number[], r: PlacedRegister, reversed: boolean, where: 'qft' | 'iqft'): number[] => {
		type P = { fourier: boolean; v: number; phase: Map<number, { angle: Angle; from: Contribution[] }> };
		const loc: P[] = Array.from({ length: r.size }, (_, j) => ({ fourier: false, v: j, phase: new Map() }));
		const order = reversed ? [...seg].reverse() : seg;
		for (const g of order) {
			const gv = gateAt(c, g);
			const qs = [...gv.controls, ...gv.targets].map((q) => q - r.offset);
			if (gv.kind === 'swap') [loc[qs[0]], loc[qs[1]]] = [loc[qs[1]], loc[qs[0]]];
			else if (gv.kind === 'h') {
				const p = loc[qs[0]];
				p.fourier = true;
				p.phase.set(p.v, { angle: dyadic(1n, 1), from: [[g, dyadic(1n, 1)]] });
			} else {
				const [a, b] = qs;
				const [cl, fo] = loc[a].fourier ? [loc[b], loc[a]] : [loc[a], loc[b]];
				const ang = reversed ? negateAngle(gv.angle!) : gv.angle!;
				const t = fo.phase.get(cl.v) ?? { angle: ZERO_ANGLE, from: [] };
				t.angle = addAngles(t.angle, ang);
				t.from.push([g, ang]);
				fo.phase.set(cl.v, t);
			}
		}
		const levels = loc.map((p) => p.v + 1);
		loc.forEach((p, j) => {
			const m = levels[j];
			for (let k = 0; k < r.size; k++) {
				const want = k < m ? dyadic(1n, m - k) : ZERO_ANGLE;
				const got = p.phase.get(k) ?? { angle: ZERO_ANGLE, from: [] };
				termsChecked++;
				const d = reduceSigned(subtractAngles(got.angle, want));
				if (!isZeroSigned(d))
					pushWrong(`${r.name}[${j}]`, `${r.name}[${k}] (starting bit)`, want, got.angle, got.from, where, d);
			}
		});
		const sorted = [...levels].sort((x, y) => x - y);
		if (sorted.some((m, i) => m !== i + 1)) throw new Outside(`the ${where === 'qft' ? 'QFT' : 'inverse QFT'} on ${r.name} gives levels ${levels.join(', ')}, not a permutation of 1..${r.size}`, seg[0]);
		return levels;
	};

	const pushWrong = (target: string, term: string, want: Angle, got: Angle, from: Contribution[], where: WrongTerm['where'], d: ReturnType<typeof reduceSigned>, neighbours: number[] = [], monomial: number[] | null = null) => {
		if (wrongTerms.length >= 500) return;
		const dA: Angle = d.exact ? dyadic(d.num, d.exp) : { exact: false, turns: d.turns - Math.floor(d.turns) };
		const same = (x: Angle, y: Angle) => isZeroSigned(reduceSigned(subtractAngles(x, y)), 1e-12);
		const gates = from.map(([g, a]) => {
			const exact = same(a, dA) || same(negateAngle(a), dA);
			return { gate: g, turns: formatTurns(reduceSigned(a)), explains: exact || same(scaleAngle(a, 2n), dA), exact };
		});
		wrongTerms.push({
			target,
			term,
			expectedTurns: formatTurns(reduceSigned(want)),
			actualTurns: formatTurns(reduceSigned(got)),
			gates,
			lines: [...new Set(from.map(([g]) => lineOf(g)).filter((l) => l > 0))],
			where,
			differenceTurns: formatTurns(d),
			neighbours,
			monomial
		});
	};

	/** Register value as an integer polynomial, from classical bits or a verified section value. */
	const valueOf = (r: PlacedRegister, g: number): IntPoly => {
		const st = state.slice(r.offset, r.offset + r.size);
		if (st.every((s, j) => s.kind === 'v' && s.reg === r.name && s.bit === j)) return regValue.get(r.name)!;
		const out: IntPoly = new Map();
		st.forEach((s, j) => {
			if (s.kind !== 'c') throw new Outside(`register ${r.name} enters a QFT with ${qname(r.offset + j)} not in a known basis state`, g);
			for (const [k, v] of anfToPoly(s.anf, g)) {
				const x = (out.get(k) ?? 0n) + (v << BigInt(j));
				if (x === 0n) out.delete(k);
				else out.set(k, x);
			}
		});
		return out;
	};
	const anfOf = (q: number, g: number, role: string): Anf => {
		const s = state[q];
		if (s.kind === 'c') return s.anf;
		if (s.kind === 'v') throw new Outside(`gate ${g} uses ${qname(q)} as a ${role} after an inverse QFT; the prover does not expand computed sums bit by bit`, g);
		throw new Outside(`gate ${g} uses ${qname(q)} as a ${role} while it is in the Fourier basis`, g);
	};
	const addPhase = (f: Extract<QState, { kind: 'f' }>, theta: Angle, factors: Anf[], g: number) => {
		let poly: IntPoly = new Map([['', 1n]]);
		for (const a of factors) poly = polyTimes(poly, anfToPoly(a, g), g);
		if (f.mask.size) {
			const m = anfToPoly(f.mask, g);
			const oneMinus: IntPoly = new Map([['', 1n]]);
			for (const [k, v] of m) oneMinus.set(k, (oneMinus.get(k) ?? 0n) - 2n * v);
			poly = polyTimes(poly, oneMinus, g);
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
	};
	const laterHadamardOn = (r: PlacedRegister, from: number): boolean => {
		for (let g = from; g < c.gateCount; g++) if (c.kinds[g] === GateCode.h && inRegister(c.qubitList[c.qubitStart[g]], r)) return true;
		return false;
	};

	try {
		for (let g = 0; g < c.gateCount; g++) {
			if (consumed[g]) continue;
			const k = c.kinds[g];
			const qs = qubitsOf(g);
			const nc = c.controlCounts[g];
			switch (k) {
				case GateCode.h: {
					const q = qs[0];
					const r = regOfQubit[q];
					const s = state[q];
					if (s.kind !== 'f') {
						const seg = findSegment(g, r, 'qft');
						const levels = probeSegment(seg, r, false, 'qft');
						const v = valueOf(r, g);
						for (const x of seg) consumed[x] = 1;
						for (let j = 0; j < r.size; j++) {
							const phase = new Map<string, PhaseTerm>();
							for (const [key, coef] of v) {
								const a = dyadic(coef, levels[j]);
								if (a.exact && a.num !== 0n) phase.set(key, { angle: a, from: [] });
							}
							state[r.offset + j] = { kind: 'f', phase, mask: new Map(), level: levels[j], reg: r.name };
						}
						sections.push({ register: r.name, qftGates: [seg[0], seg[seg.length - 1]], iqftGates: [-1, -1], levels, layout: layoutName(levels), required: 'spec' });
						if (wrongTerms.length) return finish('refuted');
					} else {
						const seg = findSegment(g, r, 'iqft');
						const levels = probeSegment(seg, r, true, 'iqft');
						if (wrongTerms.length) return finish('refuted');
						const sec = [...sections].reverse().find((x) => x.register === r.name && x.iqftGates[0] < 0);
						for (let j = 0; j < r.size; j++) {
							const st = state[r.offset + j];
							if (st.kind !== 'f' || st.reg !== r.name) throw new Outside(`the inverse QFT on ${r.name} at gate ${g} meets ${qname(r.offset + j)}, which is not a Fourier qubit of ${r.name}`, g);
							if (st.level !== levels[j]) {
								throw new Mismatch(
									`the QFT and the inverse QFT on ${r.name} are not exact inverses: ${qname(r.offset + j)} carries level ${st.level} but the inverse QFT expects level ${levels[j]} (qubit order / swaps differ)`,
									g
								);
							}
							if (st.mask.size) {
								const gates = [...st.mask.values()].flat();
								registerMismatches.push({ register: r.name, qubit: qname(r.offset + j), holds: `flipped by ${[...st.mask.keys()].map(termName).join(' ⊕ ')}`, expected: 'not flipped at the inverse QFT', gates, lines: gates.map(lineOf) });
							}
						}
						const last = !laterHadamardOn(r, seg[seg.length - 1] + 1);
						let want: IntPoly;
						if (last) {
							// The spec's value, or (no spec) the starting value: registers not named come back unchanged.
							want = goal.outputs.get(r.name) ?? (goal.inputs.has(r.name) ? registerPoly(r) : new Map());
						} else {
							// An intermediate section: infer the value from the top-level qubit (level n).
							if (sec) sec.required = 'inferred';
							const top = levels.indexOf(r.size);
							const st = state[r.offset + top] as Extract<QState, { kind: 'f' }>;
							want = new Map();
							for (const [key, t] of st.phase) {
								if (!t.angle.exact) throw new Outside(`the phase of ${qname(r.offset + top)} is inexact; the prover needs dyadic angles`, g);
								if (t.angle.num === 0n || t.angle.exp > r.size) continue; // a finer term is reported below
								want.set(key, t.angle.num << BigInt(r.size - t.angle.exp));
							}
						}
						for (let j = 0; j < r.size; j++) {
							const st = state[r.offset + j] as Extract<QState, { kind: 'f' }>;
							const m = st.level;
							const keys = new Set([...st.phase.keys(), ...want.keys()]);
							for (const key of keys) {
								termsChecked++;
								const expected = dyadic(want.get(key) ?? 0n, m);
								const got = st.phase.get(key) ?? { angle: ZERO_ANGLE, from: [] };
								const d = reduceSigned(subtractAngles(got.angle, expected));
								if (isZeroSigned(d)) continue;
								const near: number[] = [];
								if (got.from.length === 0) {
									for (let i = 0; i < r.size && near.length < 6; i++) {
										const o = state[r.offset + i];
										if (i !== j && o.kind === 'f') for (const [gg] of o.phase.get(key)?.from ?? []) if (near.length < 6) near.push(gg);
									}
									for (const t of st.phase.values()) for (const [gg] of t.from) if (near.length < 9 && !near.includes(gg)) near.push(gg);
								}
								pushWrong(qname(r.offset + j), termName(key), expected, got.angle, got.from, 'section', d, near, key === '' ? [] : key.split('.').map(Number));
							}
						}
						if (sec) sec.iqftGates = [seg[0], seg[seg.length - 1]];
						for (const x of seg) consumed[x] = 1;
						if (wrongTerms.length || registerMismatches.length) return finish('refuted');
						regValue.set(r.name, want);
						for (let j = 0; j < r.size; j++) state[r.offset + j] = { kind: 'v', reg: r.name, bit: j };
					}
					break;
				}
				case GateCode.x:
				case GateCode.cx:
				case GateCode.ccx:
				case GateCode.mcx: {
					const ctl = qs.slice(0, nc).map((q) => anfOf(q, g, 'control'));
					const t = state[qs[nc]];
					if (t.kind === 'c') anfXorProduct(t.anf, ctl, g);
					else if (t.kind === 'f') {
						if (!goal.ignorePhase) {
							// X^k on (|0⟩ + e^{iφ}|1⟩) adds k·φ to the global phase; φ = (1 − 2·mask)·(stored phase)
							let k: IntPoly = new Map([['', 1n]]);
							for (const a of ctl) k = polyTimes(k, anfToPoly(a, g), g);
							if (t.mask.size) {
								const oneMinus: IntPoly = new Map([['', 1n]]);
								for (const [key, v] of anfToPoly(t.mask, g)) oneMinus.set(key, (oneMinus.get(key) ?? 0n) - 2n * v);
								k = polyTimes(k, oneMinus, g);
							}
							for (const [key, term] of t.phase) {
								if (!term.angle.exact) throw new Outside(`gate ${g} flips ${qname(qs[nc])} whose phase is inexact`, g);
								const shifted: IntPoly = new Map();
								for (const [kk, v] of k) shifted.set(mulKeys(kk, key), (shifted.get(mulKeys(kk, key)) ?? 0n) + v);
								addGlobal(shifted, term.angle, g);
							}
						}
						anfXorProduct(t.mask, ctl, g);
					}
					else throw new Outside(`gate ${g} flips ${qname(qs[nc])} after an inverse QFT; the prover does not expand computed sums bit by bit`, g);
					break;
				}
				case GateCode.swap:
					[state[qs[0]], state[qs[1]]] = [state[qs[1]], state[qs[0]]];
					break;
				case GateCode.p:
				case GateCode.rz:
				case GateCode.cp:
				case GateCode.mcp: {
					const theta = c.angles[c.angleIndex[g]];
					const fs = qs.filter((q) => state[q].kind === 'f');
					if (fs.length > 1) throw new Outside(`gate ${g} couples ${fs.map(qname).join(' and ')}, two qubits in the Fourier basis (entangling)`, g);
					if (k === GateCode.rz && !goal.ignorePhase && qs.length > 1) throw new Outside(`gate ${g} is a controlled rz; the Fourier form handles rz without controls`, g);
					if (fs.length === 0) {
						// classical qubits only: a phase per basis input, θ·∏ bits, on the global phase
						if (!goal.ignorePhase) {
							let poly: IntPoly = new Map([['', 1n]]);
							for (const q of qs) poly = polyTimes(poly, anfToPoly(anfOf(q, g, 'qubit of a phase gate'), g), g);
							addGlobal(poly, theta, g);
						}
						break;
					}
					const f = state[fs[0]] as Extract<QState, { kind: 'f' }>;
					addPhase(f, theta, qs.filter((q) => q !== fs[0]).map((q) => anfOf(q, g, 'control of a phase')), g);
					break;
				}
				case GateCode.u:
					throw new Outside(`gate ${g} is a general single-qubit gate (u) on ${qname(qs[0])}; the prover handles h, x-type, swap and phase gates only`, g);
			}
		}
		// End: every register as required.
		for (let q = 0; q < c.qubitCount; q++) if (state[q].kind === 'f') throw new Outside(`${qname(q)} ends in the Fourier basis (no inverse QFT)`, c.gateCount - 1);
		for (const r of c.registers) {
			const st = state.slice(r.offset, r.offset + r.size);
			if (st.every((s, j) => s.kind === 'v' && s.reg === r.name && s.bit === j)) {
				const spec = goal.outputs.get(r.name);
				const want = spec ?? (goal.inputs.has(r.name) ? registerPoly(r) : new Map());
				const got = regValue.get(r.name)!;
				if (!polyEqualMod(got, want, r.size)) {
					registerMismatches.push({ register: r.name, qubit: `${r.name}[*]`, holds: polyText(got, termName), expected: polyText(want, termName), gates: [], lines: [] });
				}
				continue;
			}
			if (st.some((s) => s.kind !== 'c')) throw new Outside(`register ${r.name} ends partly moved to other positions; the prover cannot compare it`, c.gateCount - 1);
			const spec = goal.outputs.get(r.name);
			if (spec) {
				const got = valueOf(r, c.gateCount - 1);
				if (!polyEqualMod(got, spec, r.size))
					registerMismatches.push({ register: r.name, qubit: `${r.name}[*]`, holds: polyText(got, termName), expected: polyText(spec, termName), gates: [], lines: [] });
				continue;
			}
			st.forEach((s, j) => {
				const q = r.offset + j;
				const anf = (s as Extract<QState, { kind: 'c' }>).anf;
				const wantKey = goal.inputs.has(r.name) ? String(q) : null;
				const extra = [...anf.keys()].filter((key) => key !== wantKey);
				const missing = wantKey !== null && !anf.has(wantKey);
				if (extra.length || missing) {
					const gates = extra.flatMap((key) => anf.get(key)!);
					registerMismatches.push({
						register: r.name,
						qubit: qname(q),
						holds: anf.size ? [...anf.keys()].map(termName).join(' ⊕ ') : '0',
						expected: wantKey !== null ? qname(q) + ' (unchanged)' : '0',
						gates,
						lines: [...new Set(gates.map(lineOf))]
					});
				}
			});
		}
		for (const [key, t] of global) {
			termsChecked++;
			const d = reduceSigned(t.angle);
			if (isZeroSigned(d)) continue;
			if (!d.exact) throw new Outside(`the global phase holds an inexact term on ${termName(key)}`, c.gateCount - 1);
			pushWrong('global phase', termName(key), ZERO_ANGLE, t.angle, t.from, 'phase', d, [], key.split('.').map(Number));
		}
		return finish(wrongTerms.length || registerMismatches.length ? 'refuted' : 'proved');
	} catch (e) {
		if (e instanceof Mismatch) {
			registerMismatches.push({ register: '', qubit: '', holds: e.message, expected: 'matching levels', gates: [e.gate], lines: [lineOf(e.gate)] });
			return { status: 'refuted', reason: e.message, atGate: e.gate, sections, wrongTerms, registerMismatches, termsChecked };
		}
		if (e instanceof Outside) return { status: 'outside', reason: e.message, atGate: e.gate, sections, wrongTerms, registerMismatches, termsChecked };
		throw e;
	}

	function finish(status: ProofResult['status']): ProofResult {
		return { status, sections, wrongTerms, registerMismatches, termsChecked };
	}
}

class Mismatch extends Error {
	constructor(
		message: string,
		readonly gate: number
	) {
		super(message);
	}
}

function layoutName(levels: number[]): SectionInfo['layout'] {
	const n = levels.length;
	if (levels.every((m, i) => m === i + 1)) return 'unswapped';
	if (levels.every((m, i) => m === n - i)) return 'swapped';
	return 'permuted';
}

function polyEqualMod(a: IntPoly, b: IntPoly, bits: number): boolean {
	const m = 1n << BigInt(bits);
	const keys = new Set([...a.keys(), ...b.keys()]);
	for (const k of keys) if (((a.get(k) ?? 0n) - (b.get(k) ?? 0n)) % m !== 0n) return false;
	return true;
}

function polyText(p: IntPoly, name: (k: string) => string): string {
	if (p.size === 0) return '0';
	const parts = [...p].slice(0, 8).map(([k, v]) => (k === '' ? String(v) : `${v === 1n ? '' : `${v}·`}${name(k)}`));
	return parts.join(' + ') + (p.size > 8 ? ` + … (${p.size} terms)` : '');
}
