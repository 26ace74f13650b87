/**
 * A reset read as a checked claim ("this qubit is |0⟩ here"): where a failed claim is shown and how
 * it is said, in one place for the sweep, a single run, the workbench's run and the worker. The
 * engines record the failure itself (`ResetFailure` in amplitudes.ts). Qubit order: flat.
 */
import type { ResetFailure } from './amplitudes.js';
import { qubitLabel, type LoweredCircuit } from './circuit.js';

/** A failed claim for display: the gate (step − 1), its source line, the qubit's label, P(1) there. */
export interface ResetFailureView {
	gate: number;
	line: number | null;
	qubit: string;
	p1: number;
}

/** Where gate `f.gate` came from and which qubit it claims. */
export function resetFailureView(c: LoweredCircuit, f: ResetFailure): ResetFailureView {
	return { gate: f.gate, line: c.itemSources[c.itemOf[f.gate]]?.line ?? null, qubit: qubitLabel(c.registers, f.qubit), p1: f.p1 };
}

/** What the qubit holds instead of |0⟩: "it holds 1", or the probability of finding 1. */
export function resetHolds(p1: number): string {
	return p1 > 1 - 1e-12 ? 'it holds 1' : `it would be found 1 with probability ${Number(p1.toPrecision(6))}`;
}

/** A failed claim in one sentence: where, which qubit, and what it holds there. */
export function resetFailureText(r: ResetFailureView): string {
	return `the reset on ${r.qubit} at step ${r.gate + 1}${r.line !== null ? ` (line ${r.line})` : ''} claims it is |0⟩ there, but ${resetHolds(r.p1)}`;
}
