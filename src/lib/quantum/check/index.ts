/**
 * Checking circuits against specs: sweep (every or sampled basis input, exact ledger / amplitude
 * engines), proof (Fourier form, all inputs at once), suspects and resource counts, combined into
 * one report. Pure: used by the command line, the web app and its worker alike.
 *
 * Qubit order: register value Σ bit_i·2^i (index 0 = LSB); angles in turns.
 */
import type { LoweredCircuit, PlacedRegister } from '../circuit.js';
import { parseSpec, parseCondition, specPolynomial, evaluateSpec, type Condition, type IntPoly, type Spec } from './spec.js';
import { proveCircuit, type ProofResult, type WrongTerm } from './proof.js';
import { sweepCircuit, type InputChoice, type SweepCase, type SweepResult } from './sweep.js';
import { symbolicProve, inputOrder, inputWords, assignmentValues, type BitMismatch, type PhaseTerm, type SymbolicLimits, type SymbolicResult } from './symbolic.js';
import { Bdd, BddLimit, TRUE, WordOps, WordUnsupported } from './bdd.js';
import { compileNode } from './spec-words.js';
import { findSuspects, type Suspect } from './suspects.js';
import { countResources, type ResourceCounts } from './resources.js';

export { parseSpec, SpecError, evaluateSpec, parseCondition, satisfiesConditions } from './spec.js';
export { symbolicProve, DEFAULT_SYMBOLIC_LIMITS } from './symbolic.js';
export type { SymbolicResult, SymbolicLimits, BitMismatch, PhaseTerm } from './symbolic.js';
export { proveCircuit } from './proof.js';
export { sweepCircuit, createRng } from './sweep.js';
export { countResources } from './resources.js';
export { findSuspects } from './suspects.js';
export type { Spec } from './spec.js';
export type { ProofResult, WrongTerm } from './proof.js';
export type { SweepCase, SweepResult, InputChoice } from './sweep.js';
export type { Suspect } from './suspects.js';
export type { ResourceCounts } from './resources.js';

/** Options of {@link checkCircuit}. */
export interface CheckOptions {
	inputs?: InputChoice;
	/** Run the prover (default true). */
	proof?: boolean;
	maxAmplitudeQubits?: number;
	onProgress?: (done: number, total: number) => void;
	/** For imported files: body item id → lines of the `gate` definitions it went through (suspects then name them too). */
	definitionLines?: Map<string, number[]>;
	/** Domain conditions over the input registers (`b < 13`); the checks cover only inputs meeting all of them. */
	assume?: string[];
	/** Compare values only; by default the global phase must be the same for every input too. */
	ignorePhase?: boolean;
	/** Bounds of the general prover (decision-diagram nodes, milliseconds). */
	proofLimits?: Partial<SymbolicLimits>;
}

/** Proof verdicts: right for every domain input; wrong, with a confirmed input; or not decided, with the reason. */
export type ProofStatus = 'proved' | 'refuted' | 'undecided' | 'skipped';

/** The report `check --json` prints (stable field names). */
export interface CheckReport {
	ok: boolean;
	method: 'sweep' | 'proof' | 'sweep+proof';
	cases: number;
	failed: number;
	exhaustive: boolean;
	worstSuccessProbability: number;
	failures: SweepCase[];
	wrongTerms: (Omit<WrongTerm, 'gates' | 'neighbours'> & { gates: number[] })[];
	suspects: { line: number | null; definitionLines: number[]; gate: number; kind: string; name: string; qubit: string; reason: string }[];
	proof: {
		status: ProofStatus;
		/** Which prover decided: the Fourier-form prover (polynomial phases) or the general symbolic one (decision diagrams). */
		prover: 'fourier' | 'symbolic' | null;
		/** One sentence for people: what the verdict means. */
		summary: string;
		reason: string | null;
		/** What stopped an undecided proof. */
		limit: SymbolicResult['limit'];
		/** A failing input found by the prover and confirmed by running the engines on it. */
		counterexample: Record<string, string> | null;
		/** For a phase failure: a second input whose phase differs from the counterexample's. */
		counterexamplePartner: Record<string, string> | null;
		bitMismatches: BitMismatch[];
		phaseTerms: PhaseTerm[];
		sections: ProofResult['sections'];
		termsChecked: number;
		registerMismatches: ProofResult['registerMismatches'];
		stats: { gates: number; nodes: number; ms: number };
	};
	/** The inputs the checks cover: the conditions, how many inputs of the domain the sweep ran, and the exact size of the domain among all basis inputs. */
	domain: { conditions: string[]; inputs: number; count: string; total: string };
	phases: 'checked' | 'ignored';
	/** The global phase every passing input must share (that of the first passing input swept), or null. */
	phaseReference: string | null;
	specs: string[];
	inputs: { registers: string[]; bits: number };
	engines: { ledger: number; amplitudes: number };
	resources: ResourceCounts;
	notes: string[];
}

/** Möbius inversion of a function over input bits into an integer multilinear polynomial (≤ 16 bits). */
function mobiusPolynomial(spec: Spec, inputs: PlacedRegister[]): IntPoly | null {
	const vars: number[] = inputs.flatMap((r) => Array.from({ length: r.size }, (_, i) => r.offset + i));
	if (vars.length > 16) return null;
	const n = vars.length;
	const f: bigint[] = new Array(1 << n);
	for (let mask = 0; mask < 1 << n; mask++) {
		const values = new Map<string, bigint>();
		let bit = 0;
		for (const r of inputs) {
			let v = 0n;
			for (let i = 0; i < r.size; i++, bit++) if (mask & (1 << bit)) v |= 1n << BigInt(i);
			values.set(r.name, v);
		}
		f[mask] = evaluateSpec(spec, values);
	}
	for (let i = 0; i < n; i++) for (let mask = 0; mask < 1 << n; mask++) if (mask & (1 << i)) f[mask] -= f[mask ^ (1 << i)];
	const out: IntPoly = new Map();
	for (let mask = 0; mask < 1 << n; mask++)
		if (f[mask] !== 0n) {
			const key: number[] = [];
			for (let i = 0; i < n; i++) if (mask & (1 << i)) key.push(vars[i]);
			out.set(key.join('.'), f[mask]);
		}
	return out;
}

/** The domain for the sweep: exact count and uniform sampling from a decision diagram, membership by evaluation. */
interface Domain {
	conditions: string[];
	sample: (rand32: () => number) => Map<string, bigint> | null;
	count: bigint;
	total: bigint;
}
function buildDomain(c: LoweredCircuit, conditions: Condition[], inputNames: string[]): Domain {
	const order = inputOrder(c.registers, inputNames);
	const total = 1n << BigInt(order.size);
	if (conditions.length === 0) return { conditions: [], sample: () => null, count: total, total };
	const bdd = new Bdd(order.size, { maxNodes: 1_000_000 });
	const ops = new WordOps(bdd);
	const env = inputWords(bdd, ops, c.registers, order);
	let dom = TRUE;
	try {
		for (const x of conditions) dom = bdd.and(dom, ops.truthy(compileNode(x.expr, env, ops)));
	} catch (e) {
		if (!(e instanceof BddLimit || e instanceof WordUnsupported)) throw e;
		throw new RangeError(`the domain ${conditions.map((x) => `"${x.text}"`).join(' and ')} cannot be built: ${e.message}`, { cause: e });
	}
	const memo = new Map<number, bigint>();
	const count = bdd.satCount(dom, memo);
	const sample = (rand32: () => number) => {
		const a = bdd.sampleSat(dom, rand32, memo);
		if (!a) return null;
		const v = assignmentValues(a, c.registers, order, inputNames);
		return new Map(Object.entries(v).map(([k, x]) => [k, BigInt(x)]));
	};
	return { conditions: conditions.map((x) => x.text), sample, count, total };
}

const toValues = (o: Record<string, string>) => new Map(Object.entries(o).map(([k, v]) => [k, BigInt(v)]));

/**
 * Check a lowered circuit against spec texts (`p = a*b mod 2^8`, …) over the inputs of the domain
 * (`assume`), values and the global phase (unless `ignorePhase`). Throws SpecError for an unusable
 * spec or condition. The verdict comes from a proof where one decides, always confirmed on a
 * concrete input by the engines when it is `refuted`; the sweep runs beside it. Simulated, not a
 * hardware run.
 */
export function checkCircuit(c: LoweredCircuit, specTexts: string[], options: CheckOptions = {}): CheckReport {
	if (specTexts.length === 0) throw new RangeError('at least one spec is needed, e.g. "b = a + b mod 8"');
	const specs = specTexts.map((t) => parseSpec(t, c.registers));
	const outs = new Set<string>();
	for (const s of specs) {
		if (outs.has(s.out)) throw new RangeError(`two specs name register ${s.out}`);
		outs.add(s.out);
	}
	const conditions = (options.assume ?? []).filter((t) => t.trim() !== '').map((t) => parseCondition(t, c.registers));
	const ignorePhase = options.ignorePhase === true;
	const notes: string[] = ['simulated, not a hardware run'];
	const inputNames = new Set([...specs.flatMap((s) => s.reads), ...conditions.flatMap((x) => x.reads)]);
	const inputList = c.registers.filter((r) => inputNames.has(r.name)).map((r) => r.name);
	const inputs = c.registers.filter((r) => inputNames.has(r.name));
	const zeros = c.registers.filter((r) => !inputNames.has(r.name)).map((r) => r.name);
	if (zeros.length) notes.push(`registers starting at 0: ${zeros.join(', ')}`);
	const domain = buildDomain(c, conditions, inputList);
	if (conditions.length) notes.push(`domain: ${domain.conditions.join(' and ')} (${domain.count} of ${domain.total} basis inputs)`);
	if (ignorePhase) notes.push('phases ignored: values only (--ignore-phase)');
	const choice: InputChoice = options.inputs ?? { mode: 'auto', sample: 1000, seed: 1 };
	const sweep = sweepCircuit(c, specs, { choice, maxAmplitudeQubits: options.maxAmplitudeQubits, onProgress: options.onProgress, domain: conditions, sampler: domain.sample, ignorePhase, inputs: inputList });
	if (!sweep.exhaustive)
		notes.push(
			choice.mode === 'given'
				? 'one given input'
				: choice.mode === 'range'
					? `inputs ${choice.start} to ${choice.end - 1} of 2^${sweep.inputBits} (one part of an exhaustive sweep)${conditions.length ? ', those inside the domain' : ''}`
					: `random sample of ${sweep.cases} inputs (seeded)${conditions.length ? ' inside the domain' : ''}`
		);
	if (sweep.failures.some((f) => f.reason === 'phase')) notes.push(`some inputs end with the right value but a different global phase than the first input (${sweep.phaseReference})`);

	const replay = (list: Record<string, string>[]): SweepResult =>
		sweepCircuit(c, specs, { choice: { mode: 'list', values: list.map(toValues) }, maxAmplitudeQubits: options.maxAmplitudeQubits, ignorePhase, inputs: inputList, keepFailures: list.length });

	const proof: CheckReport['proof'] = { status: 'skipped', prover: null, summary: 'no proof was asked for', reason: null, limit: null, counterexample: null, counterexamplePartner: null, bitMismatches: [], phaseTerms: [], sections: [], termsChecked: 0, registerMismatches: [], stats: { gates: 0, nodes: 0, ms: 0 } };
	let fourier: ProofResult | null = null;
	if (options.proof !== false) {
		const t0 = Date.now();
		// 1. The Fourier-form prover (polynomial phases: multipliers of any width), over every input.
		if (conditions.length === 0) {
			const outputs = new Map<string, IntPoly>();
			let polynomial = true;
			for (const s of specs) {
				const p = specPolynomial(s, c.registers, inputNames) ?? mobiusPolynomial(s, inputs);
				if (!p) {
					polynomial = false;
					break;
				}
				outputs.set(s.out, p);
			}
			if (polynomial) fourier = proveCircuit(c, { inputs: inputNames, outputs, ignorePhase });
		}
		proof.sections = fourier?.sections ?? [];
		proof.termsChecked = fourier?.termsChecked ?? 0;
		if (fourier?.status === 'proved') {
			proof.status = 'proved';
			proof.prover = 'fourier';
		} else if (fourier?.status === 'refuted') {
			proof.registerMismatches = fourier.registerMismatches;
			// a concrete input: the smallest wrong monomial's bits set (its coefficient is then the whole difference)
			const candidates: Record<string, string>[] = [];
			const fromBits = (bits: number[]) => {
				const v: Record<string, string> = {};
				for (const r of inputs) {
					let x = 0n;
					for (const q of bits) if (q >= r.offset && q < r.offset + r.size) x |= 1n << BigInt(q - r.offset);
					v[r.name] = x.toString();
				}
				return v;
			};
			const phaseTerm = fourier.wrongTerms.filter((w) => w.where === 'phase' && w.monomial).sort((a, b) => a.monomial!.length - b.monomial!.length)[0];
			if (phaseTerm) {
				const pair = replay([fromBits([]), fromBits(phaseTerm.monomial!)]);
				if (pair.failed) {
					proof.counterexample = fromBits(phaseTerm.monomial!);
					proof.counterexamplePartner = fromBits([]);
				}
			}
			if (!proof.counterexample) {
				const byTarget = new Map<string, number[]>();
				for (const w of fourier.wrongTerms) if (w.monomial && w.where === 'section' && (!byTarget.has(w.target) || byTarget.get(w.target)!.length > w.monomial.length)) byTarget.set(w.target, w.monomial);
				for (const m of byTarget.values()) candidates.push(fromBits(m));
				for (const f of sweep.failures) if (f.reason !== 'phase') candidates.push(f.input);
				for (const cand of candidates.slice(0, 20)) {
					if (replay([cand]).failed) {
						proof.counterexample = cand;
						break;
					}
				}
			}
			if (proof.counterexample) {
				proof.status = 'refuted';
				proof.prover = 'fourier';
				proof.reason = fourier.reason ?? null;
			}
		}
		// 2. The general prover: any gates, domains, decision diagrams.
		if (proof.status === 'skipped') {
			const sym = symbolicProve(c, { specs, conditions, inputs: inputList, ignorePhase, limits: options.proofLimits });
			proof.prover = 'symbolic';
			proof.stats = { gates: sym.gatesDone, nodes: sym.nodes, ms: 0 };
			proof.bitMismatches = sym.mismatches;
			proof.phaseTerms = sym.phaseTerms;
			proof.limit = sym.limit;
			if (sym.status === 'proved') proof.status = 'proved';
			else if (sym.status === 'refuted' || sym.limit === 'not-basis') {
				// confirm on the engines: the prover's input must fail when run
				if (sym.phaseWitness) {
					const [a, b] = sym.phaseWitness.inputs;
					if (replay([a, b]).failed) {
						proof.counterexample = b;
						proof.counterexamplePartner = a;
					}
				}
				for (const cand of sym.counterexamples) {
					if (proof.counterexample) break;
					if (replay([cand]).failed) proof.counterexample = cand;
				}
				if (proof.counterexample) {
					proof.status = 'refuted';
					if (sym.status !== 'refuted') proof.reason = sym.reason;
				} else {
					proof.status = 'undecided';
					proof.reason = sym.status === 'refuted' ? 'the prover found a failing input but the engines do not confirm it; please report this circuit' : sym.reason;
				}
			} else {
				proof.status = 'undecided';
				proof.reason = sym.reason;
			}
			if (fourier?.status === 'outside') notes.push(`Fourier form: ${fourier.reason} (gate ${fourier.atGate}); the general prover ran instead`);
		}
		proof.stats.ms = Date.now() - t0;
		if (proof.status === 'proved' && sweep.failed) {
			// never both: a disagreement is a bug in one of them, and "proved" must not stand on it
			proof.status = 'undecided';
			proof.reason = 'the proof and the sweep disagree; please report this circuit';
		}
		if (proof.status === 'refuted' && !proof.counterexample) proof.status = 'undecided';
		proof.summary = summarize(proof, domain.count, conditions.length > 0, ignorePhase);
	}
	const suspects: Suspect[] = sweep.failed || proof.status === 'refuted' ? findSuspects(c, fourier?.status === 'refuted' ? fourier : null, sweep.failures) : [];
	const wrongTerms = fourier?.status === 'refuted' && proof.prover === 'fourier' ? fourier.wrongTerms : [];
	const ok = sweep.failed === 0 && proof.status !== 'refuted';
	return {
		ok,
		method: proof.status === 'proved' || proof.status === 'refuted' ? 'sweep+proof' : 'sweep',
		cases: sweep.cases,
		failed: sweep.failed,
		exhaustive: sweep.exhaustive,
		worstSuccessProbability: sweep.worstSuccessProbability,
		failures: sweep.failures,
		wrongTerms: wrongTerms.slice(0, 100).map((w) => ({ target: w.target, term: w.term, expectedTurns: w.expectedTurns, actualTurns: w.actualTurns, lines: w.lines, where: w.where, differenceTurns: w.differenceTurns, monomial: w.monomial ?? null, gates: w.gates.map((x) => x.gate) })),
		suspects: suspects.map((s) => ({
			line: s.line,
			definitionLines: options.definitionLines?.get(c.itemIds[c.itemOf[s.gate]]) ?? [],
			gate: s.gate,
			kind: s.kind,
			name: s.name,
			qubit: s.qubit,
			reason: s.reason
		})),
		proof,
		domain: { conditions: domain.conditions, inputs: sweep.cases, count: domain.count.toString(), total: domain.total.toString() },
		phases: ignorePhase ? 'ignored' : 'checked',
		phaseReference: sweep.phaseReference,
		specs: specs.map((s) => s.text),
		inputs: { registers: sweep.inputRegisters, bits: sweep.inputBits },
		engines: sweep.engines,
		resources: countResources(c),
		notes
	};
}

const show = (o: Record<string, string>) => Object.entries(o).map(([k, v]) => `${k}=${v}`).join(', ');

/** The verdict in a sentence a user understands. */
function summarize(p: CheckReport['proof'], count: bigint, restricted: boolean, ignorePhase: boolean): string {
	const over = restricted ? `every one of the ${count} inputs of the domain` : `every one of the ${count} inputs`;
	const what = ignorePhase ? 'values' : 'values and phase';
	if (p.status === 'proved') return `Proved: right for ${over} (${what}), not just the inputs tried.`;
	if (p.status === 'refuted') {
		const phase = p.counterexamplePartner ? ` ends with a different phase than ${show(p.counterexamplePartner)}` : ' gives a wrong result';
		return `Refuted: input ${show(p.counterexample!)}${phase} (found by the prover, confirmed by running it).`;
	}
	if (p.status === 'undecided') return `Undecided: the prover could not settle it${p.limit === 'nodes' || p.limit === 'time' ? ' within its limit' : ''}: ${p.reason ?? 'no reason given'}. The sweep result stands on its own.`;
	return 'No proof was asked for.';
}
