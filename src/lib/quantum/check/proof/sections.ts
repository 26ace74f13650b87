/**
 * Section search for the Fourier-form prover: find a QFT or an inverse QFT on a register from the
 * raw gates (its own Hadamards, controlled phases and swaps, in one run), probe it on symbolic bits
 * to learn each qubit's level and any wrong rotation inside it, and name its layout. Qubit order:
 * flat (register offset + index, index 0 = LSB); angles in turns.
 */
import { addAngles, dyadic, isZeroSigned, negateAngle, reduceSigned, subtractAngles, ZERO_ANGLE, type Angle } from '../../angle.js';
import { gateAt, GateCode, type LoweredCircuit, type PlacedRegister } from '../../circuit.js';
import type { SectionInfo } from '../proof.js';
import { Outside } from './poly.js';
import { inRegister, pushWrong, qubitsOf, type Contribution, type Prover } from './state.js';

/** Gates of a QFT (mode qft) or inverse QFT (mode iqft) on r starting at gate g0: every qubit of r gets its Hadamard once. */
export function findSegment(c: LoweredCircuit, g0: number, r: PlacedRegister, mode: 'qft' | 'iqft'): number[] {
	const fourier = new Uint8Array(r.size).fill(mode === 'qft' ? 0 : 1);
	let done = 0;
	const seg: number[] = [];
	for (let g = g0; g < c.gateCount; g++) {
		const qs = qubitsOf(c, g);
		const inside = qs.filter((q) => inRegister(q, r)).length;
		if (inside === 0) continue;
		if (inside !== qs.length) break;
		const k = c.kinds[g];
		const complete = done === r.size;
		if (k === GateCode.swap) {
			const [a, b] = qs.map((q) => q - r.offset);
			[fourier[a], fourier[b]] = [fourier[b], fourier[a]];
		} else if (complete) break;
		else if (k === GateCode.h) {
			const j = qs[0] - r.offset;
			if (fourier[j] !== (mode === 'qft' ? 0 : 1)) break;
			fourier[j] = mode === 'qft' ? 1 : 0;
			done++;
		} else if (k === GateCode.cp) {
			const [a, b] = qs.map((q) => q - r.offset);
			if (fourier[a] === fourier[b]) break;
		} else break;
		seg.push(g);
	}
	if (done !== r.size) throw new Outside(`the ${mode === 'qft' ? 'QFT' : 'inverse QFT'} on ${r.name} starting at gate ${g0} is incomplete: ${r.size - done} of its qubits never get their Hadamard in one run`, g0);
	return seg;
}

/**
 * Check a QFT-like segment (inverse QFTs are passed reversed with negated angles) on symbolic
 * bits y_j of r; returns the level of each qubit position and records any wrong QFT terms.
 */
export function probeSegment(p: Prover, seg: number[], r: PlacedRegister, reversed: boolean, where: 'qft' | 'iqft'): number[] {
	type P = { fourier: boolean; v: number; phase: Map<number, { angle: Angle; from: Contribution[] }> };
	const loc: P[] = Array.from({ length: r.size }, (_, j) => ({ fourier: false, v: j, phase: new Map() }));
	const order = reversed ? [...seg].reverse() : seg;
	for (const g of order) {
		const gv = gateAt(p.c, g);
		const qs = [...gv.controls, ...gv.targets].map((q) => q - r.offset);
		if (gv.kind === 'swap') [loc[qs[0]], loc[qs[1]]] = [loc[qs[1]], loc[qs[0]]];
		else if (gv.kind === 'h') {
			const x = loc[qs[0]];
			x.fourier = true;
			x.phase.set(x.v, { angle: dyadic(1n, 1), from: [[g, dyadic(1n, 1)]] });
		} else {
			const [a, b] = qs;
			const [cl, fo] = loc[a].fourier ? [loc[b], loc[a]] : [loc[a], loc[b]];
			const ang = reversed ? negateAngle(gv.angle!) : gv.angle!;
			const t = fo.phase.get(cl.v) ?? { angle: ZERO_ANGLE, from: [] };
			t.angle = addAngles(t.angle, ang);
			t.from.push([g, ang]);
			fo.phase.set(cl.v, t);
		}
	}
	const levels = loc.map((x) => x.v + 1);
	loc.forEach((x, j) => {
		const m = levels[j];
		for (let k = 0; k < r.size; k++) {
			const want = k < m ? dyadic(1n, m - k) : ZERO_ANGLE;
			const got = x.phase.get(k) ?? { angle: ZERO_ANGLE, from: [] };
			p.termsChecked++;
			const d = reduceSigned(subtractAngles(got.angle, want));
			if (!isZeroSigned(d)) pushWrong(p, `${r.name}[${j}]`, `${r.name}[${k}] (starting bit)`, want, got.angle, got.from, where, d);
		}
	});
	const sorted = [...levels].sort((x, y) => x - y);
	if (sorted.some((m, i) => m !== i + 1)) throw new Outside(`the ${where === 'qft' ? 'QFT' : 'inverse QFT'} on ${r.name} gives levels ${levels.join(', ')}, not a permutation of 1..${r.size}`, seg[0]);
	return levels;
}

/** Whether any Hadamard on r comes at or after gate `from` (then a section's value is intermediate). */
export function laterHadamardOn(c: LoweredCircuit, r: PlacedRegister, from: number): boolean {
	for (let g = from; g < c.gateCount; g++) if (c.kinds[g] === GateCode.h && inRegister(c.qubitList[c.qubitStart[g]], r)) return true;
	return false;
}

/** unswapped (level i+1), swapped (level n−i) or permuted. */
export function layoutName(levels: number[]): SectionInfo['layout'] {
	const n = levels.length;
	if (levels.every((m, i) => m === i + 1)) return 'unswapped';
	if (levels.every((m, i) => m === n - i)) return 'swapped';
	return 'permuted';
}
