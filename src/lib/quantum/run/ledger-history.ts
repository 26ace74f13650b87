/**
 * Per-qubit ledger history: every contribution the ledger logged for one qubit (a phase, its
 * origin at a Hadamard, a negation under X, a kickback, a swap, a collapse), with the running
 * total and the expectation at that step. Qubit order: flat; angles in turns.
 */
import { addAngles, divergence, dyadic, isZeroSigned, ZERO_ANGLE, type Angle } from '../angle.js';
import type { LoweredCircuit } from '../circuit.js';
import { ContributionKind, LedgerKind, ledgerPhase, type ContributionLog, type LedgerState, type LedgerTables } from '../ledger.js';
import type { StateVector } from '../amplitudes.js';
import type { ExpectedState, LedgerEntry } from './types.js';

const KIND_NAMES = Object.keys(ContributionKind) as (keyof typeof ContributionKind)[];

/** What the history reads from a run. */
export interface HistorySource {
	circuit: LoweredCircuit;
	contributions: ContributionLog;
	ledgerTables: LedgerTables;
	firstParted: Int32Array;
	tol: number;
	stateAt(step: number): { engine: 'ledger'; ledger: LedgerState } | { engine: 'amplitudes'; amplitudes: StateVector };
	expectedAt(q: number, step: number): { expected: ExpectedState | null; step: number | null; fresh: boolean };
}

/** The ledger of qubit q: every contribution with the running total and the expectation at that step (turns). */
export function qubitLedgerHistory(run: HistorySource, q: number): { entries: LedgerEntry[]; firstParted: number | null } {
	const log = run.contributions;
	const t = run.ledgerTables;
	const entries: LedgerEntry[] = [];
	let total: Angle | null = null;
	for (let i = 0; i < log.length; i++) {
		if (log.qubit[i] !== q) continue;
		const g = log.gate[i];
		const kind = KIND_NAMES[log.kind[i]];
		let amount = contributionAmount(run.circuit, log, t, i);
		if (kind === 'origin') {
			const st = run.stateAt(g + 1);
			total = st.engine === 'ledger' ? ledgerPhase(st.ledger, t, q) : ZERO_ANGLE;
			amount = total;
		} else if (kind === 'collapse' || kind === 'leave') total = null;
		else if (kind === 'swap') {
			const st = run.stateAt(g + 1);
			total = st.engine === 'ledger' && st.ledger.kind[q] === LedgerKind.fourier ? ledgerPhase(st.ledger, t, q) : null;
		} else if (amount && total) total = addAngles(total, amount);
		const ex = run.expectedAt(q, g + 1);
		const expAngle = ex.expected && ex.expected.kind === 'fourier' ? ex.expected.angle : null;
		const parted = expAngle !== null && total !== null && ex.fresh && !isZeroSigned(divergence(total, expAngle), run.tol);
		entries.push({ step: g + 1, gate: g, kind, amount, total, expected: expAngle, parted });
	}
	const fp = run.firstParted[q];
	return { entries, firstParted: fp >= 0 ? fp : null };
}

/** The angle contribution i added (turns): a gate's phase, a negation's explicit amount, ½ for a kickback; null otherwise. */
function contributionAmount(c: LoweredCircuit, log: ContributionLog, t: LedgerTables, i: number): Angle | null {
	switch (log.kind[i]) {
		case ContributionKind.phase:
			return c.angles[c.angleIndex[log.gate[i]]];
		case ContributionKind.negate:
			return dyadic(log.explicit.get(i)!, t.exp);
		case ContributionKind.kickback:
			return dyadic(1n, 1);
		default:
			return null;
	}
}
