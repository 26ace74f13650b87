/**
 * Suspects: the gates most likely at fault in a failing circuit, with their source lines and a
 * reason. Proof findings rank first (a gate whose own amount accounts for a wrong coefficient is
 * the strongest suspect); sweep failures outside the Fourier form fall back to the last gates
 * that touched a qubit ending wrong. Qubit names read register[index], index 0 = LSB.
 */
import { gateAt, gateDisplayName, gateProvenance, GATE_KINDS, qubitLabel, type LoweredCircuit } from '../circuit.js';
import type { ProofResult } from './proof.js';
import type { SweepCase } from './sweep.js';

/** One suspect gate. */
export interface Suspect {
	gate: number;
	line: number | null;
	column: number | null;
	kind: string;
	/** The gate's name in the user's words ("doubly controlled phase", not `mcp`). */
	name: string;
	qubit: string;
	reason: string;
	score: number;
}

/** Rank suspects from proof findings and sweep failures (at most `limit`). */
export function findSuspects(c: LoweredCircuit, proof: ProofResult | null, failures: SweepCase[], limit = 10): Suspect[] {
	const byGate = new Map<number, Suspect>();
	const add = (g: number, score: number, reason: string) => {
		if (g < 0 || g >= c.gateCount) return;
		const prev = byGate.get(g);
		if (prev) {
			prev.score += score;
			if (score > 1 && !prev.reason.includes(reason)) prev.reason = `${reason}; ${prev.reason}`;
			return;
		}
		const v = gateAt(c, g);
		const src = gateProvenance(c, g).source;
		byGate.set(g, {
			gate: g,
			line: src?.line ?? null,
			column: src?.column ?? null,
			kind: GATE_KINDS[c.kinds[g]],
			name: gateDisplayName(GATE_KINDS[c.kinds[g]], c.controlCounts[g]),
			qubit: qubitLabel(c.registers, v.targets[v.targets.length - 1]),
			reason,
			score
		});
	};
	if (proof) {
		for (const w of proof.wrongTerms) {
			const n = w.gates.length || 1;
			for (const x of w.gates)
				add(
					x.gate,
					x.explains ? (x.exact ? 3 : 2) : 1 / n,
					x.explains
						? `wrong term ${w.term} on ${w.target}: this gate adds ${x.turns}, which accounts for the error (expected ${w.expectedTurns}, got ${w.actualTurns})`
						: `feeds wrong term ${w.term} on ${w.target} (expected ${w.expectedTurns}, got ${w.actualTurns})`
				);
			if (w.gates.length === 0)
				for (const g of w.neighbours) add(g, 0.5, `term ${w.term} on ${w.target} is missing (expected ${w.expectedTurns}); its rotation belongs next to this gate`);
		}
		for (const m of proof.registerMismatches) {
			const anc = c.registers.find((r) => r.name === m.register)?.role === 'ancilla' || m.expected === '0';
			for (const g of m.gates)
				add(
					g,
					2,
					m.register === ''
						? m.holds
						: anc
							? `ancilla left dirty by this sequence: ${m.qubit} ends holding ${m.holds}, expected 0`
							: `register not restored: ${m.qubit} ends holding ${m.holds}, expected ${m.expected}`
				);
		}
	}
	if (byGate.size === 0 && failures.length) {
		// Outside the proof's reach: point at the last gates touching qubits that end wrong.
		const wrong = new Set<number>();
		for (const f of failures.slice(0, 5))
			for (const r of c.registers) {
				const e = BigInt(f.expected[r.name] ?? '0');
				const got = BigInt(f.got[r.name] ?? '0');
				for (let i = 0; i < r.size; i++) if (((e ^ got) >> BigInt(i)) & 1n) wrong.add(r.offset + i);
			}
		const seen = new Map<number, number>();
		for (let g = c.gateCount - 1; g >= 0 && byGate.size < limit; g--) {
			const v = gateAt(c, g);
			for (const q of [...v.controls, ...v.targets]) {
				if (!wrong.has(q)) continue;
				const k = seen.get(q) ?? 0;
				if (k >= 2) continue;
				seen.set(q, k + 1);
				add(g, 1 / (k + 1), `one of the last gates to touch ${qubitLabel(c.registers, q)}, which ends wrong for input ${JSON.stringify(failures[0].input)}`);
				break;
			}
		}
	}
	return [...byGate.values()].sort((a, b) => b.score - a.score || a.gate - b.gate).slice(0, limit);
}
