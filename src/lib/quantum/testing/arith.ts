/**
 * Test circuits built from published constructions, as circuit documents (each gate item gets a
 * `source` line = its position in the body, so reports can name lines):
 * - {@link cuccaroAdder}: the ripple-carry adder of Cuccaro, Draper, Kutin, Moulton 2004
 *   (quant-ph/0410184, MAJ and UMA gates, Fig. 2/3 there);
 * - {@link beauregardModAdder}: the doubly controlled modular adder φADD(a)MOD(N) of Beauregard
 *   2003 (quant-ph/0205095, Fig. 5), wrapped here in a QFT and an inverse QFT of b so its spec is
 *   stated in the computational basis;
 * - {@link beauregardCMult}: the controlled modular multiplier CMULT(a)MOD(N) (Fig. 6 there).
 * Faults are the ones a reviewer should catch; `fault` names one.
 *
 * Qubit order: index 0 = LSB. Fourier layout: QFT without swaps, qubit i at level i+1 (it holds
 * b/2^(i+1) turn), so adding a constant k puts p(k/2^(i+1) turn) on qubit i.
 */
import type { BodyItem, CircuitDocument, QubitRef, RegisterSpec } from '../circuit.js';

class Builder {
	body: BodyItem[] = [];
	private n = 0;
	private push(item: Omit<BodyItem, 'id' | 'source'> & Record<string, unknown>): void {
		this.n++;
		this.body.push({ ...item, id: `g${this.n}`, source: { line: this.n, column: 1 } } as BodyItem);
	}
	gate(gate: 'x' | 'cx' | 'ccx' | 'h', ...qubits: QubitRef[]): void {
		this.push({ type: 'gate', gate, qubits });
	}
	phase(qubits: QubitRef[], num: bigint, exp: number): void {
		const m = 1n << BigInt(exp);
		const k = ((num % m) + m) % m;
		if (k === 0n) return;
		const gate = qubits.length === 1 ? 'p' : qubits.length === 2 ? 'cp' : 'mcp';
		this.push({ type: 'gate', gate, qubits, angle: `${k}/${m} turn` });
	}
	qft(register: string, inverse = false): void {
		this.push({ type: inverse ? 'iqft' : 'qft', register, swaps: false });
	}
	doc(title: string, registers: RegisterSpec[], specs: string[], assume?: string[]): CircuitDocument {
		return { format: 'orrery.circuit', version: 1, title, registers, body: this.body, specs, ...(assume ? { assume } : {}) };
	}
}

const q = (register: string, index: number): QubitRef => ({ register, index });

/** Faults of {@link cuccaroAdder}. */
export type CuccaroFault = 'uncompute-cnot-reversed';

/**
 * Cuccaro ripple-carry adder on registers c (1 ancilla), a (n), b (n), z (1, carry out):
 * b ← a + b mod 2^n, z ← (a + b) >> n, a unchanged, c back to 0. Uses MAJ(c_i, b_i, a_i) =
 * CNOT(a→b), CNOT(a→c), Toffoli(c, b→a) and UMA = Toffoli(c, b→a), CNOT(a→c), CNOT(c→b).
 * Fault `uncompute-cnot-reversed`: in the UMA at position ⌊n/2⌋ the CNOT(a→c) runs as CNOT(c→a).
 */
export function cuccaroAdder(n: number, fault?: CuccaroFault): CircuitDocument {
	const B = new Builder();
	const cIn = (i: number) => (i === 0 ? q('c', 0) : q('a', i - 1));
	const maj = (x: QubitRef, y: QubitRef, z: QubitRef) => {
		B.gate('cx', z, y);
		B.gate('cx', z, x);
		B.gate('ccx', x, y, z);
	};
	const uma = (x: QubitRef, y: QubitRef, z: QubitRef, reversed: boolean) => {
		B.gate('ccx', x, y, z);
		if (reversed) B.gate('cx', x, z);
		else B.gate('cx', z, x);
		B.gate('cx', x, y);
	};
	for (let i = 0; i < n; i++) maj(cIn(i), q('b', i), q('a', i));
	B.gate('cx', q('a', n - 1), q('z', 0));
	for (let i = n - 1; i >= 0; i--) uma(cIn(i), q('b', i), q('a', i), fault === 'uncompute-cnot-reversed' && i === n >> 1);
	return B.doc(
		`Cuccaro ripple-carry adder, ${n} bits${fault ? ` (${fault})` : ''}`,
		[
			{ name: 'c', size: 1, role: 'ancilla' },
			{ name: 'a', size: n, role: 'input' },
			{ name: 'b', size: n, role: 'output' },
			{ name: 'z', size: 1, role: 'output' }
		],
		[`b = a + b mod 2^${n}`, `z = (a + b) >> ${n}`]
	);
}

/** Faults of the modular adder. */
export type ModAdderFault = 'no-add-back' | 'wrong-bit' | 'ancilla-dirty';

/** φADD(k) on the Fourier register b (n+1 qubits, unswapped), under `controls`; `sign` −1 subtracts. */
function phiAdd(B: Builder, size: number, k: bigint, controls: QubitRef[], sign: 1n | -1n): void {
	for (let i = 0; i < size; i++) B.phase([...controls, q('b', i)], sign * k, i + 1);
}

/** Beauregard's doubly controlled φADD(a)MOD(N) (Fig. 5) on Fourier b of n+1 qubits, ancilla anc[0]. */
function modAddBody(B: Builder, n: number, N: bigint, a: bigint, controls: QubitRef[], fault?: ModAdderFault): void {
	const size = n + 1;
	const top = q('b', n);
	phiAdd(B, size, a, controls, 1n);
	phiAdd(B, size, N, [], -1n);
	B.qft('b', true);
	B.gate('cx', fault === 'wrong-bit' ? q('b', n - 1) : top, q('anc', 0));
	B.qft('b');
	if (fault !== 'no-add-back') phiAdd(B, size, N, [q('anc', 0)], 1n);
	phiAdd(B, size, a, controls, -1n);
	B.qft('b', true);
	if (fault !== 'ancilla-dirty') {
		B.gate('x', top);
		B.gate('cx', top, q('anc', 0));
		B.gate('x', top);
	}
	B.qft('b');
	phiAdd(B, size, a, controls, 1n);
}

/**
 * Registers c (2 controls), b (n+1), anc (1): b ← (b + a) mod N when c = 3, else b; domain b < N.
 * The paper's gate takes φ(b); here a QFT before and an inverse QFT after make b computational.
 */
export function beauregardModAdder(n: number, N: bigint, a: bigint, fault?: ModAdderFault): CircuitDocument {
	const B = new Builder();
	B.qft('b');
	modAddBody(B, n, N, a, [q('c', 0), q('c', 1)], fault);
	B.qft('b', true);
	return B.doc(
		`Doubly controlled modular adder (+${a} mod ${N}), n = ${n}${fault ? ` (${fault})` : ''}`,
		[
			{ name: 'c', size: 2, role: 'input' },
			{ name: 'b', size: n + 1, role: 'output' },
			{ name: 'anc', size: 1, role: 'ancilla' }
		],
		[`b = c == 3 ? (b + ${a}) mod ${N} : b`],
		[`b < ${N}`]
	);
}

/** Faults of the multiplier. */
export type CMultFault = 'unreduced-constant';

/**
 * Controlled modular multiplier CMULT(a)MOD(N) (Fig. 6): registers c (1), x (n), b (n+1), anc (1):
 * b ← (b + a·x) mod N when c = 1, else b; domain b < N. The i-th modular adder adds 2^i·a mod N
 * under c and x_i. Fault `unreduced-constant`: the first constant 2^i·a that reaches N is added
 * without reducing it mod N.
 */
export function beauregardCMult(n: number, N: bigint, a: bigint, fault?: CMultFault): CircuitDocument {
	const B = new Builder();
	B.qft('b');
	let faulted = false;
	for (let i = 0; i < n; i++) {
		let k = (a << BigInt(i)) % N;
		if (fault === 'unreduced-constant' && !faulted && a << BigInt(i) >= N) {
			k = a << BigInt(i);
			faulted = true;
		}
		modAddBody(B, n, N, k, [q('c', 0), q('x', i)]);
	}
	B.qft('b', true);
	return B.doc(
		`Controlled modular multiplier (+${a}·x mod ${N}), n = ${n}${fault ? ` (${fault})` : ''}`,
		[
			{ name: 'c', size: 1, role: 'input' },
			{ name: 'x', size: n, role: 'input' },
			{ name: 'b', size: n + 1, role: 'output' },
			{ name: 'anc', size: 1, role: 'ancilla' }
		],
		[`b = c == 1 ? (b + ${a}*x) mod ${N} : b`],
		[`b < ${N}`]
	);
}

/**
 * An n-bit Fourier adder b ← a + b mod 2^n (Draper 2000, quant-ph/0008033) as OpenQASM 2 text,
 * QFT without swaps; the adding rotations are `cp` or, with `rotation = 'crz'`, `crz` — which is
 * cp(θ) times a phase −θ/2 on the control (qelib1.inc's definition), so its values are right and
 * its phase depends on a.
 */
export function fourierAdderQasm(n: number, rotation: 'cp' | 'crz' = 'cp'): string {
	const L: string[] = ['OPENQASM 2.0;', 'include "qelib1.inc";', `qreg a[${n}];`, `qreg b[${n}];`];
	for (let i = n - 1; i >= 0; i--) {
		L.push(`h b[${i}];`);
		for (let k = i - 1; k >= 0; k--) L.push(`cp(pi/${2 ** (i - k)}) b[${k}], b[${i}];`);
	}
	for (let j = 0; j < n; j++) for (let k = 0; k <= j; k++) L.push(`${rotation}(pi/${2 ** (j - k)}) a[${k}], b[${j}];`);
	for (let i = 0; i < n; i++) {
		for (let k = 0; k < i; k++) L.push(`cp(-pi/${2 ** (i - k)}) b[${k}], b[${i}];`);
		L.push(`h b[${i}];`);
	}
	return L.join('\n') + '\n';
}

/**
 * The same Fourier adder y ← x + y mod 2^n (Draper 2000, quant-ph/0008033), written on one flat
 * register `q[2n]` as a transpiler might: x is q[0..n−1] least-significant bit first, y is
 * q[n..2n−1] **most-significant bit first** (bit i of y is q[2n−1−i]). The register map that
 * names it is `x=q[0:n−1]`, `y=q[2n−1:−1:n]`.
 */
export function flatFourierAdderQasm(n: number): string {
	const x = (i: number) => `q[${i}]`;
	const y = (i: number) => `q[${2 * n - 1 - i}]`;
	const L: string[] = ['OPENQASM 2.0;', 'include "qelib1.inc";', `qreg q[${2 * n}];`];
	for (let i = n - 1; i >= 0; i--) {
		L.push(`h ${y(i)};`);
		for (let k = i - 1; k >= 0; k--) L.push(`cu1(pi/${2 ** (i - k)}) ${y(k)}, ${y(i)};`);
	}
	for (let j = 0; j < n; j++) for (let k = 0; k <= j; k++) L.push(`cu1(pi/${2 ** (j - k)}) ${x(k)}, ${y(j)};`);
	for (let i = 0; i < n; i++) {
		for (let k = 0; k < i; k++) L.push(`cu1(-pi/${2 ** (i - k)}) ${y(k)}, ${y(i)};`);
		L.push(`h ${y(i)};`);
	}
	return L.join('\n') + '\n';
}
