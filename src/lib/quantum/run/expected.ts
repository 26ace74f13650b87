/**
 * Expectations per qubit: the circuit's own (block effects) merged with those from the specs
 * (Fourier sections), indexed per qubit so "the last expectation at or before step s" and "has a
 * gate touched the qubit since" are binary searches. Qubit order: flat; angles in turns.
 */
import { dyadic } from '../angle.js';
import type { LoweredCircuit } from '../circuit.js';
import { computeExpectations, ExpectKind, noteKey, type ExpectationEvents } from '../expect.js';
import { computeIntentExpectations, mergeExpectations } from '../intent.js';
import { LedgerKind, type LedgerState, type LedgerTables } from '../ledger.js';
import type { ExpectedState, RunOptions } from './types.js';

/** The expectation events of a run on `known` register values (null = superposed), and why spec-based ones were not applied. */
export function runExpectations(circuit: LoweredCircuit, known: Map<string, bigint | null>, options: RunOptions): { events: ExpectationEvents; warnings: string[] } {
	const own = computeExpectations(circuit, known);
	const intents = options.intents ?? [];
	if (intents.length && [...known.values()].every((v) => v !== null)) {
		const got = computeIntentExpectations(circuit, intents, known as Map<string, bigint>, options.intentSections);
		return { events: mergeExpectations(own, got.events), warnings: got.warnings };
	}
	return { events: own, warnings: [] };
}

/** Last index in [from, to) with a[i] ≤ v (a sorted there), or from − 1. */
function lastAtMost(a: Int32Array, from: number, to: number, v: number): number {
	let lo = from;
	let hi = to;
	while (lo < hi) {
		const mid = (lo + hi) >> 1;
		if (a[mid] <= v) lo = mid + 1;
		else hi = mid;
	}
	return lo - 1;
}

/** Start of each qubit's entries in a per-qubit list (CSR) of the first `length` entries of `qubits`. */
function offsetsOf(n: number, qubits: Int32Array, length: number): Int32Array {
	const offsets = new Int32Array(n + 1);
	for (let i = 0; i < length; i++) offsets[qubits[i] + 1]++;
	for (let q = 0; q < n; q++) offsets[q + 1] += offsets[q];
	return offsets;
}

/** Per-qubit index of expectation events and of the gates that touch each qubit. */
export class ExpectationIndex {
	private readonly evOffsets: Int32Array;
	private readonly evIndex: Int32Array;
	private readonly evStepsByQubit: Int32Array;
	private readonly touchOffsets: Int32Array;
	private readonly touchGates: Int32Array;

	constructor(
		circuit: LoweredCircuit,
		readonly events: ExpectationEvents
	) {
		const n = circuit.qubitCount;
		const ev = events;
		this.evOffsets = offsetsOf(n, ev.qubit, ev.length);
		this.evIndex = new Int32Array(ev.length);
		this.evStepsByQubit = new Int32Array(ev.length);
		const fillEv = this.evOffsets.slice(0, n);
		for (let e = 0; e < ev.length; e++) {
			const at = fillEv[ev.qubit[e]]++;
			this.evIndex[at] = e;
			this.evStepsByQubit[at] = ev.step[e];
		}
		this.touchOffsets = offsetsOf(n, circuit.qubitList, circuit.qubitList.length);
		this.touchGates = new Int32Array(circuit.qubitList.length);
		const fillTouch = this.touchOffsets.slice(0, n);
		for (let g = 0; g < circuit.gateCount; g++)
			for (let i = circuit.qubitStart[g]; i < circuit.qubitStart[g + 1]; i++) this.touchGates[fillTouch[circuit.qubitList[i]]++] = g;
	}

	/** Expectation event e as a state. */
	expectedOf(e: number): ExpectedState {
		const ev = this.events;
		const note = ev.notes?.get(noteKey(ev.step[e], ev.qubit[e]));
		const withNote = note ? { note } : {};
		if (ev.kind[e] === ExpectKind.classical) return { kind: 'classical', bit: ev.level[e] ? 1 : 0, ...withNote };
		const level = ev.level[e];
		return { kind: 'fourier', level, value: ev.num[e], angle: dyadic(ev.num[e], level), ...withNote };
	}

	/** Expected state of qubit q at `step`: last stated expectation ≤ step, and whether it is still fresh. */
	expectedAt(q: number, step: number): { expected: ExpectedState | null; step: number | null; fresh: boolean } {
		const at = lastAtMost(this.evStepsByQubit, this.evOffsets[q], this.evOffsets[q + 1], step);
		if (at < this.evOffsets[q]) return { expected: null, step: null, fresh: false };
		const e = this.evIndex[at];
		const evStep = this.events.step[e];
		if (this.events.kind[e] === ExpectKind.unknown) return { expected: null, step: evStep, fresh: false };
		// fresh iff no gate g with evStep ≤ g < step touches q
		const t = lastAtMost(this.touchGates, this.touchOffsets[q], this.touchOffsets[q + 1], step - 1);
		const fresh = t < this.touchOffsets[q] || this.touchGates[t] < evStep;
		return { expected: this.expectedOf(e), step: evStep, fresh };
	}

	/** Exact ledger check of expectation event e without building frame objects. */
	ledgerMatches(s: LedgerState, t: LedgerTables, e: number): boolean {
		const ev = this.events;
		const q = ev.qubit[e];
		if (ev.kind[e] === ExpectKind.classical) return s.kind[q] === LedgerKind.classical && s.bit[q] === ev.level[e];
		const level = ev.level[e];
		if (s.kind[q] !== LedgerKind.fourier || s.inexact[q] || level > t.exp) return false;
		return s.phase[q] === ((ev.num[e] << BigInt(t.exp - level)) & t.mask);
	}
}
