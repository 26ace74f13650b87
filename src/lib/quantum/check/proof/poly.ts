/**
 * Polynomial building for the Fourier-form prover: XOR-of-monomials (ANF) over input bits for
 * classical qubits, their multilinear expansion as integer polynomials, products, and the
 * comparison of polynomials mod 2^bits. A monomial is a key of flat input qubits joined by `.`
 * (`''` is the constant 1). Qubit order: flat (register offset + index, index 0 = LSB).
 */
import { mulKeys, type IntPoly } from '../spec.js';

/** XOR of monomials; each present monomial remembers the gates that toggled it in. */
export type Anf = Map<string, number[]>;

/** The circuit leaves the Fourier form at `gate`: only a sweep can judge it. */
export class Outside extends Error {
	constructor(
		message: string,
		readonly gate: number
	) {
		super(message);
	}
}

/** The QFT and the inverse QFT on a register do not match at `gate` (a refutation, not "outside"). */
export class Mismatch extends Error {
	constructor(
		message: string,
		readonly gate: number
	) {
		super(message);
	}
}

const MAX_ANF_TERMS_EXPANDED = 12;
/** Most terms a phase polynomial (or the global phase) may hold. */
export const MAX_POLY_TERMS = 4_000_000;

/** Multilinear expansion of an ANF (XOR of monomials) as integer coefficients: [f₁⊕…⊕f_r] = Σ_{∅≠T} (−2)^{|T|−1} ∏_T f. */
export function anfToPoly(anf: Anf | Iterable<string>, gate: number): IntPoly {
	const keys = anf instanceof Map ? [...anf.keys()] : [...anf];
	if (keys.length > MAX_ANF_TERMS_EXPANDED) throw new Outside(`a control holds an XOR of ${keys.length} terms; expanding it would take 2^${keys.length} terms`, gate);
	const out: IntPoly = new Map();
	const n = keys.length;
	for (let mask = 1; mask < 1 << n; mask++) {
		let key = '';
		let size = 0;
		for (let i = 0; i < n; i++)
			if (mask & (1 << i)) {
				key = mulKeys(key, keys[i]);
				size++;
			}
		const c = (-2n) ** BigInt(size - 1);
		const v = (out.get(key) ?? 0n) + c;
		if (v === 0n) out.delete(key);
		else out.set(key, v);
	}
	return out;
}

/** Product of two integer polynomials over bits (monomials multiply by union). */
export function polyTimes(a: IntPoly, b: IntPoly, gate: number): IntPoly {
	if (a.size === 1 && a.has('')) {
		const k = a.get('')!;
		return k === 1n ? b : new Map([...b].map(([x, c]) => [x, c * k]));
	}
	const out: IntPoly = new Map();
	for (const [ka, ca] of a)
		for (const [kb, cb] of b) {
			const k = mulKeys(ka, kb);
			const v = (out.get(k) ?? 0n) + ca * cb;
			if (v === 0n) out.delete(k);
			else out.set(k, v);
			if (out.size > 100_000) throw new Outside('a phase expands to more than 100000 terms', gate);
		}
	return out;
}

/** The product of the expansions of `factors` (1 for none). */
export function productOf(factors: Anf[], gate: number): IntPoly {
	let poly: IntPoly = new Map([['', 1n]]);
	for (const a of factors) poly = polyTimes(poly, anfToPoly(a, gate), gate);
	return poly;
}

/** 1 − 2·m for the polynomial m of a mask: the sign a phase takes on a qubit flipped by X^mask. */
export function oneMinusTwice(m: IntPoly): IntPoly {
	const out: IntPoly = new Map([['', 1n]]);
	for (const [k, v] of m) {
		const x = (out.get(k) ?? 0n) - 2n * v;
		if (x === 0n) out.delete(k);
		else out.set(k, x);
	}
	return out;
}

/** target ⊕= ∏ factors over GF(2) (a multi-controlled X on a classical qubit); new monomials remember `gate`. */
export function anfXorProduct(target: Anf, factors: Anf[], gate: number): void {
	// product of ANFs over GF(2): pairwise unions, XOR-accumulated
	let prod = new Map<string, true>([['', true]]);
	for (const f of factors) {
		const next = new Map<string, true>();
		for (const a of prod.keys())
			for (const b of f.keys()) {
				const k = mulKeys(a, b);
				if (next.has(k)) next.delete(k);
				else next.set(k, true);
			}
		prod = next;
		if (prod.size > 4096) throw new Outside('a Toffoli product holds more than 4096 terms', gate);
	}
	for (const k of prod.keys()) {
		const w = target.get(k);
		if (w) target.delete(k);
		else target.set(k, [gate]);
	}
}

/** a ≡ b coefficient by coefficient, mod 2^bits. */
export function polyEqualMod(a: IntPoly, b: IntPoly, bits: number): boolean {
	const m = 1n << BigInt(bits);
	const keys = new Set([...a.keys(), ...b.keys()]);
	for (const k of keys) if (((a.get(k) ?? 0n) - (b.get(k) ?? 0n)) % m !== 0n) return false;
	return true;
}

/** A polynomial in words (first 8 terms), monomials named by `name`. */
export function polyText(p: IntPoly, name: (k: string) => string): string {
	if (p.size === 0) return '0';
	const parts = [...p].slice(0, 8).map(([k, v]) => (k === '' ? String(v) : `${v === 1n ? '' : `${v}·`}${name(k)}`));
	return parts.join(' + ') + (p.size > 8 ? ` + … (${p.size} terms)` : '');
}
