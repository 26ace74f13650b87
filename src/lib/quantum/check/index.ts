/**
 * Checking circuits against specs: sweep (every or sampled basis input, exact ledger / amplitude
 * engines), proof (Fourier form, all inputs at once), suspects and resource counts, combined into
 * one report. Pure: used by the command line, the web app and its worker alike.
 *
 * Qubit order: register value Σ bit_i·2^i (index 0 = LSB); angles in turns.
 */
import type { LoweredCircuit, PlacedRegister } from '../circuit.js';
import { parseSpec, parseCondition, specPolynomial, evaluateSpec, type IntPoly, type Spec } from './spec.js';
import { proveCircuit, type ProofResult, type WrongTerm } from './proof.js';
import { sweepCircuit, type InputChoice, type SweepCase } from './sweep.js';
import { findSuspects, type Suspect } from './suspects.js';
import { countResources, type ResourceCounts } from './resources.js';

export { parseSpec, SpecError, evaluateSpec, parseCondition, satisfiesConditions } from './spec.js';
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
	/** Domain conditions (the document's `assume`): only inputs satisfying all of them are checked. */
	assume?: string[];
}

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
	suspects: { line: number | null; definitionLines: number[]; gate: number; kind: string; qubit: string; reason: string }[];
	proof: { status: ProofResult['status'] | 'skipped'; reason: string | null; sections: ProofResult['sections']; termsChecked: number; registerMismatches: ProofResult['registerMismatches'] };
	specs: string[];
	inputs: { registers: string[]; bits: number };
	/** The domain checked: its conditions and how many inputs of it ran (all of them when exhaustive). */
	domain: { conditions: string[]; inputs: number };
	engines: { ledger: number; amplitudes: number };
	resources: ResourceCounts;
	notes: string[];
}

/** Möbius inversion of a function over input bits into an integer multilinear polynomial (≤ 20 bits). */
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

/**
 * Check a lowered circuit against spec texts (`p = a*b mod 2^8`, …). Throws SpecError for an
 * unusable spec. Simulated, not a hardware run.
 */
export function checkCircuit(c: LoweredCircuit, specTexts: string[], options: CheckOptions = {}): CheckReport {
	if (specTexts.length === 0) throw new RangeError('at least one spec is needed, e.g. "b = a + b mod 8"');
	const specs = specTexts.map((t) => parseSpec(t, c.registers));
	const domain = (options.assume ?? []).map((t) => parseCondition(t, c.registers));
	const outs = new Set<string>();
	for (const s of specs) {
		if (outs.has(s.out)) throw new RangeError(`two specs name register ${s.out}`);
		outs.add(s.out);
	}
	const notes: string[] = ['simulated, not a hardware run'];
	const inputNames = new Set([...specs.flatMap((s) => s.reads), ...domain.flatMap((d) => d.reads)]);
	const inputs = c.registers.filter((r) => inputNames.has(r.name));
	const zeros = c.registers.filter((r) => !inputNames.has(r.name)).map((r) => r.name);
	if (zeros.length) notes.push(`registers starting at 0: ${zeros.join(', ')}`);
	const choice: InputChoice = options.inputs ?? { mode: 'auto', sample: 1000, seed: 1 };
	const sweep = sweepCircuit(c, specs, { choice, maxAmplitudeQubits: options.maxAmplitudeQubits, onProgress: options.onProgress, domain });
	if (!sweep.exhaustive) notes.push(choice.mode === 'given' ? 'one given input' : `random sample of ${sweep.cases} inputs (seeded)${domain.length ? ' inside the domain' : ''}`);
	if (domain.length) notes.push(`domain: ${domain.map((d) => d.text).join(' and ')}${sweep.exhaustive ? ` (${sweep.cases} of ${2 ** sweep.inputBits} basis inputs)` : ''}`);

	let proof: ProofResult | null = null;
	let proofReason: string | null = null;
	if (options.proof !== false) {
		const outputs = new Map<string, IntPoly>();
		for (const s of specs) {
			const p = specPolynomial(s, c.registers, inputNames) ?? mobiusPolynomial(s, inputs);
			if (!p) {
				proofReason = `spec "${s.text}" is not a polynomial in the inputs and they have more than 16 bits; only a sweep ran`;
				break;
			}
			outputs.set(s.out, p);
		}
		if (!proofReason && domain.length) proofReason = 'the prover here does not take domain conditions yet; only the sweep over the domain ran';
		if (!proofReason) {
			proof = proveCircuit(c, { inputs: inputNames, outputs });
			if (proof.status === 'outside') proofReason = `outside the Fourier form at gate ${proof.atGate}: ${proof.reason}; only a sweep ran`;
			else if (proof.sections.length === 0) notes.push('no QFT section found; the proof tracked the classical gates only');
		}
		if (proofReason) notes.push(proofReason);
	}
	const proved = proof && proof.status !== 'outside';
	if (proved && (proof!.status === 'proved') !== (sweep.failed === 0) && sweep.exhaustive)
		notes.push('warning: proof and exhaustive sweep disagree; please report this circuit');
	const suspects: Suspect[] = sweep.failed || (proof && proof.status === 'refuted') ? findSuspects(c, proof, sweep.failures) : [];
	const ok = sweep.failed === 0 && !(proof && proof.status === 'refuted');
	return {
		ok,
		method: proved ? 'sweep+proof' : 'sweep',
		cases: sweep.cases,
		failed: sweep.failed,
		exhaustive: sweep.exhaustive,
		worstSuccessProbability: sweep.worstSuccessProbability,
		failures: sweep.failures,
		wrongTerms: (proof?.wrongTerms ?? []).slice(0, 100).map((w) => ({ target: w.target, term: w.term, expectedTurns: w.expectedTurns, actualTurns: w.actualTurns, lines: w.lines, where: w.where, differenceTurns: w.differenceTurns, gates: w.gates.map((x) => x.gate) })),
		suspects: suspects.map((s) => ({
			line: s.line,
			definitionLines: options.definitionLines?.get(c.itemIds[c.itemOf[s.gate]]) ?? [],
			gate: s.gate,
			kind: s.kind,
			qubit: s.qubit,
			reason: s.reason
		})),
		proof: {
			status: proof ? proof.status : 'skipped',
			reason: proof?.reason ?? proofReason,
			sections: proof?.sections ?? [],
			termsChecked: proof?.termsChecked ?? 0,
			registerMismatches: proof?.registerMismatches ?? []
		},
		specs: specs.map((s) => s.text),
		inputs: { registers: sweep.inputRegisters, bits: sweep.inputBits },
		domain: { conditions: domain.map((d) => d.text), inputs: sweep.cases },
		engines: sweep.engines,
		resources: countResources(c),
		notes
	};
}
