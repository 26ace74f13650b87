// What the dial board draws, independent of the engine's frame format (the workbench maps
// engine frames onto this). Angles are in turns, in [0, 1); qubit order: index 0 = LSB.

/** One qubit as a dial. */
export interface DialQubit {
	/** Flat qubit index in the lowered circuit. */
	qubit: number;
	register: string;
	index: number;
	kind: 'classical' | 'fourier' | 'mixed';
	/** Classical value (kind 'classical'). */
	bit?: 0 | 1;
	/** Fourier level m (2^m ticks) when known. */
	level?: number;
	/** Actual angle in turns (fourier / mixed), and its exact text, e.g. "5/16". */
	angle?: number;
	angleText?: string;
	/** Expected angle in turns where the circuit states one, with its exact text. */
	expected?: number;
	expectedText?: string;
	/** What the expectation means, when a part says (a modular adder's ancilla: "b + a < N: 2 + 4 < 21 holds"). */
	expectedNote?: string;
	/** Divergence actual − expected in (−½, ½] turn; 0 when in phase. */
	divergence?: number;
	divergenceText?: string;
	/** Length of the Bloch vector's equatorial part, 0..1 (1 for a pure Fourier-basis qubit). */
	coherence?: number;
}

export interface DialGroup {
	register: string;
	qubits: DialQubit[];
}

/** Turns below this count as "in phase" for drawing (exact zero for dyadic angles). */
export const DIVERGENCE_EPSILON = 1e-9;

/** A dial's actual angle as written beside it: the exact text, else the float to 4 places. */
export function dialAngleText(q: DialQubit): string {
	return q.angleText ?? (q.angle !== undefined ? q.angle.toFixed(4) : '?');
}

export function isDiverged(q: DialQubit): boolean {
	return q.divergence !== undefined && Math.abs(q.divergence) > DIVERGENCE_EPSILON;
}

/** Groups qubits by register, keeping register order of first appearance and index order inside. */
export function groupByRegister(qubits: DialQubit[]): DialGroup[] {
	const groups = new Map<string, DialQubit[]>();
	for (const q of qubits) {
		let g = groups.get(q.register);
		if (!g) groups.set(q.register, (g = []));
		g.push(q);
	}
	return [...groups].map(([register, qs]) => ({ register, qubits: qs.sort((a, b) => a.index - b.index) }));
}

/**
 * How many ticks to draw for a level-m dial of radius r px: all 2^m when they stay at least
 * `minGap` px apart, else thinned to the largest power of two that does (every tick drawn is a
 * true tick: multiples of 2^(m−j)).
 */
export function visibleTickCount(level: number, radius: number, minGap = 3): number {
	const circumference = 2 * Math.PI * radius;
	let n = 2 ** Math.min(level, 16);
	while (n > 1 && circumference / n < minGap) n /= 2;
	return n;
}

/** Shortest signed path from `from` to `to` in turns, in (−½, ½]. */
export function shortestTurn(from: number, to: number): number {
	let d = (to - from) % 1;
	if (d > 0.5) d -= 1;
	if (d <= -0.5) d += 1;
	return d;
}

/** Layout of the board: dials in rows per register, wrapping at `width`. */
export interface DialLayout {
	cell: number;
	positions: { qubit: number; x: number; y: number }[];
	headers: { register: string; x: number; y: number }[];
	width: number;
	height: number;
}

export function layoutDials(groups: DialGroup[], width: number, cell = 132, header = 28): DialLayout {
	const perRow = Math.max(1, Math.floor((width - 16) / cell));
	const positions: DialLayout['positions'] = [];
	const headers: DialLayout['headers'] = [];
	let y = 8;
	for (const g of groups) {
		headers.push({ register: g.register, x: 8, y });
		y += header;
		// Most significant bit on the left, as a number is written.
		const ordered = [...g.qubits].reverse();
		ordered.forEach((q, i) => {
			const col = i % perRow;
			const row = Math.floor(i / perRow);
			positions.push({ qubit: q.qubit, x: 8 + col * cell + cell / 2, y: y + row * cell + cell / 2 - 16 });
		});
		y += Math.ceil(g.qubits.length / perRow) * cell + 6;
	}
	return { cell, positions, headers, width, height: y + 8 };
}
