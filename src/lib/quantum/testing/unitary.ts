/**
 * Test helpers: build the unitary of a lowered circuit by running it on every basis state in
 * the amplitude engine, and independent matrix tools on mathjs complex numbers.
 * Qubit order: flat qubit q = bit q of the basis index. Matrices are column-major arrays of
 * columns: U[col][row] = ⟨row|U|col⟩ as [re, im].
 */
import { create, complexDependencies, multiplyDependencies, addDependencies, expDependencies, divideDependencies, sqrtDependencies, conjDependencies, absDependencies } from 'mathjs';
import type { Complex } from 'mathjs';
import { applyLoweredGates, buildGateTables, createState, setBasisState } from '../amplitudes.js';
import type { LoweredCircuit } from '../circuit.js';

/** mathjs instance with complex arithmetic only. */
export const cmath = create({ complexDependencies, multiplyDependencies, addDependencies, expDependencies, divideDependencies, sqrtDependencies, conjDependencies, absDependencies });

/** Dense complex matrix: m[row][col]. */
export type CMatrix = Complex[][];

/** Unitary of a lowered circuit (m[row][col]) from the amplitude engine, one basis column at a time. */
export function circuitUnitary(c: LoweredCircuit): CMatrix {
	const n = c.qubitCount;
	const N = 2 ** n;
	const t = buildGateTables(c);
	const s = createState(n, 16);
	const m: CMatrix = Array.from({ length: N }, () => new Array<Complex>(N));
	for (let col = 0; col < N; col++) {
		setBasisState(s, col);
		applyLoweredGates(s, c, t, 0, c.gateCount);
		for (let row = 0; row < N; row++) m[row][col] = cmath.complex(s.data[2 * row], s.data[2 * row + 1]);
	}
	return m;
}

/** Matrix product a·b with mathjs complex arithmetic. */
export function matMul(a: CMatrix, b: CMatrix): CMatrix {
	const N = a.length;
	const out: CMatrix = [];
	for (let i = 0; i < N; i++) {
		out.push([]);
		for (let j = 0; j < b[0].length; j++) {
			let acc = cmath.complex(0, 0);
			for (let k = 0; k < b.length; k++) acc = cmath.add(acc, cmath.multiply(a[i][k], b[k][j]) as Complex) as Complex;
			out[i].push(acc);
		}
	}
	return out;
}

/** max |a_ij − e^{iγ} b_ij| with the global phase γ fitted from the largest entry of b (0 when equal up to global phase). */
export function distanceUpToPhase(a: CMatrix, b: CMatrix): number {
	let bi = 0;
	let bj = 0;
	let best = -1;
	for (let i = 0; i < b.length; i++)
		for (let j = 0; j < b[i].length; j++) {
			const v = cmath.abs(b[i][j]) as unknown as number;
			if (v > best) {
				best = v;
				bi = i;
				bj = j;
			}
		}
	const ratio = cmath.divide(a[bi][bj], b[bi][bj]) as Complex;
	const r = Math.hypot(ratio.re, ratio.im);
	const phase = cmath.complex(ratio.re / r, ratio.im / r);
	let worst = 0;
	for (let i = 0; i < a.length; i++)
		for (let j = 0; j < a[i].length; j++) {
			const d = cmath.add(a[i][j], cmath.multiply(-1, cmath.multiply(phase, b[i][j])) as Complex) as Complex;
			worst = Math.max(worst, Math.hypot(d.re, d.im));
		}
	return worst;
}

/** max |a_ij − b_ij|. */
export function distanceExact(a: CMatrix, b: CMatrix): number {
	let worst = 0;
	for (let i = 0; i < a.length; i++) for (let j = 0; j < a[i].length; j++) worst = Math.max(worst, Math.hypot(a[i][j].re - b[i][j].re, a[i][j].im - b[i][j].im));
	return worst;
}

/** Operator (spectral) norm ‖a − b‖₂ by power iteration on D†D (plain floats; independent of the engine). */
export function operatorNormDistance(a: CMatrix, b: CMatrix, iterations = 300): number {
	const N = a.length;
	const dr: number[][] = [];
	const di: number[][] = [];
	for (let i = 0; i < N; i++) {
		dr.push(a[i].map((x, j) => x.re - b[i][j].re));
		di.push(a[i].map((x, j) => x.im - b[i][j].im));
	}
	// start from a fixed non-symmetric vector so no eigenvector is missed by symmetry
	let vr = Array.from({ length: N }, (_, i) => 1 + 0.37 * i);
	let vi = Array.from({ length: N }, (_, i) => 0.11 * ((i * 7) % 5));
	let sigma = 0;
	for (let it = 0; it < iterations; it++) {
		// w = D v
		const wr = new Array(N).fill(0);
		const wi = new Array(N).fill(0);
		for (let i = 0; i < N; i++)
			for (let j = 0; j < N; j++) {
				wr[i] += dr[i][j] * vr[j] - di[i][j] * vi[j];
				wi[i] += dr[i][j] * vi[j] + di[i][j] * vr[j];
			}
		// u = D† w
		const ur = new Array(N).fill(0);
		const ui = new Array(N).fill(0);
		for (let j = 0; j < N; j++)
			for (let i = 0; i < N; i++) {
				ur[j] += dr[i][j] * wr[i] + di[i][j] * wi[i];
				ui[j] += dr[i][j] * wi[i] - di[i][j] * wr[i];
			}
		let norm = 0;
		for (let j = 0; j < N; j++) norm += ur[j] * ur[j] + ui[j] * ui[j];
		norm = Math.sqrt(norm);
		let vnorm = 0;
		for (let j = 0; j < N; j++) vnorm += vr[j] * vr[j] + vi[j] * vi[j];
		sigma = Math.sqrt(norm / Math.sqrt(vnorm));
		if (norm === 0) return 0;
		vr = ur.map((x) => x / norm);
		vi = ui.map((x) => x / norm);
	}
	return sigma;
}
