import { describe, expect, it } from 'vitest';
import type { Complex } from 'mathjs';
import { lowerCircuit } from './lower.js';
import { Run } from './run.js';
import { dyadic } from './angle.js';
import type { CircuitDocument } from './circuit.js';
import { circuitUnitary, cmath, distanceUpToPhase, operatorNormDistance, type CMatrix } from './testing/unitary.js';

const qftDoc = (n: number, opts: { swaps?: boolean; approx?: number } = {}): CircuitDocument => ({
	format: 'orrery.circuit',
	version: 1,
	title: 'qft',
	registers: [{ name: 'x', size: n }],
	body: [{ id: 'f', type: 'qft', register: 'x', ...opts }]
});

/** DFT matrix F[k][j] = ω^{jk}/√N, ω = e^{2πi/N}, computed with mathjs complex numbers (indices little-endian). */
function dft(n: number): CMatrix {
	const N = 2 ** n;
	const out: CMatrix = [];
	for (let k = 0; k < N; k++) {
		out.push([]);
		for (let j = 0; j < N; j++) {
			const w = cmath.exp(cmath.complex(0, (2 * Math.PI * ((j * k) % N)) / N)) as Complex;
			out[k].push(cmath.divide(w, Math.sqrt(N)) as Complex);
		}
	}
	return out;
}

describe('QFT unitary equals the DFT matrix', () => {
	// Nielsen and Chuang, eq. 5.1: |j⟩ → (1/√N) Σ_k e^{2πijk/N} |k⟩. Our convention: basis index
	// bit q is flat qubit q (LSB first) and the QFT with final swaps is exactly this matrix.
	for (let n = 1; n <= 5; n++)
		it(`n = ${n} (with swaps)`, () => {
			const U = circuitUnitary(lowerCircuit(qftDoc(n)));
			expect(distanceUpToPhase(U, dft(n))).toBeLessThan(1e-12);
		});
	it('without swaps it is the DFT followed by bit reversal (n = 4)', () => {
		const n = 4;
		const U = circuitUnitary(lowerCircuit(qftDoc(n, { swaps: false })));
		const F = dft(n);
		const rev = (k: number) => parseInt(k.toString(2).padStart(n, '0').split('').reverse().join(''), 2);
		const R: CMatrix = F.map((_, k) => F[rev(k)]);
		expect(distanceUpToPhase(U, R)).toBeLessThan(1e-12);
	});
});

describe('product representation', () => {
	// Nielsen and Chuang, eq. 5.4: QFT|x_1…x_n⟩ = (|0⟩+e^{2πi 0.x_n}|1⟩)(|0⟩+e^{2πi 0.x_{n−1}x_n}|1⟩)…(|0⟩+e^{2πi 0.x_1…x_n}|1⟩)/2^{n/2},
	// x_1 the most significant bit, the first factor the most significant output qubit.
	it('ledger angles are the binary fractions 0.x_j…x_n for every x at n = 4', () => {
		const n = 4;
		const c = lowerCircuit(qftDoc(n));
		for (let x = 0; x < 2 ** n; x++) {
			const run = new Run(c, { values: { x } });
			const frame = run.frameAt(run.stepCount);
			expect(frame.engine).toBe('ledger');
			const digits = x.toString(2).padStart(n, '0').split('').map(Number); // x_1 … x_n
			for (let l = 1; l <= n; l++) {
				// factor l (l = 1 the most significant output qubit, flat index n − l) holds 0.x_{n−l+1} … x_n
				let num = 0n;
				for (let j = n - l + 1; j <= n; j++) num = num * 2n + BigInt(digits[j - 1]);
				const st = frame.qubits[n - l].state;
				expect(st.kind).toBe('fourier');
				if (st.kind === 'fourier') expect(st.angle).toEqual(dyadic(num, l));
				expect(frame.qubits[n - l].matches).toBe(true);
			}
		}
	});
});

describe('approximate QFT error bound', () => {
	// Barenco, Ekert, Suominen and Törmä 1996 (Phys. Rev. A 54, 139) bound the approximate QFT
	// that drops rotations R_d, d > k, by O(n/2^k); the form used here, ‖QFT − AQFT_k‖ ≤ 2π·n/2^k
	// in operator norm, is from memory. We also check the elementary bound it rests on (common
	// practice): ‖Π U_i − Π V_i‖ ≤ Σ ‖U_i − V_i‖, and each omitted R_d has ‖R_d − I‖ = 2 sin(π/2^d).
	for (const n of [3, 4, 5]) {
		const exact = circuitUnitary(lowerCircuit(qftDoc(n)));
		for (let k = 1; k < n; k++)
			it(`n = ${n}, k = ${k}`, () => {
				const approx = circuitUnitary(lowerCircuit(qftDoc(n, { approx: k })));
				const measured = operatorNormDistance(exact, approx);
				let sumBound = 0;
				for (let d = k + 1; d <= n; d++) sumBound += (n - d + 1) * 2 * Math.sin(Math.PI / 2 ** d);
				expect(measured).toBeGreaterThan(0);
				expect(measured).toBeLessThanOrEqual(sumBound + 1e-12);
				expect(measured).toBeLessThanOrEqual((2 * Math.PI * n) / 2 ** k + 1e-12);
			});
	}
});
