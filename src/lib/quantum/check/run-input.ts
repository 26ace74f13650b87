/**
 * Run one basis input to the end (or to step N) and read out register values with probabilities
 * and every qubit's frame. Ledger first (exact); when a gate would entangle, or on request, the
 * amplitude engine. Qubit order: flat qubit = register offset + index (index 0 = LSB); phases in turns.
 */
import { applyLedgerGate, buildLedgerTables, createLedgerState, entanglingReason, LedgerKind, ledgerPhase, ledgerToAmplitudes } from '../ledger.js';
import { applyLoweredGates, blochVector, buildGateTables, registerDistribution, AMPLITUDE_QUBIT_LIMITS } from '../amplitudes.js';
import { formatTurns } from '../angle.js';
import { resetFailureView, type ResetFailureView } from '../reset-claim.js';
import { qubitLabel, type LoweredCircuit } from '../circuit.js';

/** Frame of one qubit at the step read. */
export interface QubitReadout {
	qubit: string;
	kind: 'classical' | 'fourier' | 'pure' | 'mixed';
	bit?: number;
	/** Relative phase of |1⟩ against |0⟩ in turns (exact text for Fourier qubits in the ledger). */
	phaseTurns?: string;
	/** Length of the off-diagonal term ×2 (1 for a pure equal superposition, 0 when classical/decohered). */
	coherence?: number;
	text: string;
}

/** Result of {@link runBasisInput}. */
export interface RunReport {
	engine: 'ledger' | 'amplitudes';
	step: number;
	gateCount: number;
	handedOverAt: number | null;
	/** Why the ledger handed over (the gate, its line and the qubits it would entangle). */
	handoverReason?: string;
	/** Ledger only: H gates that read an inexact phase within 1e-6 turn of 0 or ½ as classical, and the probability dropped. */
	nearClassical?: { count: number; droppedProbability: number };
	registers: { name: string; values: { value: string; probability: number }[] }[];
	frames: QubitReadout[];
	/** The first reset (up to the step read) whose claim "this qubit is |0⟩ here" failed. */
	resetFailure?: ResetFailureView;
}

/** Run `values` (register → starting value, others 0) up to `step` gates. */
export function runBasisInput(c: LoweredCircuit, values: Map<string, bigint>, opts: { engine: 'ledger' | 'amplitudes'; step?: number; maxQubits?: number }): RunReport {
	const step = opts.step ?? c.gateCount;
	const maxQ = opts.maxQubits ?? AMPLITUDE_QUBIT_LIMITS.server;
	const bits = new Uint8Array(c.qubitCount);
	for (const r of c.registers) {
		const v = values.get(r.name) ?? 0n;
		for (let i = 0; i < r.size; i++) bits[r.offset + i] = Number((v >> BigInt(i)) & 1n);
	}
	const names = Array.from({ length: c.qubitCount }, (_, q) => qubitLabel(c.registers, q));
	const lt = buildLedgerTables(c);
	const ls = createLedgerState(c.qubitCount, bits);
	let g = 0;
	if (opts.engine === 'ledger') for (; g < step; g++) if (!applyLedgerGate(ls, c, lt, g, null)) break;
	if (opts.engine === 'ledger' && g === step) {
		const frames: QubitReadout[] = [];
		const p1 = new Float64Array(c.qubitCount);
		for (let q = 0; q < c.qubitCount; q++) {
			const k = ls.kind[q];
			if (k === LedgerKind.classical) {
				p1[q] = ls.bit[q];
				frames.push({ qubit: names[q], kind: 'classical', bit: ls.bit[q], text: `classical ${ls.bit[q]}` });
			} else if (k === LedgerKind.fourier) {
				p1[q] = 0.5;
				const ph = formatTurns(ledgerPhase(ls, lt, q));
				frames.push({ qubit: names[q], kind: 'fourier', phaseTurns: ph, coherence: 1, text: `Fourier, phase ${ph}` });
			} else {
				const [ar, ai, br, bi] = ls.amp.subarray(4 * q, 4 * q + 4);
				p1[q] = br * br + bi * bi;
				const ph = (Math.atan2(bi * ar - br * ai, br * ar + bi * ai) / (2 * Math.PI) + 1) % 1;
				const coh = 2 * Math.hypot(ar, ai) * Math.hypot(br, bi);
				frames.push({ qubit: names[q], kind: 'pure', phaseTurns: ph.toPrecision(8), coherence: coh, text: `pure, P(1)=${p1[q].toPrecision(6)}, phase ${ph.toPrecision(8)} turn` });
			}
		}
		const registers = c.registers.map((r) => ({ name: r.name, values: productDistribution(p1.subarray(r.offset, r.offset + r.size)) }));
		const near = ls.nearCollapses ? { nearClassical: { count: ls.nearCollapses, droppedProbability: ls.dropped } } : {};
		return { engine: 'ledger', step, gateCount: c.gateCount, handedOverAt: null, ...near, registers, frames, ...(ls.resetFailure ? { resetFailure: resetFailureView(c, ls.resetFailure) } : {}) };
	}
	const sv = ledgerToAmplitudes(ls, lt, maxQ);
	applyLoweredGates(sv, c, buildGateTables(c), g, step);
	const frames: QubitReadout[] = [];
	const b = new Float64Array(3);
	for (let q = 0; q < c.qubitCount; q++) {
		blochVector(sv, q, b);
		const coh = Math.hypot(b[0], b[1]);
		const pz = (1 - b[2]) / 2;
		const ph = (Math.atan2(b[1], b[0]) / (2 * Math.PI) + 1) % 1;
		const kind = coh < 1e-9 && (pz < 1e-9 || pz > 1 - 1e-9) ? 'classical' : Math.hypot(b[0], b[1], b[2]) > 1 - 1e-9 ? 'pure' : 'mixed';
		frames.push({
			qubit: names[q],
			kind,
			...(kind === 'classical' ? { bit: pz > 0.5 ? 1 : 0 } : { phaseTurns: ph.toPrecision(8), coherence: coh }),
			text: kind === 'classical' ? `classical ${pz > 0.5 ? 1 : 0}` : `${kind}, P(1)=${pz.toPrecision(6)}, phase ${ph.toPrecision(8)} turn, coherence ${coh.toPrecision(6)}`
		});
	}
	const registers = c.registers.map((r) => {
		const d = registerDistribution(sv, r.offset, r.size);
		const vals: { value: string; probability: number }[] = [];
		d.forEach((p, v) => {
			if (p > 1e-12) vals.push({ value: String(v), probability: p });
		});
		vals.sort((x, y) => y.probability - x.probability);
		return { name: r.name, values: vals.slice(0, 16) };
	});
	const why = opts.engine === 'ledger' ? { handoverReason: entanglingReason(ls, c, g) } : {};
	return { engine: 'amplitudes', step, gateCount: c.gateCount, handedOverAt: opts.engine === 'ledger' ? g : null, ...why, registers, frames, ...(sv.resetFailure ? { resetFailure: resetFailureView(c, sv.resetFailure) } : {}) };
}

/** Most likely values of independent bits (up to 16 values, probabilities as products). */
function productDistribution(p1: Float64Array): { value: string; probability: number }[] {
	let dist: [bigint, number][] = [[0n, 1]];
	for (let i = 0; i < p1.length; i++) {
		const p = p1[i];
		const next: [bigint, number][] = [];
		for (const [v, q] of dist) {
			if (1 - p > 1e-15) next.push([v, q * (1 - p)]);
			if (p > 1e-15) next.push([v | (1n << BigInt(i)), q * p]);
		}
		next.sort((x, y) => y[1] - x[1]);
		dist = next.slice(0, 64);
	}
	return dist.slice(0, 16).map(([v, p]) => ({ value: v.toString(), probability: p }));
}
