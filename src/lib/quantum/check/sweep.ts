/**
 * Sweep: run the circuit on basis inputs and give, per input, the probability that every register
 * ends with the value its spec requires (unchanged / 0 for registers no spec names). The exact
 * ledger engine runs while it can; when a gate would entangle, the state is handed to the
 * amplitude engine for the rest of that input. Simulated, not a hardware run.
 *
 * Qubit order: register value Σ bit_i·2^i, flat qubit = offset + index. Probabilities are floats
 * (exactly 0 or 1 when every qubit ends classical in the ledger).
 */
import { applyLedgerGate, buildLedgerTables, createLedgerState, LedgerKind, ledgerGlobalPhase, ledgerProbabilityOne, ledgerToAmplitudes } from '../ledger.js';
import { addAngles, anglesEqual, floatTurns, formatTurns, reduceSigned, type Angle } from '../angle.js';
import { applyLoweredGates, buildGateTables, AMPLITUDE_QUBIT_LIMITS, type ResetFailure } from '../amplitudes.js';
import type { LoweredCircuit, PlacedRegister } from '../circuit.js';
import { resetFailureView, type ResetFailureView } from '../reset-claim.js';
import { evaluateSpec, satisfiesConditions, type Condition, type Spec } from './spec.js';

/**
 * Which inputs to run: every basis input, a seeded random sample, given values (one or a list), or
 * the basis inputs with index in [start, end) (one shard of an exhaustive sweep; index bits are the
 * input registers' bits in register order, LSB first, exactly as `all` enumerates them).
 */
export type InputChoice =
	| { mode: 'all' }
	| { mode: 'range'; start: number; end: number }
	| { mode: 'random'; count: number; seed: number }
	| { mode: 'given'; values: Map<string, bigint> }
	| { mode: 'list'; values: Map<string, bigint>[] }
	| { mode: 'auto'; sample: number; seed: number };

/** One input's outcome; values are decimal strings (registers may be wider than 53 bits). */
export interface SweepCase {
	input: Record<string, string>;
	expected: Record<string, string>;
	got: Record<string, string>;
	probability: number;
	engine: 'ledger' | 'amplitudes';
	/** Global phase of the output for this input (turns), on a phase failure. */
	phase?: string;
	/**
	 * Why it fails: the value; (value right) a global phase different from the first input's; or a
	 * reset whose claim "this qubit is |0⟩ here" failed (checked first: the run is wrong from there).
	 */
	reason?: 'value' | 'phase' | 'reset';
	/** On a reset failure: the gate, its source line, the qubit and the probability of finding it 1 there. */
	reset?: ResetFailureView;
}

/** Result of {@link sweepCircuit}. */
export interface SweepResult {
	cases: number;
	failed: number;
	exhaustive: boolean;
	worstSuccessProbability: number;
	worstInput: Record<string, string> | null;
	failures: SweepCase[];
	engines: { ledger: number; amplitudes: number };
	inputRegisters: string[];
	inputBits: number;
	/** The domain conditions the inputs satisfied (empty: every basis input). */
	domain: string[];
	/** Inputs drawn but outside the domain (skipped). */
	outsideDomain: number;
	/** The phase every passing input must share (that of the first one), unless phases are ignored. */
	phaseReference: string | null;
}

/** Options of {@link sweepCircuit}. */
export interface SweepOptions {
	choice: InputChoice;
	/** Most failures kept in the result (default 20). */
	keepFailures?: number;
	maxAmplitudeQubits?: number;
	/** Inputs with at most this many bits together are swept exhaustively in `auto` mode (default 16). */
	exhaustiveBits?: number;
	onProgress?: (done: number, total: number) => void;
	/** Domain: only inputs satisfying every condition are run (and counted). */
	domain?: Condition[];
	/** Random sampling inside a domain tries at most this many inputs per wanted case (default 64). */
	rejectionFactor?: number;
	/** A uniform sampler of the domain (from its decision diagram); used instead of rejection when given. */
	sampler?: (rand32: () => number) => Map<string, bigint> | null;
	/** Compare values only (default: values and the global phase). */
	ignorePhase?: boolean;
	/** More input registers (beyond those the specs and conditions read). */
	inputs?: string[];
}

/** A small seeded PRNG (splitmix32); 32-bit outputs. */
export function createRng(seed: number): () => number {
	let s = seed >>> 0;
	return () => {
		s = (s + 0x9e3779b9) >>> 0;
		let z = s;
		z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
		z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
		return (z ^ (z >>> 16)) >>> 0;
	};
}

function randomBits(rng: () => number, bits: number): bigint {
	let v = 0n;
	for (let i = 0; i < bits; i += 32) v |= BigInt(rng()) << BigInt(i);
	return v & ((1n << BigInt(bits)) - 1n);
}

/** Tolerance below 1 at which an input counts as failing. */
export const SUCCESS_TOLERANCE = 1e-9;

/**
 * Sweep the circuit against `specs`. Input registers are those the specs read; every other
 * register starts at 0 and must end at 0 unless a spec names it.
 */
export function sweepCircuit(c: LoweredCircuit, specs: Spec[], options: SweepOptions): SweepResult {
	const domain = options.domain ?? [];
	const inputNames = [...new Set([...specs.flatMap((s) => s.reads), ...domain.flatMap((d) => d.reads), ...(options.inputs ?? [])])];
	const inputs = c.registers.filter((r) => inputNames.includes(r.name));
	const bits = inputs.reduce((s, r) => s + r.size, 0);
	const keep = options.keepFailures ?? 20;
	const maxAmp = options.maxAmplitudeQubits ?? AMPLITUDE_QUBIT_LIMITS.server;
	const lt = buildLedgerTables(c);
	let gt: ReturnType<typeof buildGateTables> | null = null;
	const specByOut = new Map(specs.map((s) => [s.out, s]));
	const result: SweepResult = { cases: 0, failed: 0, exhaustive: false, worstSuccessProbability: 1, worstInput: null, failures: [], engines: { ledger: 0, amplitudes: 0 }, inputRegisters: inputs.map((r) => r.name), inputBits: bits, domain: domain.map((d) => d.text), outsideDomain: 0, phaseReference: null };
	let reference: Angle | null = null;

	let choice = options.choice;
	if (choice.mode === 'auto') choice = bits <= (options.exhaustiveBits ?? 16) ? { mode: 'all' } : { mode: 'random', count: choice.sample, seed: choice.seed };
	let total: number;
	let next: (i: number) => Map<string, bigint>;
	if (choice.mode === 'given') {
		const given = choice.values;
		total = 1;
		next = () => {
			const m = new Map<string, bigint>();
			for (const r of c.registers) m.set(r.name, given.get(r.name) ?? 0n);
			return m;
		};
	} else if (choice.mode === 'list') {
		const list = choice.values;
		total = list.length;
		next = (i) => {
			const m = new Map<string, bigint>();
			for (const r of c.registers) m.set(r.name, list[i].get(r.name) ?? 0n);
			return m;
		};
	} else if (choice.mode === 'all' || choice.mode === 'range') {
		let first = 0;
		if (choice.mode === 'all') {
			if (bits > 24) throw new RangeError(`an exhaustive sweep over ${bits} input bits is too large (2^${bits} inputs); use random:N`);
			total = 2 ** bits;
			result.exhaustive = true;
		} else {
			const { start, end } = choice;
			if (!Number.isSafeInteger(start) || !Number.isSafeInteger(end) || start < 0 || end < start || end > 2 ** bits)
				throw new RangeError(`input range [${start}, ${end}) is not inside [0, 2^${bits})`);
			first = start;
			total = end - start;
		}
		next = (i) => {
			const m = new Map<string, bigint>();
			let rest = BigInt(first + i);
			for (const r of c.registers) {
				if (!inputNames.includes(r.name)) {
					m.set(r.name, 0n);
					continue;
				}
				m.set(r.name, rest & ((1n << BigInt(r.size)) - 1n));
				rest >>= BigInt(r.size);
			}
			return m;
		};
	} else {
		const rng = createRng(choice.seed);
		total = choice.count;
		// Rejection sampling inside the domain, bounded by tries (work), not by luck.
		let budget = total * (options.rejectionFactor ?? 64);
		const sampler = domain.length ? options.sampler : undefined;
		next = () => {
			if (sampler) {
				const drawn = sampler(rng);
				if (!drawn) throw new RangeError(`the domain (${domain.map((d) => d.text).join(' and ')}) holds no input`);
				const m = new Map<string, bigint>();
				for (const r of c.registers) m.set(r.name, inputNames.includes(r.name) ? drawn.get(r.name) ?? 0n : 0n);
				return m;
			}
			for (;;) {
				const m = new Map<string, bigint>();
				for (const r of c.registers) m.set(r.name, inputNames.includes(r.name) ? randomBits(rng, r.size) : 0n);
				if (!domain.length || satisfiesConditions(domain, m)) return m;
				result.outsideDomain++;
				if (--budget <= 0) throw new RangeError(`the domain (${domain.map((d) => d.text).join(' and ')}) holds too few inputs to sample: ${result.outsideDomain} drawn inputs fell outside it; sweep every input instead`);
			}
		};
	}
	const bitsArr = new Uint8Array(c.qubitCount);
	const expBits = new Uint8Array(c.qubitCount);
	for (let i = 0; i < total; i++) {
		const values = next(i);
		if ((choice.mode === 'all' || choice.mode === 'range') && domain.length && !satisfiesConditions(domain, values)) {
			result.outsideDomain++;
			continue;
		}
		const expected = new Map<string, bigint>();
		for (const r of c.registers) {
			const s = specByOut.get(r.name);
			expected.set(r.name, s ? evaluateSpec(s, values) : values.get(r.name)!);
		}
		fillBits(c.registers, values, bitsArr);
		fillBits(c.registers, expected, expBits);
		const ls = createLedgerState(c.qubitCount, bitsArr);
		let g = 0;
		for (; g < c.gateCount; g++) if (!applyLedgerGate(ls, c, lt, g, null)) break;
		let probability: number;
		const got = new Map<string, bigint>();
		let engine: SweepCase['engine'] = 'ledger';
		let phase: Angle | null = null;
		let resetFailure: ResetFailure | null;
		if (g === c.gateCount) {
			resetFailure = ls.resetFailure;
			probability = 1;
			phase = ledgerGlobalPhase(ls, lt);
			for (let q = 0; q < c.qubitCount; q++) {
				const p1 = ledgerProbabilityOne(ls, q);
				probability *= expBits[q] ? p1 : 1 - p1;
				bitsArr[q] = p1 > 0.5 ? 1 : 0;
				if (ls.kind[q] === LedgerKind.pure) {
					// the phase of the amplitude of the expected bit of a general single-qubit state
					const o = 4 * q + (expBits[q] ? 2 : 0);
					phase = addAngles(phase, floatTurns(Math.atan2(ls.amp[o + 1], ls.amp[o]) / (2 * Math.PI)));
				}
			}
			readBits(c.registers, bitsArr, got);
			result.engines.ledger++;
		} else {
			engine = 'amplitudes';
			if (c.qubitCount > maxAmp) throw new RangeError(`gate ${g} entangles qubits and the circuit has ${c.qubitCount} qubits, above the amplitude engine limit of ${maxAmp}`);
			gt ??= buildGateTables(c);
			const sv = ledgerToAmplitudes(ls, lt, maxAmp);
			applyLoweredGates(sv, c, gt, g, c.gateCount);
			resetFailure = sv.resetFailure ?? null;
			let want = 0;
			for (let q = 0; q < c.qubitCount; q++) if (expBits[q]) want += 2 ** q;
			const d = sv.data;
			probability = d[2 * want] ** 2 + d[2 * want + 1] ** 2;
			if (probability > SUCCESS_TOLERANCE) phase = floatTurns(Math.atan2(d[2 * want + 1], d[2 * want]) / (2 * Math.PI));
			let best = 0;
			let bestP = -1;
			for (let k = 0; k < d.length / 2; k++) {
				const p = d[2 * k] ** 2 + d[2 * k + 1] ** 2;
				if (p > bestP) {
					bestP = p;
					best = k;
				}
			}
			for (let q = 0; q < c.qubitCount; q++) bitsArr[q] = Math.floor(best / 2 ** q) % 2;
			readBits(c.registers, bitsArr, got);
			result.engines.amplitudes++;
		}
		result.cases++;
		// A failed reset claim: the run is right at most when the qubit is found 0 there.
		if (resetFailure) probability = Math.min(probability, 1 - resetFailure.p1);
		if (probability < result.worstSuccessProbability || result.worstInput === null) {
			if (probability < result.worstSuccessProbability) result.worstSuccessProbability = probability;
			if (result.worstInput === null || probability <= result.worstSuccessProbability) result.worstInput = show(values, inputNames);
		}
		let reason: SweepCase['reason'] | null = resetFailure ? 'reset' : probability < 1 - SUCCESS_TOLERANCE ? 'value' : null;
		if (!reason && !options.ignorePhase && phase) {
			if (!reference) {
				reference = phase;
				result.phaseReference = formatTurns(reduceSigned(phase));
			} else if (!anglesEqual(phase, reference, 1e-9)) reason = 'phase';
		}
		if (reason) {
			result.failed++;
			if (result.failures.length < keep)
				result.failures.push({ input: show(values, inputNames), expected: show(expected, null), got: show(got, null), probability, engine, reason, ...(reason === 'phase' && phase ? { phase: formatTurns(reduceSigned(phase)) } : {}), ...(resetFailure ? { reset: resetFailureView(c, resetFailure) } : {}) });
		}
		if (options.onProgress && (i & 255) === 255) options.onProgress(i + 1, total);
	}
	options.onProgress?.(total, total);
	return result;
}

function fillBits(regs: PlacedRegister[], values: Map<string, bigint>, out: Uint8Array): void {
	for (const r of regs) {
		const v = values.get(r.name) ?? 0n;
		for (let i = 0; i < r.size; i++) out[r.offset + i] = Number((v >> BigInt(i)) & 1n);
	}
}
function readBits(regs: PlacedRegister[], bits: Uint8Array, out: Map<string, bigint>): void {
	for (const r of regs) {
		let v = 0n;
		for (let i = r.size - 1; i >= 0; i--) v = (v << 1n) | BigInt(bits[r.offset + i]);
		out.set(r.name, v);
	}
}
function show(values: Map<string, bigint>, only: string[] | null): Record<string, string> {
	const o: Record<string, string> = {};
	for (const [k, v] of values) if (!only || only.includes(k)) o[k] = v.toString();
	return o;
}
