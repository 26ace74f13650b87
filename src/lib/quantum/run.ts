/**
 * Runs and frames: execute a lowered circuit on basis-state inputs with the exact ledger (handing
 * over to the amplitude engine when a gate would entangle), keep keyframes so any step can be
 * shown by replaying at most K gates, and compare every qubit with its expected value.
 *
 * Qubit order: flat qubits (register offset + index, index 0 = LSB). Angle units: turns.
 * Step s is the state after s gates (step 0 = inputs, step gateCount = output); gate g moves
 * step g to step g + 1.
 *
 * The Run is the public face; the work is in run/: simulate.ts (the one pass, keyframes,
 * replay), frames.ts (qubit states, comparison, canonical text and FNV-1a checksums; see there),
 * expected.ts (expectations indexed per qubit), ledger-history.ts (one qubit's ledger) and
 * navigation.ts (boundaries, step over/out). Expected values are not part of the checksum;
 * replaying a saved trace on the same engine must give the same checksums.
 */
import type { StateVector } from './amplitudes.js';
import type { Angle, SignedAngle } from './angle.js';
import { gateAt, type LoweredCircuit } from './circuit.js';
import type { ExpectationEvents } from './expect.js';
import { buildLedgerTables, ledgerGlobalPhase, type ContributionLog, type LedgerState } from './ledger.js';
import { checksumOf, compareState, registerReadout, statesFromAmplitudes, statesFromLedger } from './run/frames.js';
import { qubitLedgerHistory } from './run/ledger-history.js';
import { blockBoundaries, nextBoundary, previousBoundary, stepOut, stepOver } from './run/navigation.js';
import { replayTo, simulate, type Simulation } from './run/simulate.js';
import type { DivergenceRecord, ExpectedState, LedgerEntry, QubitFrame, RunInputs, RunOptions, TraceFrame } from './run/types.js';

export type { DivergenceRecord, ExpectedState, LedgerEntry, QubitFrame, QubitState, RunInputs, RunOptions, TraceFrame } from './run/types.js';
export { canonicalFrameText, fnv1a } from './run/frames.js';

/**
 * A run of a lowered circuit on given inputs. Construction executes the whole circuit once
 * (recording keyframes, checksums, ledger contributions and divergences); {@link Run.frameAt}
 * then replays at most one keyframe interval.
 */
export class Run {
	readonly circuit: LoweredCircuit;
	readonly stepCount: number;
	readonly keyframeInterval: number;
	/** Step where the ledger handed over to the amplitude engine (null: ledger all the way). */
	readonly handover: { step: number; reason: string } | null;
	/** Step where the run stopped (entangling gate beyond the amplitude limit), null if complete. */
	readonly stopped: { step: number; reason: string } | null;
	readonly expectations: ExpectationEvents;
	readonly contributions: ContributionLog;
	readonly divergences: DivergenceRecord[];
	readonly keyframeChecksums: { step: number; checksum: string }[];
	/** Why spec-based expectations were not applied somewhere (empty when they all were). */
	readonly intentWarnings: string[];

	private readonly sim: Simulation;
	private boundaries: number[] | null = null;

	constructor(circuit: LoweredCircuit, inputs: RunInputs = {}, options: RunOptions = {}) {
		const sim = simulate(circuit, inputs, options);
		this.sim = sim;
		this.circuit = circuit;
		this.stepCount = circuit.gateCount;
		this.keyframeInterval = sim.keyframeInterval;
		this.handover = sim.handover;
		this.stopped = sim.stopped;
		this.expectations = sim.expectations.events;
		this.contributions = sim.contributions;
		this.divergences = sim.divergences;
		this.keyframeChecksums = sim.keyframeChecksums;
		this.intentWarnings = sim.intentWarnings;
		// The last frame's checksum too, so a replay confirms the whole run even when it is
		// shorter than one keyframe interval.
		const last = this.lastStep;
		const tail = this.keyframeChecksums[this.keyframeChecksums.length - 1];
		if (!tail || tail.step !== last) this.keyframeChecksums.push({ step: last, checksum: this.frameAt(last).checksum });
	}

	/** Number of qubits (flat). */
	get qubitCount(): number {
		return this.circuit.qubitCount;
	}

	/** Last step a frame can be shown for (stepCount unless the run stopped). */
	get lastStep(): number {
		return this.stopped ? this.stopped.step : this.stepCount;
	}

	private checkStep(step: number): void {
		if (!Number.isInteger(step) || step < 0 || step > this.stepCount) throw new RangeError(`step ${step} outside 0..${this.stepCount}`);
		if (this.stopped && step > this.stopped.step) throw new RangeError(`no frame for step ${step}: ${this.stopped.reason}`);
	}

	/** The raw engine state at `step` (replaying from the nearest keyframe): ledger or state vector. */
	stateAt(step: number): { engine: 'ledger'; ledger: LedgerState } | { engine: 'amplitudes'; amplitudes: StateVector } {
		this.checkStep(step);
		return replayTo(this.sim, this.circuit, step);
	}

	/** Expected state of qubit q at `step`: last stated expectation ≤ step, and whether it is still fresh. */
	expectedAt(q: number, step: number): { expected: ExpectedState | null; step: number | null; fresh: boolean } {
		return this.sim.expectations.expectedAt(q, step);
	}

	/** The frame at `step`: every qubit's state, expectation and divergence; serialisable. */
	frameAt(step: number): TraceFrame {
		this.checkStep(step);
		return frameOf(this.sim, this.circuit, step);
	}

	qubitLedger(q: number): { entries: LedgerEntry[]; firstParted: number | null } {
		const sim = this.sim;
		return qubitLedgerHistory(
			{
				circuit: this.circuit,
				contributions: sim.contributions,
				ledgerTables: sim.ledgerTables,
				firstParted: sim.firstParted,
				tol: sim.tol,
				stateAt: (s) => this.stateAt(s),
				expectedAt: (qq, s) => this.expectedAt(qq, s)
			},
			q
		);
	}

	/** First step where any qubit's fresh expectation fails, or null. */
	firstDivergenceStep(): number | null {
		return this.divergences.length ? this.divergences[0].step : null;
	}

	/** Sorted, distinct block boundary steps (every block start and end); built once per run. */
	blockBoundaries(): number[] {
		return (this.boundaries ??= blockBoundaries(this.circuit, this.stepCount));
	}

	/** Next block boundary after `step` (or the last step). */
	nextBoundary(step: number): number {
		return nextBoundary(this.blockBoundaries(), step, this.stepCount);
	}

	/** Previous block boundary before `step` (or 0). */
	previousBoundary(step: number): number {
		return previousBoundary(this.blockBoundaries(), step);
	}

	/** Step into: one gate forward. */
	stepInto(step: number): number {
		return Math.min(step + 1, this.lastStep);
	}

	/**
	 * Step over: if the next gate starts a block one level deeper than the current position,
	 * jump past that whole block; otherwise past the current rotation unit (gates of one block
	 * sharing the same loop indices, e.g. one lowered ccp); otherwise one gate.
	 */
	stepOver(step: number): number {
		return stepOver(this.circuit, step, this.lastStep);
	}

	/** Step out: to the end of the innermost block around `step`, or the last step. */
	stepOut(step: number): number {
		return stepOut(this.circuit, step, this.stepCount, this.lastStep);
	}
}

/** The frame at `step` of a simulation that reached it (a Run's frameAt without the step check). */
function frameOf(sim: Simulation, c: LoweredCircuit, step: number): TraceFrame {
	const st = replayTo(sim, c, step);
	const tol = sim.tol;
	const states = st.engine === 'ledger' ? statesFromLedger(st.ledger, sim.ledgerTables, tol) : statesFromAmplitudes(st.amplitudes, tol);
	const qubits: QubitFrame[] = [];
	for (const r of c.registers)
		for (let i = 0; i < r.size; i++) {
			const q = r.offset + i;
			const ex = sim.expectations.expectedAt(q, step);
			let divergenceValue: SignedAngle | null = null;
			let matches: boolean | null = null;
			if (ex.expected) {
				const cmp = compareState(states[q], ex.expected, tol);
				divergenceValue = cmp.divergence;
				matches = cmp.matches;
			}
			qubits.push({ qubit: q, register: r.name, index: i, state: states[q], expected: ex.expected, expectedStep: ex.step, fresh: ex.fresh, divergence: divergenceValue, matches });
		}
	const { registerValues, distributions } = registerReadout(c, states, st.engine === 'amplitudes' ? st.amplitudes : null);
	const blockPath: number[] = [];
	for (const b of c.blocks) if (b.start <= step && step < b.end) blockPath.push(b.index);
	return {
		step,
		gate: step > 0 ? gateAt(c, step - 1) : null,
		engine: st.engine,
		handover: sim.handover && step > sim.handover.step ? sim.handover : null,
		qubits,
		registerValues,
		distributions,
		blockPath,
		checksum: checksumOf(st.engine, step, states)
	};
}

/**
 * Step 0 alone (the inputs), without the pass over every gate: the same frame as
 * `new Run(circuit, inputs, options).frameAt(0)` (engine.test.ts compares them on every template), for a page that
 * draws the board while the whole run is still being computed. The specs' expectations (the
 * intents) are left out: they state angles inside Fourier sections, which begin after a QFT, so
 * never at step 0.
 */
export function firstFrame(circuit: LoweredCircuit, inputs: RunInputs = {}, options: RunOptions = {}): TraceFrame {
	const sim = simulate(circuit, inputs, { ...options, intents: [], intentSections: [], untilStep: 0 });
	return frameOf(sim, circuit, 0);
}

/** Ledger global phase of the final state (turns), when the run stayed on the ledger. */
export function finalGlobalPhase(run: Run): Angle | null {
	const st = run.stateAt(run.lastStep);
	return st.engine === 'ledger' ? ledgerGlobalPhase(st.ledger, buildLedgerTables(run.circuit)) : null;
}
