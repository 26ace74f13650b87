/**
 * Number theory and parameter rules of the modular parts (Beauregard 2003, "Circuit for Shor's
 * algorithm using 2n+3 qubits", quant-ph/0205095). Exact BigInt arithmetic; no qubits here.
 * Register sizes: the Fourier register holds n+1 qubits for a modulus N < 2^n.
 */
import type { ModularItem } from './circuit.js';

/** Greatest common divisor of two non-negative integers. */
export function gcd(a: bigint, b: bigint): bigint {
	while (b) [a, b] = [b, a % b];
	return a < 0n ? -a : a;
}

/** a⁻¹ mod n (0 < result < n), or null when gcd(a, n) ≠ 1. */
export function modInverse(a: bigint, n: bigint): bigint | null {
	let [r0, r1] = [((a % n) + n) % n, n];
	let [s0, s1] = [1n, 0n];
	while (r1) {
		const q = r0 / r1;
		[r0, r1] = [r1, r0 - q * r1];
		[s0, s1] = [s1, s0 - q * s1];
	}
	if (r0 !== 1n) return null;
	return ((s0 % n) + n) % n;
}

/** b^e mod n by squaring (e ≥ 0, n ≥ 1). */
export function powMod(b: bigint, e: bigint, n: bigint): bigint {
	let r = 1n % n;
	b = ((b % n) + n) % n;
	while (e > 0n) {
		if (e & 1n) r = (r * b) % n;
		b = (b * b) % n;
		e >>= 1n;
	}
	return r;
}

/**
 * The adder constants of a modular multiplier by a: c_0 = a as written, c_j = 2·c_(j−1) mod N.
 * With 0 < a < N these are 2^j·a mod N (Beauregard Fig. 6); a constant written unreduced reaches
 * the first adder as it is, which is what a hand-computed table with that slip would do.
 */
export function multiplierConstants(a: bigint, n: bigint, count: number): bigint[] {
	const out: bigint[] = [];
	let c = a;
	for (let j = 0; j < count; j++) {
		out.push(c);
		c = (2n * c) % n;
	}
	return out;
}

/** One problem with a modular part's parameters: the field at fault and what is wrong. */
export interface ModularIssue {
	field: 'value' | 'modulus' | 'target' | 'x' | 'work' | 'y' | 'exponent' | 'controls' | 'control' | 'ancilla';
	message: string;
	/** Blocking issues stop the lowering; the others are said in the field and the part still lowers. */
	blocking: boolean;
}

/** Qubit count of the Fourier register of a part (target or work). */
export function fourierRegisterOf(item: ModularItem): string {
	return item.type === 'mod-add' || item.type === 'mod-mul' ? item.target : item.work;
}

/**
 * Check a modular part's numbers against its register sizes (`size` gives a register's qubit
 * count, undefined when unknown). Rules: N ≥ 2 and N < 2^n where the Fourier register has n+1
 * qubits; a < 2^(n+1); a ≥ N is said (not blocking) for adders and multipliers, which take it as
 * written; gcd(a, N) = 1 for the in-place multiplier and the exponentiation (a⁻¹ mod N needed);
 * the multiplied register has n qubits where the part swaps it with the work register.
 */
export function checkModularParameters(item: ModularItem, size: (register: string) => number | undefined): ModularIssue[] {
	const issues: ModularIssue[] = [];
	const fourierField = item.type === 'mod-add' || item.type === 'mod-mul' ? 'target' : 'work';
	const m = size(fourierRegisterOf(item));
	if (!/^\d+$/.test(item.modulus)) return [{ field: 'modulus', message: 'N must be a whole number', blocking: true }];
	if (!/^\d+$/.test(item.value)) return [{ field: 'value', message: 'a must be a whole number', blocking: true }];
	const N = BigInt(item.modulus);
	const a = BigInt(item.value);
	if (N < 2n) issues.push({ field: 'modulus', message: `N must be at least 2 (got ${N})`, blocking: true });
	if (m !== undefined && N >= 2n) {
		const n = m - 1;
		if (n < 1 || N >= 1n << BigInt(n)) {
			const need = N.toString(2).length;
			issues.push({ field: 'modulus', message: `N = ${N} needs N < 2^n: the ${fourierField} register must have n+1 = ${need + 1} qubits for n = ${need}, it has ${m}`, blocking: true });
		}
		if (a >= 1n << BigInt(m)) issues.push({ field: 'value', message: `a = ${a} does not fit the ${m}-qubit ${fourierField} register (a < ${1n << BigInt(m)})`, blocking: true });
	}
	if (issues.some((i) => i.blocking)) return issues;
	const reduced = a % N;
	if (item.type === 'mod-exp') {
		if (a === 0n || a >= N) issues.push({ field: 'value', message: `a must satisfy 0 < a < N = ${N} (got ${a})`, blocking: true });
	} else if (a >= N) {
		issues.push({ field: 'value', message: `a = ${a} is not reduced mod N = ${N} (a mod N = ${reduced}); the construction needs 0 < a < N, and this part will use ${a} as written`, blocking: false });
	}
	if (item.type !== 'mod-add' && reduced === 0n && !issues.some((i) => i.blocking))
		issues.push({ field: 'value', message: `a ≡ 0 mod N: the multiplier would multiply by zero`, blocking: true });
	if ((item.type === 'mod-mul-inplace' || item.type === 'mod-exp') && reduced !== 0n) {
		const g = gcd(reduced, N);
		if (g !== 1n) issues.push({ field: 'value', message: `gcd(a, N) = ${g}: a = ${a} has no inverse mod ${N}, so the in-place multiplier cannot clear its work register; pick a coprime to N`, blocking: true });
	}
	if (m !== undefined && (item.type === 'mod-mul-inplace' || item.type === 'mod-exp')) {
		const field = item.type === 'mod-exp' ? 'y' : 'x';
		const reg = item.type === 'mod-exp' ? item.y : item.x;
		const s = size(reg);
		if (s !== undefined && s !== m - 1) issues.push({ field, message: `${reg} must have n = ${m - 1} qubits (one fewer than the work register ${item.work}), it has ${s}`, blocking: true });
	}
	return issues;
}
