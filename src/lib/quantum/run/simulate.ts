/**
 * Simulation: execute a lowered circuit once on basis-state inputs with the exact ledger, handing
 * over to the amplitude engine when a gate would entangle (or stopping beyond its qubit limit),
 * keeping keyframes every K steps with their checksums, the ledger contributions, and every
 * mismatch with an expectation as it happens. `replayTo` rebuilds any step from the nearest
 * keyframe. Qubit order: flat (register offset + index, index 0 = LSB); angles in turns.
 */
import { allBlochVectors, AMPLITUDE_QUBIT_LIMITS, applyLoweredGate, buildGateTables, cloneState, probabilityOne, RESET_TOLERANCE, type GateTables, type StateVector } from '../amplitudes.js';
import { GateCode, qubitLabel, type LoweredCircuit } from '../circuit.js';
import { resetHolds } from '../reset-claim.js';
import { ExpectKind } from '../expect.js';
import {
	applyLedgerGate,
	buildLedgerTables,
	cloneLedgerState,
	createContributionLog,
	createLedgerState,
	entanglingReason,
	LedgerKind,
	ledgerProbabilityOne,
	ledgerToAmplitudes,
	type ContributionLog,
	type LedgerState,
	type LedgerTables
} from '../ledger.js';
import { ExpectationIndex, runExpectations } from './expected.js';
import { checksumOf, classifyBloch, compareState, describeExpected, describeState, fnv1a, ledgerCanonicalText, ledgerQubitState, statesFromAmplitudes } from './frames.js';
import type { DivergenceRecord, QubitState, RunInputs, RunOptions } from './types.js';

/** Everything one pass over the circuit records; a Run keeps it and answers questions from it. */
export interface Simulation {
	keyframeInterval: number;
	tol: number;
	maxAmp: number;
	handover: { step: number; reason: string } | null;
	stopped: { step: number; reason: string } | null;
	expectations: ExpectationIndex;
	intentWarnings: string[];
	contributions: ContributionLog;
	divergences: DivergenceRecord[];
	keyframeChecksums: { step: number; checksum: string }[];
	/** First step at which each qubit failed an expectation, −1 if never. */
	firstParted: Int32Array;
	ledgerTables: LedgerTables;
	gateTables: GateTables | null;
	ledgerKeys: LedgerState[];
	ampKeys: { step: number; state: StateVector }[];
}

/** Starting bits, register values (null for a superposed register) and the superposed registers; throws on unknown or oversized inputs. */
function readInputs(circuit: LoweredCircuit, inputs: RunInputs): { bits: Uint8Array; known: Map<string, bigint | null>; superposed: Set<string> } {
	const bits = new Uint8Array(circuit.qubitCount);
	const known = new Map<string, bigint | null>();
	const superposed = new Set(inputs.superposed ?? []);
	for (const name of superposed) if (!circuit.registers.some((r) => r.name === name)) throw new RangeError(`unknown register "${name}" in superposed inputs`);
	for (const [name, raw] of Object.entries(inputs.values ?? {})) {
		const r = circuit.registers.find((x) => x.name === name);
		if (!r) throw new RangeError(`unknown register "${name}" in inputs`);
		const v = BigInt(raw);
		if (v < 0n || v >= 1n << BigInt(r.size)) throw new RangeError(`input ${name} = ${v} does not fit in ${r.size} qubits`);
	}
	for (const r of circuit.registers) {
		const v = superposed.has(r.name) ? null : BigInt(inputs.values?.[r.name] ?? 0);
		known.set(r.name, v);
		if (v !== null) for (let i = 0; i < r.size; i++) bits[r.offset + i] = Number((v >> BigInt(i)) & 1n);
	}
	return { bits, known, superposed };
}

/** Run `circuit` on `inputs` to the end (or to where it must stop), recording what a Run needs. */
export function simulate(circuit: LoweredCircuit, inputs: RunInputs, options: RunOptions): Simulation {
	const n = circuit.qubitCount;
	const { bits, known, superposed } = readInputs(circuit, inputs);
	const expected = runExpectations(circuit, known, options);
	const sim: Simulation = {
		keyframeInterval: Math.max(1, options.keyframeInterval ?? 1024),
		tol: options.tolerance ?? 1e-9,
		maxAmp: options.maxAmplitudeQubits ?? AMPLITUDE_QUBIT_LIMITS.browser,
		handover: null,
		stopped: null,
		expectations: new ExpectationIndex(circuit, expected.events),
		intentWarnings: expected.warnings,
		contributions: createContributionLog(Math.max(1024, circuit.gateCount)),
		divergences: [],
		keyframeChecksums: [],
		firstParted: new Int32Array(n).fill(-1),
		ledgerTables: buildLedgerTables(circuit),
		gateTables: null,
		ledgerKeys: [],
		ampKeys: []
	};
	const K = sim.keyframeInterval;
	const ev = expected.events;
	let ledger: LedgerState | null = null;
	let amp: StateVector | null = null;
	let ampInterval = K;
	let lastAmpKey = -1;
	let nextEvent = 0;

	const initialLedger = (): LedgerState => {
		const s = createLedgerState(n, bits);
		for (const name of superposed) {
			const r = circuit.registers.find((x) => x.name === name)!;
			for (let i = 0; i < r.size; i++) {
				s.kind[r.offset + i] = LedgerKind.fourier;
				s.phase[r.offset + i] = 0n;
			}
		}
		return s;
	};
	/** Hand over to the amplitude engine at `step` (from the ledger state `from`, or the inputs); false when the circuit is too wide. */
	const startAmplitudes = (step: number, reason: string, from: LedgerState | null): boolean => {
		if (n > sim.maxAmp) {
			sim.stopped = { step, reason: `stopped at step ${step}: ${reason}; the amplitude engine is limited to ${sim.maxAmp} qubits and this circuit has ${n}` };
			return false;
		}
		sim.gateTables = buildGateTables(circuit);
		amp = ledgerToAmplitudes(from ?? initialLedger(), sim.ledgerTables, sim.maxAmp); // from the inputs: product of |bit⟩ and |+⟩ factors
		sim.handover = { step, reason };
		const bytes = 16 * 2 ** n;
		const budget = options.amplitudeKeyframeBytes ?? 256 * 2 ** 20;
		const maxKeys = Math.max(1, Math.floor(budget / bytes));
		ampInterval = Math.max(K, Math.ceil((circuit.gateCount - step + 1) / maxKeys));
		return true;
	};
	/** Compare every expectation stated at `step` with the state; record the mismatches. */
	const checkEvents = (step: number) => {
		while (nextEvent < ev.length && ev.step[nextEvent] < step) nextEvent++;
		let bloch: Float64Array | null = null;
		for (; nextEvent < ev.length && ev.step[nextEvent] === step; nextEvent++) {
			const e = nextEvent;
			if (ev.kind[e] === ExpectKind.unknown) continue;
			if (amp && n > 16 && !ev.boundary[e]) continue; // partial checks would cost 2^n each
			const q = ev.qubit[e];
			if (ledger && sim.expectations.ledgerMatches(ledger, sim.ledgerTables, e)) continue; // fast exact path, no allocation
			let actual: QubitState;
			if (ledger) actual = ledgerQubitState(ledger, sim.ledgerTables, q, sim.tol);
			else {
				bloch ??= allBlochVectors(amp!);
				actual = classifyBloch(bloch[3 * q], bloch[3 * q + 1], bloch[3 * q + 2], sim.tol);
			}
			const exp = sim.expectations.expectedOf(e);
			const r = compareState(actual, exp, sim.tol);
			if (!r.matches) {
				if (sim.firstParted[q] < 0) sim.firstParted[q] = step;
				if (sim.divergences.length < 10_000)
					sim.divergences.push({
						step,
						qubit: q,
						boundary: ev.boundary[e] === 1,
						divergence: r.divergence,
						message: `q${q} (${qubitLabel(circuit.registers, q)}) at step ${step}: expected ${describeExpected(exp)}, got ${describeState(actual)}`
					});
			}
		}
	};

	/** A reset claims its qubit is |0⟩ before gate `step`: a failed claim is a divergence on that qubit after it. */
	const checkReset = (step: number) => {
		const q = circuit.qubitList[circuit.qubitStart[step]];
		const p1 = ledger ? ledgerProbabilityOne(ledger, q) : amp ? probabilityOne(amp, q) : 0;
		if (p1 <= RESET_TOLERANCE) return;
		if (sim.firstParted[q] < 0) sim.firstParted[q] = step + 1;
		const line = circuit.itemSources[circuit.itemOf[step]]?.line;
		if (sim.divergences.length < 10_000)
			sim.divergences.push({ step: step + 1, qubit: q, boundary: true, divergence: null, message: `q${q} (${qubitLabel(circuit.registers, q)}) at step ${step + 1}: the reset${line ? ` on line ${line}` : ''} claims it is |0⟩ there, but ${resetHolds(p1)}`, reset: { p1 } });
	};

	if (superposed.size > 0 || options.engine === 'amplitudes') {
		const reason = superposed.size > 0 ? `input register${superposed.size > 1 ? 's' : ''} ${[...superposed].join(', ')} in uniform superposition` : 'amplitude engine requested';
		if (!startAmplitudes(0, reason, null)) sim.ledgerKeys.push(initialLedger());
	} else ledger = createLedgerState(n, bits);

	for (let step = 0; ; step++) {
		if (ledger && step % K === 0) {
			sim.ledgerKeys.push(cloneLedgerState(ledger));
			sim.keyframeChecksums.push({ step, checksum: fnv1a(ledgerCanonicalText(ledger, sim.ledgerTables, step, sim.tol)) });
		} else if (amp && (lastAmpKey < 0 || step - lastAmpKey >= ampInterval)) {
			sim.ampKeys.push({ step, state: cloneState(amp) });
			lastAmpKey = step;
			sim.keyframeChecksums.push({ step, checksum: checksumOf('amplitudes', step, statesFromAmplitudes(amp, sim.tol)) });
		}
		if (!ledger && !amp) break;
		checkEvents(step);
		if (step === circuit.gateCount || step === options.untilStep) break;
		if (circuit.kinds[step] === GateCode.reset) checkReset(step);
		if (ledger) {
			if (!applyLedgerGate(ledger, circuit, sim.ledgerTables, step, sim.contributions)) {
				const reason = entanglingReason(ledger, circuit, step);
				if (!startAmplitudes(step, reason, ledger)) break;
				ledger = null;
				sim.ampKeys.push({ step, state: cloneState(amp!) });
				lastAmpKey = step;
				applyLoweredGate(amp!, circuit, sim.gateTables!, step);
			}
		} else if (amp) applyLoweredGate(amp, circuit, sim.gateTables!, step);
	}
	return sim;
}

/** The raw engine state at `step`, replayed from the nearest keyframe: ledger or state vector. */
export function replayTo(sim: Simulation, c: LoweredCircuit, step: number): { engine: 'ledger'; ledger: LedgerState } | { engine: 'amplitudes'; amplitudes: StateVector } {
	const useLedger = sim.ampKeys.length === 0 || (sim.handover !== null && sim.handover.step > 0 && step <= sim.handover.step);
	if (useLedger) {
		const ki = Math.min(Math.floor(step / sim.keyframeInterval), sim.ledgerKeys.length - 1);
		const s = cloneLedgerState(sim.ledgerKeys[ki]);
		for (let g = ki * sim.keyframeInterval; g < step; g++) applyLedgerGate(s, c, sim.ledgerTables, g, null);
		return { engine: 'ledger', ledger: s };
	}
	let lo = 0;
	let hi = sim.ampKeys.length - 1;
	while (lo < hi) {
		const mid = (lo + hi + 1) >> 1;
		if (sim.ampKeys[mid].step <= step) lo = mid;
		else hi = mid - 1;
	}
	const key = sim.ampKeys[lo];
	const s = cloneState(key.state);
	for (let g = key.step; g < step; g++) applyLoweredGate(s, c, sim.gateTables!, g);
	return { engine: 'amplitudes', amplitudes: s };
}
