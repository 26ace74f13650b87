import { describe, expect, it } from 'vitest';
import type { Complex } from 'mathjs';
import { lowerCircuit } from './lower.js';
import { createState, kernelMcx, kernelU, setBasisState } from './amplitudes.js';
import type { CcpLowering, CircuitDocument } from './circuit.js';
import { circuitUnitary, cmath, distanceExact, distanceUpToPhase, matMul, type CMatrix } from './testing/unitary.js';

const c = (re: number, im = 0) => cmath.complex(re, im);

/** Doubly controlled 2×2 U on 3 qubits (controls 0, 1; target 2), built directly (independent of the engine). */
function doublyControlled(U: Complex[][]): CMatrix {
	const m: CMatrix = Array.from({ length: 8 }, (_, i) => Array.from({ length: 8 }, (_, j) => c(i === j ? 1 : 0)));
	// indices with bits 0 and 1 set: 3 (target 0) and 7 (target 1)
	m[3][3] = U[0][0];
	m[3][7] = U[0][1];
	m[7][3] = U[1][0];
	m[7][7] = U[1][1];
	return m;
}

/** A random-looking but fixed 2×2 unitary V = e^{iα}[[a, −b̄],[b, ā]] (invented parameters). */
function fixedUnitary(alpha: number, theta: number, phi: number, chi: number): Complex[][] {
	const a = cmath.multiply(Math.cos(theta), cmath.exp(c(0, phi))) as Complex;
	const b = cmath.multiply(Math.sin(theta), cmath.exp(c(0, chi))) as Complex;
	const g = cmath.exp(c(0, alpha)) as Complex;
	const mul = (x: Complex) => cmath.multiply(g, x) as Complex;
	return [
		[mul(a), mul(cmath.multiply(-1, cmath.conj(b)) as Complex)],
		[mul(b), mul(cmath.conj(a) as Complex)]
	];
}

describe('Barenco et al. 1995, Lemma 6.1: C²(U) from three controlled V (V² = U) and two CNOTs', () => {
	// Phys. Rev. A 52, 3457. Circuit (time order): C(V) from q1 to q2, CNOT q0→q1, C(V†) q1→q2, CNOT q0→q1, C(V) q0→q2.
	it('equals the doubly controlled U as a unitary', () => {
		const V = fixedUnitary(0.3, 0.7, -1.1, 2.0);
		const Vd = [
			[cmath.conj(V[0][0]) as Complex, cmath.conj(V[1][0]) as Complex],
			[cmath.conj(V[0][1]) as Complex, cmath.conj(V[1][1]) as Complex]
		];
		const U = matMul(V, V);
		const built: CMatrix = Array.from({ length: 8 }, () => new Array<Complex>(8));
		const s = createState(3);
		const applyCU = (ctl: number, M: Complex[][]) =>
			kernelU(s.data, 3, 2, 1 << ctl, M[0][0].re, M[0][0].im, M[0][1].re, M[0][1].im, M[1][0].re, M[1][0].im, M[1][1].re, M[1][1].im);
		for (let col = 0; col < 8; col++) {
			setBasisState(s, col);
			applyCU(1, V);
			kernelMcx(s.data, 3, 1 << 0, 1);
			applyCU(1, Vd);
			kernelMcx(s.data, 3, 1 << 0, 1);
			applyCU(0, V);
			for (let row = 0; row < 8; row++) built[row][col] = c(s.data[2 * row], s.data[2 * row + 1]);
		}
		expect(distanceExact(built, doublyControlled(U))).toBeLessThan(1e-12);
	});
});

describe('Toffoli from 6 CNOTs and H, T, T† (Nielsen and Chuang, Fig. 4.9)', () => {
	// Gate sequence as we recall the figure (from memory); the check against the Toffoli matrix is exact.
	it('equals the Toffoli matrix', () => {
		const q = (i: number) => ({ register: 'q', index: i });
		let k = 0;
		const g = (gate: 'h' | 'cx' | 'p', qs: number[], angle?: string) => ({ id: `g${k++}`, type: 'gate' as const, gate, qubits: qs.map(q), ...(angle ? { angle } : {}) });
		const T = (i: number) => g('p', [i], 'pi/4');
		const Td = (i: number) => g('p', [i], '-pi/4');
		const doc: CircuitDocument = {
			format: 'orrery.circuit',
			version: 1,
			title: 'toffoli',
			registers: [{ name: 'q', size: 3 }],
			body: [g('h', [2]), g('cx', [1, 2]), Td(2), g('cx', [0, 2]), T(2), g('cx', [1, 2]), Td(2), g('cx', [0, 2]), T(1), T(2), g('h', [2]), g('cx', [0, 1]), T(0), Td(1), g('cx', [0, 1])]
		};
		const lowered = lowerCircuit(doc);
		let cnots = 0;
		for (let i = 0; i < lowered.gateCount; i++) if (lowered.kinds[i] === 2) cnots++;
		expect(cnots).toBe(6);
		const X = [
			[c(0), c(1)],
			[c(1), c(0)]
		];
		expect(distanceExact(circuitUnitary(lowered), doublyControlled(X))).toBeLessThan(1e-12);
	});
});

describe('every ccp lowering equals the native doubly controlled phase', () => {
	// Registers: a (2 controls), t (target), anc (ancilla, must return to |0⟩).
	const ccpDoc = (lowering: CcpLowering, angle: string): CircuitDocument => ({
		format: 'orrery.circuit',
		version: 1,
		title: 'ccp',
		registers: [{ name: 'a', size: 2 }, { name: 't', size: 1 }, { name: 'anc', size: 1, role: 'ancilla' }],
		body: [{ id: 'c', type: 'ccp', controls: [{ register: 'a', index: 0 }, { register: 'a', index: 1 }], target: { register: 't', index: 0 }, angle, lowering }]
	});
	for (const angle of ['pi/4', '2*pi*5/2^6', '-pi/2^7', 'pi/3', '1.234'])
		for (const lowering of ['ancilla', 'no-ancilla', 'quarter'] as const)
			it(`${lowering}, θ = ${angle}`, () => {
				const native = circuitUnitary(lowerCircuit(ccpDoc('native', angle)));
				const other = circuitUnitary(lowerCircuit(ccpDoc(lowering, angle)));
				// Restrict to inputs with the ancilla (qubit 3) in |0⟩; outputs must keep it in |0⟩.
				const sub = (m: CMatrix) => m.slice(0, 8).map((row) => row.slice(0, 8));
				for (let col = 0; col < 8; col++) for (let row = 8; row < 16; row++) expect(Math.hypot(other[row][col].re, other[row][col].im)).toBeLessThan(1e-12);
				expect(distanceUpToPhase(sub(other), sub(native))).toBeLessThan(1e-12);
				// and the native one is diag(1,…,1,e^{iθ}) on |111⟩ (index 7)
				const theta = angle === 'pi/3' ? Math.PI / 3 : angle === '1.234' ? 1.234 : null;
				if (theta !== null) {
					expect(native[7][7].re).toBeCloseTo(Math.cos(theta), 12);
					expect(native[7][7].im).toBeCloseTo(Math.sin(theta), 12);
				}
			});
});
