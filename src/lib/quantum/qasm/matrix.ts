/**
 * Small 2×2 complex matrix helpers for the OpenQASM reader and writer (row-major, entries [re, im]).
 * Used only for gates with no exact form in our gate set (y-like rotations, u3, controlled-U).
 */
import type { ComplexPair, Matrix2 } from '../circuit.js';

const c = (re: number, im = 0): ComplexPair => [re, im];
const cmul = (a: ComplexPair, b: ComplexPair): ComplexPair => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const cadd = (a: ComplexPair, b: ComplexPair): ComplexPair => [a[0] + b[0], a[1] + b[1]];
const csub = (a: ComplexPair, b: ComplexPair): ComplexPair => [a[0] - b[0], a[1] - b[1]];
const cexp = (phi: number): ComplexPair => [Math.cos(phi), Math.sin(phi)];
const cabs = (a: ComplexPair) => Math.hypot(a[0], a[1]);
const carg = (a: ComplexPair) => Math.atan2(a[1], a[0]);
function cdiv(a: ComplexPair, b: ComplexPair): ComplexPair {
	const d = b[0] * b[0] + b[1] * b[1];
	return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
}
function csqrt(a: ComplexPair): ComplexPair {
	const r = cabs(a);
	const re = Math.sqrt((r + a[0]) / 2);
	const im = Math.sqrt(Math.max(0, (r - a[0]) / 2));
	return [re, a[1] < 0 ? -im : im];
}

/** OpenQASM 3 U(θ, φ, λ) = [[cos θ/2, −e^{iλ} sin θ/2], [e^{iφ} sin θ/2, e^{i(φ+λ)} cos θ/2]] (angles in radians). */
export function u3Matrix(theta: number, phi: number, lambda: number): Matrix2 {
	const co = Math.cos(theta / 2);
	const si = Math.sin(theta / 2);
	const el = cexp(lambda);
	const ep = cexp(phi);
	const epl = cexp(phi + lambda);
	return [
		[c(co), [-el[0] * si, -el[1] * si]],
		[[ep[0] * si, ep[1] * si], [epl[0] * co, epl[1] * co]]
	];
}

/** Product a·b (apply b first, then a). */
export function matMul(a: Matrix2, b: Matrix2): Matrix2 {
	return [
		[cadd(cmul(a[0][0], b[0][0]), cmul(a[0][1], b[1][0])), cadd(cmul(a[0][0], b[0][1]), cmul(a[0][1], b[1][1]))],
		[cadd(cmul(a[1][0], b[0][0]), cmul(a[1][1], b[1][0])), cadd(cmul(a[1][0], b[0][1]), cmul(a[1][1], b[1][1]))]
	];
}

/** Conjugate transpose. */
export function matDagger(m: Matrix2): Matrix2 {
	const cj = (a: ComplexPair): ComplexPair => [a[0], -a[1]];
	return [
		[cj(m[0][0]), cj(m[1][0])],
		[cj(m[0][1]), cj(m[1][1])]
	];
}

/** e^{iγ}·m. */
export function matPhase(m: Matrix2, gamma: number): Matrix2 {
	const e = cexp(gamma);
	return [
		[cmul(e, m[0][0]), cmul(e, m[0][1])],
		[cmul(e, m[1][0]), cmul(e, m[1][1])]
	];
}

/** A square root V of a unitary, V² = m (principal branch via the 2×2 closed form). */
export function matSqrt(m: Matrix2): Matrix2 {
	const det = csub(cmul(m[0][0], m[1][1]), cmul(m[0][1], m[1][0]));
	let s = csqrt(det);
	let t = csqrt(cadd(cadd(m[0][0], m[1][1]), [2 * s[0], 2 * s[1]]));
	if (cabs(t) < 1e-9) {
		s = [-s[0], -s[1]];
		t = csqrt(cadd(cadd(m[0][0], m[1][1]), [2 * s[0], 2 * s[1]]));
	}
	return [
		[cdiv(cadd(m[0][0], s), t), cdiv(m[0][1], t)],
		[cdiv(m[1][0], t), cdiv(cadd(m[1][1], s), t)]
	];
}

/** Z-Y-Z angles: m = e^{iα}·Rz(β)·Ry(γ)·Rz(δ) (Nielsen and Chuang, Theorem 4.1), radians. */
export function zyz(m: Matrix2): { alpha: number; beta: number; gamma: number; delta: number } {
	const det = csub(cmul(m[0][0], m[1][1]), cmul(m[0][1], m[1][0]));
	const alpha = carg(det) / 2;
	const e = cexp(-alpha);
	const a = cmul(e, m[0][0]);
	const b = cmul(e, m[1][0]);
	const gamma = 2 * Math.atan2(cabs(b), cabs(a));
	const sum = cabs(a) > 1e-12 ? -2 * carg(a) : 0; // β + δ
	const diff = cabs(b) > 1e-12 ? 2 * carg(b) : 0; // β − δ
	return { alpha, beta: (sum + diff) / 2, gamma, delta: (sum - diff) / 2 };
}

/** Rz(θ) = diag(e^{−iθ/2}, e^{iθ/2}). */
export function rzMatrix(theta: number): Matrix2 {
	return [
		[cexp(-theta / 2), c(0)],
		[c(0), cexp(theta / 2)]
	];
}
/** Ry(θ) = [[cos θ/2, −sin θ/2], [sin θ/2, cos θ/2]]. */
export function ryMatrix(theta: number): Matrix2 {
	const co = Math.cos(theta / 2);
	const si = Math.sin(theta / 2);
	return [
		[c(co), c(-si)],
		[c(si), c(co)]
	];
}

/**
 * U(θ, φ, λ) and global phase γ with m = e^{iγ}·U(θ, φ, λ) (OpenQASM 3 U convention), radians.
 */
export function u3Angles(m: Matrix2): { theta: number; phi: number; lambda: number; gamma: number } {
	const co = cabs(m[0][0]);
	const si = cabs(m[1][0]);
	const theta = 2 * Math.atan2(si, co);
	if (si < 1e-12) {
		const gamma = carg(m[0][0]);
		return { theta, phi: 0, lambda: carg(m[1][1]) - gamma, gamma };
	}
	if (co < 1e-12) {
		const gamma = carg([-m[0][1][0], -m[0][1][1]]);
		return { theta, phi: carg(m[1][0]) - gamma, lambda: 0, gamma };
	}
	const gamma = carg(m[0][0]);
	return { theta, phi: carg(m[1][0]) - gamma, lambda: carg([-m[0][1][0], -m[0][1][1]]) - gamma, gamma };
}

/** Largest entry distance between a and e^{iφ}·b for the best φ (0 when equal up to global phase). */
export function distanceUpToPhase(a: Matrix2, b: Matrix2): number {
	let best: ComplexPair = [0, 0];
	for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) best = cadd(best, cmul(a[i][j], [b[i][j][0], -b[i][j][1]]));
	const ph = cabs(best) > 1e-15 ? carg(best) : 0;
	const bb = matPhase(b, ph);
	let worst = 0;
	for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) worst = Math.max(worst, cabs(csub(a[i][j], bb[i][j])));
	return worst;
}

/** Named constant matrices. */
export const MATRICES = {
	h: [
		[c(Math.SQRT1_2), c(Math.SQRT1_2)],
		[c(Math.SQRT1_2), c(-Math.SQRT1_2)]
	] as Matrix2,
	sx: [
		[c(0.5, 0.5), c(0.5, -0.5)],
		[c(0.5, -0.5), c(0.5, 0.5)]
	] as Matrix2
};
