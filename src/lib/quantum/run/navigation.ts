/**
 * Step navigation over a lowered circuit's blocks: boundaries, step over (a whole block one level
 * deeper, or one rotation unit), step out (to the end of the innermost block). Steps: step s is the
 * state after s gates; `lastStep` is where a stopped run ends.
 */
import type { LoweredCircuit } from '../circuit.js';

/** Sorted, distinct block boundary steps (every block start and end, and 0 and stepCount). */
export function blockBoundaries(c: LoweredCircuit, stepCount: number): number[] {
	const s = new Set<number>([0, stepCount]);
	for (const b of c.blocks) {
		s.add(b.start);
		s.add(b.end);
	}
	return [...s].sort((a, b) => a - b);
}

/** Index of the first boundary greater than `step` (binary search). */
function boundaryAfter(xs: number[], step: number): number {
	let lo = 0;
	let hi = xs.length;
	while (lo < hi) {
		const mid = (lo + hi) >> 1;
		if (xs[mid] > step) hi = mid;
		else lo = mid + 1;
	}
	return lo;
}

/** Next boundary after `step` (or stepCount). */
export function nextBoundary(xs: number[], step: number, stepCount: number): number {
	const i = boundaryAfter(xs, step);
	return i < xs.length ? xs[i] : stepCount;
}

/** Previous boundary before `step` (or 0). */
export function previousBoundary(xs: number[], step: number): number {
	let i = boundaryAfter(xs, step) - 1;
	while (i >= 0 && xs[i] >= step) i--;
	return i >= 0 ? xs[i] : 0;
}

/** Depth of the innermost block strictly around step (start < step < end), −1 at top level. */
function depthAt(c: LoweredCircuit, step: number): number {
	let d = -1;
	for (const b of c.blocks) if (b.start < step && step < b.end && b.depth > d) d = b.depth;
	return d;
}

/**
 * Step over: if the next gate starts a block one level deeper than the current position, jump
 * past that whole block; otherwise past the current rotation unit (gates of one block sharing the
 * same loop indices, e.g. one lowered ccp); otherwise one gate.
 */
export function stepOver(c: LoweredCircuit, step: number, lastStep: number): number {
	if (step >= lastStep) return lastStep;
	const d = depthAt(c, step);
	let best: number | null = null;
	for (const b of c.blocks) if (b.start === step && b.depth === d + 1 && b.end > step) best = Math.max(best ?? 0, b.end);
	if (best !== null) return Math.min(best, lastStep);
	const blk = c.blockOf[step];
	let e = step + 1;
	while (e < c.gateCount && c.blockOf[e] === blk && c.loops[3 * e] === c.loops[3 * step] && c.loops[3 * e + 1] === c.loops[3 * step + 1] && c.loops[3 * e + 2] === c.loops[3 * step + 2] && c.loops[3 * step] >= 0) e++;
	return Math.min(e, lastStep);
}

/** Step out: to the end of the innermost block around `step`, or the last step. */
export function stepOut(c: LoweredCircuit, step: number, stepCount: number, lastStep: number): number {
	let best: { depth: number; end: number } | null = null;
	for (const b of c.blocks) if (b.start < step && step < b.end && (!best || b.depth > best.depth)) best = { depth: b.depth, end: b.end };
	return Math.min(best ? best.end : stepCount, lastStep);
}
