/**
 * Resource figures of the modular parts, beside published ones. Gate, rotation and Toffoli
 * counts are derived for Orrery's lowering (Beauregard 2003, quant-ph/0205095, Figs. 5–7) as
 * formulas in n (N < 2^n, Fourier register m = n + 1 qubits) and compared with the lowered
 * circuit. Angles in turns; a rotation of 1/2^k turn is R_k.
 *
 * Derivation (QFT without swaps, cutoff A ≤ m keeps R_d for d ≤ A):
 * - QFT on m qubits: m H and P(m, A) = Σ_{δ=1}^{A−1} (m − δ) controlled rotations.
 * - A constant adder of c on m qubits has r(c) = m − ν₂(c) rotations (ν₂: how many times 2
 *   divides c; the rotations for levels ≤ ν₂(c) are 0 and are not emitted).
 * - Each rotation with k controls costs g gates and ρ rotations: k ≤ 1 → 1 gate, 1 rotation;
 *   k = 2 by lowering: native 1/1, ancilla 3/1 (two Toffolis), no-ancilla 5/3, quarter 13/7.
 * - Modular adder: 3·r(a)·g_k + 2·r(N) + 4 QFTs + 2 CNOT + 2 X. For odd a and N and an exact
 *   QFT: 2m² + (4 + 3g)m + 4 gates.
 * - Multiplier (x of n qubits): QFT + Σ_j adder(c_j) + inverse QFT, with c_j = 2^j·a mod N.
 * - In-place multiplier: two multipliers (a, then a⁻¹ reversed) and n swaps (controlled: CNOT,
 *   Toffoli, CNOT each). Exponentiation: one in-place multiplier per exponent bit.
 * T counts use Toffoli = 7 T (Nielsen & Chuang, Fig. 4.9); arbitrary rotations are not T gates
 * and are counted apart; a native doubly controlled phase has no T count until it is lowered.
 */
import { reduceSigned } from '../angle.js';
import { GateCode, type CcpLowering, type CircuitDocument, type LoweredCircuit, type ModularItem } from '../circuit.js';
import { modInverse, multiplierConstants, powMod } from '../modular.js';

/** Cost of one rotation with two controls by lowering: gates, rotations, Toffolis. */
export const CCP_COST: Record<CcpLowering, { gates: number; rotations: number; toffolis: number }> = {
	native: { gates: 1, rotations: 1, toffolis: 0 },
	ancilla: { gates: 3, rotations: 1, toffolis: 2 },
	'no-ancilla': { gates: 5, rotations: 3, toffolis: 0 },
	quarter: { gates: 13, rotations: 7, toffolis: 0 }
};
/** Extra halvings of the finest angle a lowering makes (θ/2, θ/4). */
const CCP_FINER: Record<CcpLowering, number> = { native: 0, ancilla: 0, 'no-ancilla': 1, quarter: 2 };

/** T gates per Toffoli (Nielsen & Chuang, Fig. 4.9). */
export const T_PER_TOFFOLI = 7;

/** Counts of one part (or one sub-step). */
export interface Counts {
	gates: number;
	rotations: number;
	toffolis: number;
	/** Native doubly controlled phases left (then the T count is not defined). */
	nativeCcp: number;
	/** Finest rotation: largest k with a rotation of odd/2^k turn. */
	finest: number;
}

const zero = (): Counts => ({ gates: 0, rotations: 0, toffolis: 0, nativeCcp: 0, finest: 0 });
const plus = (a: Counts, b: Counts): Counts => ({ gates: a.gates + b.gates, rotations: a.rotations + b.rotations, toffolis: a.toffolis + b.toffolis, nativeCcp: a.nativeCcp + b.nativeCcp, finest: Math.max(a.finest, b.finest) });

/** ν₂(c mod 2^m), capped at m. */
function nu2(c: bigint, m: number): number {
	const mod = 1n << BigInt(m);
	let v = ((c % mod) + mod) % mod;
	if (v === 0n) return m;
	let k = 0;
	while ((v & 1n) === 0n) {
		v >>= 1n;
		k++;
	}
	return k;
}

/** Rotations of the QFT on m qubits with cutoff A. */
export function qftRotations(m: number, approx: number): number {
	const A = Math.min(approx, m);
	return (A - 1) * m - (A * (A - 1)) / 2;
}

function qft(m: number, approx: number): Counts {
	const p = qftRotations(m, approx);
	return { gates: m + p, rotations: p, toffolis: 0, nativeCcp: 0, finest: p > 0 ? Math.min(approx, m) : 0 };
}

function constAdd(c: bigint, m: number, controls: number, lowering: CcpLowering): Counts {
	const nu = nu2(c, m);
	const r = m - nu;
	if (r === 0) return zero();
	const cost = controls < 2 ? { gates: 1, rotations: 1, toffolis: 0 } : CCP_COST[lowering];
	const finer = controls < 2 ? 0 : CCP_FINER[lowering];
	return { gates: r * cost.gates, rotations: r * cost.rotations, toffolis: r * cost.toffolis, nativeCcp: controls === 2 && lowering === 'native' ? r : 0, finest: m - nu + finer };
}

/** Modular adder of a on m qubits with k controls (Fig. 5). */
export function modAddCounts(a: bigint, N: bigint, m: number, controls: number, lowering: CcpLowering, approx: number, swaps = false): Counts {
	let t = zero();
	t = plus(t, constAdd(a, m, controls, lowering));
	t = plus(t, constAdd(-N, m, 0, lowering));
	t = plus(t, constAdd(N, m, 1, lowering));
	t = plus(t, constAdd(-a, m, controls, lowering));
	t = plus(t, constAdd(a, m, controls, lowering));
	const q = qft(m, approx);
	for (let i = 0; i < 4; i++) t = plus(t, q);
	t.gates += 4 + (swaps ? 4 * Math.floor(m / 2) : 0); // two CNOTs, two X (and the swaps of a swapped layout's QFTs)
	return t;
}

/** Out-of-place multiplier (Fig. 6) with constants c_j for an x of `xBits` qubits. */
export function modMulCounts(a: bigint, N: bigint, m: number, xBits: number, controlled: boolean, lowering: CcpLowering, approx: number): Counts {
	let t = plus(qft(m, approx), qft(m, approx));
	for (const c of multiplierConstants(a, N, xBits)) t = plus(t, modAddCounts(c, N, m, controlled ? 2 : 1, lowering, approx));
	return t;
}

/** In-place multiplier (Fig. 7). */
export function modMulInPlaceCounts(a: bigint, N: bigint, m: number, controlled: boolean, lowering: CcpLowering, approx: number): Counts {
	const n = m - 1;
	const inv = modInverse(a % N, N) ?? 1n;
	let t = plus(modMulCounts(a, N, m, n, controlled, lowering, approx), modMulCounts(inv, N, m, n, controlled, lowering, approx));
	t = plus(t, { gates: controlled ? 3 * n : n, rotations: 0, toffolis: controlled ? n : 0, nativeCcp: 0, finest: 0 });
	return t;
}

/** Modular exponentiation over an exponent of `e` bits. */
export function modExpCounts(a: bigint, N: bigint, m: number, e: number, lowering: CcpLowering, approx: number): Counts {
	let t = zero();
	for (let i = 0; i < e; i++) t = plus(t, modMulInPlaceCounts(powMod(a, 1n << BigInt(i), N), N, m, true, lowering, approx));
	return t;
}

/**
 * Closed form for odd constants and an exact QFT, as text and value: the gates of the part when
 * no adder rotation vanishes (Beauregard's count shape). `n` is the bit size of N.
 */
export function closedForm(kind: ModularItem['type'], n: number, g: number, controlled: boolean, e = 0): { text: string; value: number } {
	const m = n + 1;
	const add = 2 * m * m + (4 + 3 * g) * m + 4;
	const addOne = 2 * m * m + 7 * m + 4;
	const mul = (k2: boolean) => m * (m + 1) + n * (k2 ? add : addOne);
	switch (kind) {
		case 'mod-add':
			return { text: `2m² + ${4 + 3 * g}m + 4, m = n+1`, value: add };
		case 'mod-mul':
			return { text: `m(m+1) + n·(2m² + ${controlled ? 4 + 3 * g : 7}m + 4)`, value: mul(controlled) };
		case 'mod-mul-inplace':
			return { text: `2·[m(m+1) + n·(2m² + ${controlled ? 4 + 3 * g : 7}m + 4)] + ${controlled ? 3 : 1}n`, value: 2 * mul(controlled) + (controlled ? 3 : 1) * n };
		case 'mod-exp':
			return { text: `e·(2·[m(m+1) + n·(2m² + ${4 + 3 * g}m + 4)] + 3n)`, value: e * (2 * mul(true) + 3 * n) };
	}
}

/** Figures of one top-level modular part: formula against lowered, and published qubit counts. */
export interface ModularFigures {
	itemId: string;
	kind: ModularItem['type'];
	label: string;
	/** Bits of N's register (N < 2^n). */
	n: number;
	lowering: CcpLowering;
	approx: number;
	formula: Counts;
	lowered: Counts;
	/** The closed form for odd constants and an exact QFT (shape of the count). */
	closed: { text: string; value: number };
	tCount: number | null;
	/** Qubits the whole circuit uses, and Beauregard 2003's 2n + 3 (one recycled control qubit; exponentiation only). */
	qubits: number;
	published: { qubits: number; source: string } | null;
	/** With the QFT cutoff: the exact QFT's rotation count and finest angle, for comparison. */
	exact: { rotations: number; finest: number };
}

/** Count rotations, Toffolis and the finest angle over gates [start, end) of a lowered circuit. */
export function countRange(c: LoweredCircuit, start: number, end: number): Counts {
	const t = zero();
	for (let g = start; g < end; g++) {
		t.gates++;
		const k = c.kinds[g];
		if (k === GateCode.ccx) t.toffolis++;
		if (k === GateCode.mcp && c.controlCounts[g] === 2) t.nativeCcp++;
		const ai = c.angleIndex[g];
		if (ai >= 0) {
			t.rotations++;
			const s = reduceSigned(c.angles[ai]);
			if (s.exact && s.num !== 0n) t.finest = Math.max(t.finest, s.exp);
		}
	}
	return t;
}

function formulaOf(doc: CircuitDocument, item: ModularItem, sizes: Map<string, number>, lowering: CcpLowering, approx: number): Counts {
	const a = BigInt(item.value);
	const N = BigInt(item.modulus);
	switch (item.type) {
		case 'mod-add':
			return modAddCounts(a, N, sizes.get(item.target)!, item.controls?.length ?? 0, lowering, approx, item.layout === 'swapped' || (!item.layout && doc.defaults?.layout === 'swapped'));
		case 'mod-mul':
			return modMulCounts(a, N, sizes.get(item.target)!, sizes.get(item.x)!, !!item.control, lowering, approx);
		case 'mod-mul-inplace':
			return modMulInPlaceCounts(a, N, sizes.get(item.work)!, !!item.control, lowering, approx);
		case 'mod-exp':
			return modExpCounts(a, N, sizes.get(item.work)!, sizes.get(item.exponent)!, lowering, approx);
	}
}

/** Figures for every top-level modular part of a document and its lowered circuit. */
export function modularFigures(doc: CircuitDocument, c: LoweredCircuit): ModularFigures[] {
	const sizes = new Map(c.registers.map((r) => [r.name, r.size]));
	const out: ModularFigures[] = [];
	for (const item of doc.body) {
		if (item.type !== 'mod-add' && item.type !== 'mod-mul' && item.type !== 'mod-mul-inplace' && item.type !== 'mod-exp') continue;
		const block = c.blocks.find((b) => b.parent === -1 && b.itemId === item.id);
		if (!block) continue;
		const m = sizes.get(item.type === 'mod-add' || item.type === 'mod-mul' ? item.target : item.work)!;
		const n = m - 1;
		const lowering = item.ccpLowering ?? doc.defaults?.ccpLowering ?? 'native';
		const approx = typeof item.approx === 'number' ? Math.min(item.approx, m) : m;
		const formula = formulaOf(doc, item, sizes, lowering, approx);
		const exactCounts = approx < m ? formulaOf(doc, item, sizes, lowering, m) : formula;
		const lowered = countRange(c, block.start, block.end);
		const controlled = item.type === 'mod-add' ? (item.controls?.length ?? 0) === 2 : item.type === 'mod-exp' || !!item.control;
		const g = controlled ? CCP_COST[lowering].gates : 1;
		const closed = closedForm(item.type, n, g, controlled, item.type === 'mod-exp' ? sizes.get(item.exponent)! : 0);
		out.push({
			itemId: item.id,
			kind: item.type,
			label: block.label,
			n,
			lowering,
			approx,
			formula,
			lowered,
			closed,
			tCount: lowered.nativeCcp ? null : lowered.toffolis * T_PER_TOFFOLI,
			qubits: c.qubitCount,
			published: item.type === 'mod-exp' ? { qubits: 2 * n + 3, source: 'Beauregard 2003 (quant-ph/0205095): 2n + 3 with one control qubit measured and reused for every exponent bit' } : null,
			exact: { rotations: exactCounts.rotations, finest: exactCounts.finest }
		});
	}
	return out;
}
