/**
 * The standard gates, as semantic ops (a gate with any number of controls) before they become
 * document gate items (`emit.ts`).
 *
 * Sources: the specification's own include files in the OpenQASM repository
 * (github.com/openqasm/openqasm): `examples/stdgates.inc` (OpenQASM 3 standard library) and
 * `source/examples/qelib1.inc` (the OpenQASM 2 "QE standard header"). Each entry below says
 * which file defines the gate and how the op list matches its definition. Gates that neither
 * file defines (`u0`, `rccx`, `c3x`, `c4x`, `rzz`, and `p`, `u`, `sx`, `sxdg`, `swap`, `cswap`,
 * `cu` under OpenQASM 2) are the extra names common exporters write; their definitions are
 * marked "not in the specification's files".
 *
 * Qubit order: a builder's `q` lists its qubit arguments in call order (controls first).
 * Angles: `Num` in radians.
 */
import type { Matrix2 } from '../circuit.js';
import { add, exactNum, mul, numToFloat, type Num } from './expr.js';
import { matDagger, MATRICES, ryMatrix, u3Matrix } from './matrix.js';
import type { GateOrigin } from './types.js';

/** `reset` is the statement `reset q;`, read as the checked claim "q is |0⟩ here" (never under a modifier). */
export type OpKind = 'x' | 'h' | 'phase' | 'rz' | 'gphase' | 'u' | 'swap' | 'reset';
export interface Op {
	kind: OpKind;
	ctrls: number[];
	t: number[];
	angle?: Num; // radians
	matrix?: Matrix2;
	origin: GateOrigin;
}

export const PI = exactNum(1n, 1n, 1);
export const HALF_PI = exactNum(1n, 2n, 1);
export const QUARTER_PI = exactNum(1n, 4n, 1);
export const neg = (x: Num) => mul(exactNum(-1n), x);
export const half = (x: Num) => mul(exactNum(1n, 2n), x);
export const isExactZero = (x: Num) => x.exact && x.n === 0n;

export type Builder = (p: Num[], q: number[], o: GateOrigin) => Op[];
export interface Builtin {
	params: number;
	qubits: number;
	lib: 'core2' | 'core3' | 'lib' | 'lib2' | 'lib3';
	build: Builder;
}

export const op = (kind: OpKind, t: number[], o: GateOrigin, extra: Partial<Op> = {}): Op => ({ kind, ctrls: [], t, origin: o, ...extra });
export const phase = (a: Num, q: number, o: GateOrigin) => op('phase', [q], o, { angle: a });
export const umat = (m: Matrix2, q: number, o: GateOrigin) => op('u', [q], o, { matrix: m });
export const withCtrl = (ops: Op[], c: number[]): Op[] => ops.map((x) => ({ ...x, ctrls: [...c, ...x.ctrls] }));

/** U(θ, φ, λ): exact phase(φ+λ) when θ is exactly 0, else the matrix. */
export function uGate(th: Num, ph: Num, la: Num, q: number, o: GateOrigin): Op[] {
	if (isExactZero(th)) return [phase(add(ph, la, 1n), q, o)];
	return [umat(u3Matrix(numToFloat(th), numToFloat(ph), numToFloat(la)), q, o)];
}

/**
 * Where the gate is available: `core2` in every file (`U`, `CX`), `core3` in OpenQASM 3 files,
 * `lib` with either include, `lib2` with `qelib1.inc` only, `lib3` with `stdgates.inc` only.
 */
export const BUILTINS: Record<string, Builtin> = {
	// The built-in U(θ,φ,λ) and CX of both versions.
	U: { params: 3, qubits: 1, lib: 'core2', build: (p, q, o) => uGate(p[0], p[1], p[2], q[0], o) },
	CX: { params: 0, qubits: 2, lib: 'core2', build: (_p, q, o) => withCtrl([op('x', [q[1]], o)], [q[0]]) },
	gphase: { params: 1, qubits: 0, lib: 'core3', build: (p, _q, o) => [op('gphase', [], o, { angle: p[0] })] },
	// stdgates.inc: u3(θ,φ,λ) { gphase(−(φ+λ)/2); U(θ,φ,λ) }, u2(φ,λ) { gphase(−(φ+λ)/2); U(π/2,φ,λ) };
	// qelib1.inc has no gphase there (same matrix up to a global phase; it matters only under ctrl @,
	// which OpenQASM 2 has not).
	u3: {
		params: 3,
		qubits: 1,
		lib: 'lib',
		build: (p, q, o) => [op('gphase', [], o, { angle: neg(half(add(p[1], p[2], 1n))) }), ...uGate(p[0], p[1], p[2], q[0], o)]
	},
	u2: { params: 2, qubits: 1, lib: 'lib', build: (p, q, o) => [op('gphase', [], o, { angle: neg(half(add(p[0], p[1], 1n))) }), ...uGate(HALF_PI, p[0], p[1], q[0], o)] },
	// Both files: u1(λ) { U(0,0,λ) }. stdgates.inc: p(λ) { ctrl @ gphase(λ) }, phase(λ) { U(0,0,λ) }.
	u1: { params: 1, qubits: 1, lib: 'lib', build: (p, q, o) => [phase(p[0], q[0], o)] },
	// u(θ,φ,λ) = U(θ,φ,λ) and p under OpenQASM 2: not in the specification's files.
	u: { params: 3, qubits: 1, lib: 'lib', build: (p, q, o) => uGate(p[0], p[1], p[2], q[0], o) },
	p: { params: 1, qubits: 1, lib: 'lib', build: (p, q, o) => [phase(p[0], q[0], o)] },
	phase: { params: 1, qubits: 1, lib: 'lib3', build: (p, q, o) => [phase(p[0], q[0], o)] },
	// Both files: id { U(0,0,0) }.
	id: { params: 0, qubits: 1, lib: 'lib', build: () => [] },
	// Both files: x = U(π,0,π) (qelib1.inc: u3(π,0,π)), which is the X matrix exactly.
	x: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [op('x', [q[0]], o)] },
	// Both files: y = U(π,π/2,π/2) = [[0,−i],[i,0]] = S·X·S† exactly.
	y: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [phase(neg(HALF_PI), q[0], o), op('x', [q[0]], o), phase(HALF_PI, q[0], o)] },
	// Both files: z = p(π) (qelib1.inc: u1(π)).
	z: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [phase(PI, q[0], o)] },
	// Both files: h = U(π/2,0,π) (qelib1.inc: u2(0,π)), the Hadamard matrix.
	h: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [op('h', [q[0]], o)] },
	// Both files: s = pow(1/2) @ z (qelib1.inc: u1(π/2)), t = pow(1/2) @ s (u1(π/4)), and their inverses.
	s: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [phase(HALF_PI, q[0], o)] },
	sdg: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [phase(neg(HALF_PI), q[0], o)] },
	t: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [phase(QUARTER_PI, q[0], o)] },
	tdg: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [phase(neg(QUARTER_PI), q[0], o)] },
	// stdgates.inc: sx = pow(1/2) @ x; sxdg its inverse (not in the specification's files).
	sx: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [umat(MATRICES.sx, q[0], o)] },
	sxdg: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [umat(matDagger(MATRICES.sx), q[0], o)] },
	// stdgates.inc: rx(θ) = U(θ,−π/2,π/2), ry(θ) = U(θ,0,0) (qelib1.inc: the same through u3).
	rx: { params: 1, qubits: 1, lib: 'lib', build: (p, q, o) => [umat(u3Matrix(numToFloat(p[0]), -Math.PI / 2, Math.PI / 2), q[0], o)] },
	ry: { params: 1, qubits: 1, lib: 'lib', build: (p, q, o) => [umat(ryMatrix(numToFloat(p[0])), q[0], o)] },
	// stdgates.inc: rz(λ) { gphase(−λ/2); U(0,0,λ) }; qelib1.inc: u1(λ) (a global phase apart).
	rz: { params: 1, qubits: 1, lib: 'lib', build: (p, q, o) => [op('rz', [q[0]], o, { angle: p[0] })] },
	// stdgates.inc: cx, cy, cz, ch = ctrl @ x, y, z, h (qelib1.inc writes them out with cx and
	// single-qubit gates).
	cx: { params: 0, qubits: 2, lib: 'lib', build: (_p, q, o) => withCtrl([op('x', [q[1]], o)], [q[0]]) },
	cy: { params: 0, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl(BUILTINS.y.build(p, [q[1]], o), [q[0]]) },
	cz: { params: 0, qubits: 2, lib: 'lib', build: (_p, q, o) => withCtrl([phase(PI, q[1], o)], [q[0]]) },
	ch: { params: 0, qubits: 2, lib: 'lib', build: (_p, q, o) => withCtrl([op('h', [q[1]], o)], [q[0]]) },
	// csx = ctrl @ sx: not in the specification's files.
	csx: { params: 0, qubits: 2, lib: 'lib', build: (_p, q, o) => withCtrl([umat(MATRICES.sx, q[1], o)], [q[0]]) },
	// stdgates.inc: ccx = ctrl @ ctrl @ x (qelib1.inc: the usual seven-T network, the same matrix).
	ccx: { params: 0, qubits: 3, lib: 'lib', build: (_p, q, o) => withCtrl([op('x', [q[2]], o)], [q[0], q[1]]) },
	// Not in the specification's files (the longer qelib1.inc that exporters ship, from memory): u0 is
	// an idle gate; rccx the relative-phase Toffoli h c; t c; cx b,c; tdg c; cx a,c; t c; cx b,c; tdg c; h c.
	u0: { params: 1, qubits: 1, lib: 'lib2', build: () => [] },
	rccx: {
		params: 0,
		qubits: 3,
		lib: 'lib2',
		build: (_p, q, o) => {
			const [a, b, c] = q;
			const cx = (x: number, y: number) => withCtrl([op('x', [y], o)], [x]);
			return [op('h', [c], o), phase(QUARTER_PI, c, o), ...cx(b, c), phase(neg(QUARTER_PI), c, o), ...cx(a, c), phase(QUARTER_PI, c, o), ...cx(b, c), phase(neg(QUARTER_PI), c, o), op('h', [c], o)];
		}
	},
	c3x: { params: 0, qubits: 4, lib: 'lib2', build: (_p, q, o) => withCtrl([op('x', [q[3]], o)], q.slice(0, 3)) },
	c4x: { params: 0, qubits: 5, lib: 'lib2', build: (_p, q, o) => withCtrl([op('x', [q[4]], o)], q.slice(0, 4)) },
	// stdgates.inc: crz(θ) = ctrl @ rz(θ), so the −θ/2 phase of rz lands on the control (emit.ts).
	// qelib1.inc: u1(λ/2) b; cx a,b; u1(−λ/2) b; cx a,b, which is the same matrix diag(1,1,e^{−iλ/2},e^{iλ/2}).
	crz: { params: 1, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl([op('rz', [q[1]], o, { angle: p[0] })], [q[0]]) },
	// stdgates.inc: crx = ctrl @ rx, cry = ctrl @ ry.
	crx: { params: 1, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl(BUILTINS.rx.build(p, [q[1]], o), [q[0]]) },
	cry: { params: 1, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl(BUILTINS.ry.build(p, [q[1]], o), [q[0]]) },
	// qelib1.inc: cu1(λ), the controlled phase written out; stdgates.inc: cp(λ) = ctrl @ p(λ),
	// cphase(λ) = ctrl @ phase(λ).
	cu1: { params: 1, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl([phase(p[0], q[1], o)], [q[0]]) },
	cp: { params: 1, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl([phase(p[0], q[1], o)], [q[0]]) },
	cphase: { params: 1, qubits: 2, lib: 'lib3', build: (p, q, o) => withCtrl([phase(p[0], q[1], o)], [q[0]]) },
	// qelib1.inc: cu3 applies the u3 matrix on the target when the control is set, with no phase on
	// the control (its definition has no u1 on c).
	cu3: { params: 3, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl(uGate(p[0], p[1], p[2], q[1], o), [q[0]]) },
	// stdgates.inc: cu(θ,φ,λ,γ) { p(γ) a; ctrl @ U(θ,φ,λ) a, b }: the phase γ under the control.
	cu: {
		params: 4,
		qubits: 2,
		lib: 'lib',
		build: (p, q, o) => withCtrl([op('gphase', [], o, { angle: p[3] }), ...uGate(p[0], p[1], p[2], q[1], o)], [q[0]])
	},
	// stdgates.inc: swap = three CNOTs; cswap = ctrl @ swap.
	swap: { params: 0, qubits: 2, lib: 'lib', build: (_p, q, o) => [op('swap', [q[0], q[1]], o)] },
	cswap: { params: 0, qubits: 3, lib: 'lib', build: (_p, q, o) => withCtrl([op('swap', [q[1], q[2]], o)], [q[0]]) },
	// rzz(θ) = cx a,b; rz(θ) b; cx a,b: not in the specification's files.
	rzz: {
		params: 1,
		qubits: 2,
		lib: 'lib',
		build: (p, q, o) => [...withCtrl([op('x', [q[1]], o)], [q[0]]), op('rz', [q[1]], o, { angle: p[0] }), ...withCtrl([op('x', [q[1]], o)], [q[0]])]
	}
};

/** Whether a standard gate may be called in a file of this version, with or without its include. */
export function builtinAvailable(b: Builtin, version: 2 | 3, included: boolean): boolean {
	if (b.lib === 'core2') return true;
	if (b.lib === 'core3') return version === 3;
	if (!included) return false;
	if (b.lib === 'lib2') return version === 2;
	if (b.lib === 'lib3') return version === 3;
	return true;
}
