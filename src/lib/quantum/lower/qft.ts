/**
 * The QFT pass. Time order without swaps: for i = n−1 … 0: H(q_i), then for k = i−1 … 0:
 * cp(q_k → q_i, 1/2^(i−k+1) turn); qubit i then holds x/2^(i+1) turn (layout `unswapped`). With
 * swaps, swap(q_l, q_(n−1−l)) for l < ⌊n/2⌋ follows (layout `swapped`, level n−i). The inverse is
 * the exact reverse with negated angles. `approx` drops rotations 1/2^d with d > approx.
 */
import { dyadic } from '../angle.js';
import { GateCode, type BlockEffect, type FourierLayout, type PlacedRegister, type SourcePosition } from '../circuit.js';
import { reg, type LowerContext } from './context.js';

export function emitQft(ctx: LowerContext, kind: 'qft' | 'iqft', id: string, label: string | undefined, r: PlacedRegister, swaps: boolean, approx: number, source?: SourcePosition): void {
	const sink = ctx.sink;
	const n = r.size;
	const layout: FourierLayout = swaps ? 'swapped' : 'unswapped';
	const levelText = swaps ? `qubit i at level ${n}−i` : 'qubit i at level i+1';
	const effect: BlockEffect =
		kind === 'qft'
			? {
					text: `${r.name}: |x⟩ → Fourier basis holding x (${layout}: ${levelText})${approx < n ? `, approximate: rotations R_d with d > ${approx} omitted` : ''}`,
					writes: [{ register: r.name, basis: 'fourier', layout, value: reg(r.name) }],
					requires: [{ register: r.name, basis: 'computational' }]
				}
			: {
					text: `${r.name}: Fourier basis holding x (${layout}) → |x⟩${approx < n ? `, approximate: rotations R_d with d > ${approx} omitted` : ''}`,
					writes: [{ register: r.name, basis: 'computational', value: reg(r.name) }],
					requires: [{ register: r.name, basis: 'fourier', layout }]
				};
	const b = sink.open(kind, id, label ?? `${kind}(${r.name})`, { kind, register: r.name, swaps, approx }, effect, ['j', 'k'], source);
	const q0 = r.offset;
	if (kind === 'qft') {
		for (let i = n - 1; i >= 0; i--) {
			sink.l0 = i;
			sink.l1 = -1;
			sink.g1(GateCode.h, q0 + i);
			for (let k = i - 1; k >= 0; k--) {
				const d = i - k + 1;
				if (d > approx) continue;
				sink.l1 = k;
				sink.g2(GateCode.cp, 1, q0 + k, q0 + i, sink.angleId(dyadic(1n, d)));
			}
		}
		if (swaps) emitSwaps(ctx, q0, n);
	} else {
		if (swaps) emitSwaps(ctx, q0, n);
		for (let i = 0; i < n; i++) {
			sink.l0 = i;
			for (let k = 0; k < i; k++) {
				const d = i - k + 1;
				if (d > approx) continue;
				sink.l1 = k;
				sink.g2(GateCode.cp, 1, q0 + k, q0 + i, sink.angleId(dyadic(-1n, d)));
			}
			sink.l1 = -1;
			sink.g1(GateCode.h, q0 + i);
		}
	}
	sink.close(b);
}

/** swap(q_l, q_(n−1−l)) for l < ⌊n/2⌋, the register reversal that makes the QFT the exact DFT. */
function emitSwaps(ctx: LowerContext, q0: number, n: number): void {
	const sink = ctx.sink;
	for (let l = 0; l < n >> 1; l++) {
		sink.l0 = l;
		sink.l1 = -1;
		sink.g2(GateCode.swap, 0, q0 + l, q0 + n - 1 - l);
	}
}
