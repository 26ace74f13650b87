// Recognition of decomposed gates (peephole.ts). Every rewrite rule is first proved as a matrix
// identity with mathjs complex arithmetic (independent of the engines), then the importer's
// output is compared with the file as written through the amplitude engine.
import { describe, expect, it } from 'vitest';
import type { Complex } from 'mathjs';
import { cmath, circuitUnitary, distanceExact, distanceUpToPhase, matMul, type CMatrix } from '../testing/unitary.js';
import { importQasm } from './import.js';
import { lowerCircuit } from '../lower.js';
import type { GateItem } from '../circuit.js';
import { checkCircuit } from '../check/index.js';

// ---------------------------------------------------------------------------------------------
// Gates as mathjs matrices on n qubits (little-endian: qubit q = bit q of the basis index).

type Action = (col: number) => [number, Complex][];
function matrix(n: number, act: Action): CMatrix {
	const N = 1 << n;
	const m: CMatrix = Array.from({ length: N }, () => Array.from({ length: N }, () => cmath.complex(0, 0)));
	for (let col = 0; col < N; col++) for (const [row, z] of act(col)) m[row][col] = cmath.add(m[row][col], z) as Complex;
	return m;
}
const bit = (x: number, q: number) => (x >> q) & 1;
const eiθ = (t: number) => cmath.exp(cmath.complex(0, t)) as Complex;
const one = cmath.complex(1, 0);
const Pm = (n: number, q: number, t: number) => matrix(n, (x) => [[x, bit(x, q) ? eiθ(t) : one]]);
const RZm = (n: number, q: number, t: number) => matrix(n, (x) => [[x, eiθ(bit(x, q) ? t / 2 : -t / 2)]]);
const CXm = (n: number, c: number, t: number) => matrix(n, (x) => [[bit(x, c) ? x ^ (1 << t) : x, one]]);
const CCXm = (n: number, a: number, b: number, t: number) => matrix(n, (x) => [[bit(x, a) && bit(x, b) ? x ^ (1 << t) : x, one]]);
const CPm = (n: number, c: number, t: number, th: number) => matrix(n, (x) => [[x, bit(x, c) && bit(x, t) ? eiθ(th) : one]]);
const CCPm = (n: number, a: number, b: number, t: number, th: number) => matrix(n, (x) => [[x, bit(x, a) && bit(x, b) && bit(x, t) ? eiθ(th) : one]]);
const Hm = (n: number, q: number) =>
	matrix(n, (x) => {
		const s = Math.SQRT1_2;
		const y = x ^ (1 << q);
		return bit(x, q) ? [[y, cmath.complex(s, 0)], [x, cmath.complex(-s, 0)]] : [[x, cmath.complex(s, 0)], [y, cmath.complex(s, 0)]];
	});
/** Product of gates in circuit order (first gate applied first). */
const circuit = (...gates: CMatrix[]) => gates.reduce((acc, g) => matMul(g, acc));

const TH = 0.7137; // an arbitrary angle (radians), not special
const T = Math.PI / 4;

describe('rewrite rules as matrix identities (mathjs)', () => {
	it('cx c,t · p(d) t · cx c,t = p(d) c · p(d) t · cp(−2d): the CNOT-region rule (c=0, t=1)', () => {
		// Phase d·(c⊕t) = d·c + d·t − 2d·c·t on basis states.
		const lhs = circuit(CXm(2, 0, 1), Pm(2, 1, TH), CXm(2, 0, 1));
		const rhs = circuit(Pm(2, 0, TH), Pm(2, 1, TH), CPm(2, 0, 1, -2 * TH));
		expect(distanceExact(lhs, rhs)).toBeLessThan(1e-12);
	});
	it('u1(θ/2) c; u1(θ/2) t; cx c,t; u1(−θ/2) t; cx c,t is cp(θ) exactly (the form common exporters write)', () => {
		const lhs = circuit(Pm(2, 0, TH / 2), Pm(2, 1, TH / 2), CXm(2, 0, 1), Pm(2, 1, -TH / 2), CXm(2, 0, 1));
		expect(distanceExact(lhs, CPm(2, 0, 1, TH))).toBeLessThan(1e-12);
	});
	it('qelib1.inc cu1 body, u1(θ/2) a; cx a,b; u1(−θ/2) b; cx a,b; u1(θ/2) b, is cp(θ) exactly', () => {
		const lhs = circuit(Pm(2, 0, TH / 2), CXm(2, 0, 1), Pm(2, 1, -TH / 2), CXm(2, 0, 1), Pm(2, 1, TH / 2));
		expect(distanceExact(lhs, CPm(2, 0, 1, TH))).toBeLessThan(1e-12);
	});
	it('the same with rz is cp(θ) times the constant global phase e^{−iθ/4} (not exactly cp)', () => {
		const lhs = circuit(RZm(2, 0, TH / 2), RZm(2, 1, TH / 2), CXm(2, 0, 1), RZm(2, 1, -TH / 2), CXm(2, 0, 1));
		const rhs = CPm(2, 0, 1, TH);
		expect(distanceExact(lhs, rhs)).toBeGreaterThan(0.1);
		expect(distanceUpToPhase(lhs, rhs)).toBeLessThan(1e-12);
		// The factor is the same on every basis state: e^{−iθ/4}.
		for (let x = 0; x < 4; x++) {
			const r = cmath.divide(lhs[x][x], rhs[x][x]) as Complex;
			expect(Math.atan2(r.im, r.re)).toBeCloseTo(-TH / 4, 12);
		}
	});
	it('doubly controlled phase without ancilla: cp(θ/2) b,t; cx a,b; cp(−θ/2) b,t; cx a,b; cp(θ/2) a,t = ccp(θ) (Barenco et al. 1995, Lemma 6.1 form)', () => {
		const lhs = circuit(CPm(3, 1, 2, TH / 2), CXm(3, 0, 1), CPm(3, 1, 2, -TH / 2), CXm(3, 0, 1), CPm(3, 0, 2, TH / 2));
		expect(distanceExact(lhs, CCPm(3, 0, 1, 2, TH))).toBeLessThan(1e-12);
	});
	it('the Toffoli network of Nielsen & Chuang Fig. 4.9 (qelib1.inc ccx) is ccx exactly', () => {
		const [a, b, c] = [0, 1, 2];
		const lhs = circuit(
			Hm(3, c), CXm(3, b, c), Pm(3, c, -T), CXm(3, a, c), Pm(3, c, T), CXm(3, b, c), Pm(3, c, -T), CXm(3, a, c),
			Pm(3, b, T), Pm(3, c, T), Hm(3, c), CXm(3, a, b), Pm(3, a, T), Pm(3, b, -T), CXm(3, a, b)
		);
		expect(distanceExact(lhs, CCXm(3, a, b, c))).toBeLessThan(1e-12);
	});
});

// ---------------------------------------------------------------------------------------------

const head2 = 'OPENQASM 2.0;\ninclude "qelib1.inc";\n';
const gates = (text: string, opts = {}) => importQasm(text, { file: 't.qasm', ...opts }).document.body as GateItem[];
const sig = (b: GateItem[]) => b.map((g) => `${g.gate}(${g.qubits.map((q) => `${q.register}${q.index}`).join(',')})${g.angle ? ' ' + g.angle : ''}`);
/** Unitary of the imported document with and without recognition must agree up to a global phase (engine + mathjs distance). */
function samePhaseClass(text: string): number {
	const on = circuitUnitary(lowerCircuit(importQasm(text).document));
	const off = circuitUnitary(lowerCircuit(importQasm(text, { recogniseDecompositions: false }).document));
	return distanceUpToPhase(on, off);
}

describe('recognised in imported files', () => {
	it('a controlled phase written with u1 and two CNOTs becomes one cp, pointing at its lines', () => {
		const text = head2 + 'qreg q[2];\nu1(pi/8) q[0];\nu1(pi/8) q[1];\ncx q[0],q[1];\nu1(-pi/8) q[1];\ncx q[0],q[1];\n';
		const r = importQasm(text);
		expect(sig(r.document.body as GateItem[])).toEqual(['cp(q0,q1) 1/2^3 turn']);
		expect(r.document.body[0].source?.line).toBe(7);
		expect(r.notes.join(' ')).toMatch(/1 CNOT region/);
		expect(samePhaseClass(text)).toBeLessThan(1e-12);
	});
	it('either CNOT orientation, and the qelib1.inc cu1 order', () => {
		const a = head2 + 'qreg q[2];\nu1(pi/4) q[1];\ncx q[1],q[0];\nu1(-pi/4) q[0];\ncx q[1],q[0];\nu1(pi/4) q[0];\n';
		expect(sig(gates(a))).toEqual(['cp(q1,q0) 1/2^2 turn']);
		expect(samePhaseClass(a)).toBeLessThan(1e-12);
	});
	it('rz form: cp up to a global phase only, with the note saying so', () => {
		const text = head2 + 'qreg q[2];\nrz(pi/8) q[0];\nrz(pi/8) q[1];\ncx q[0],q[1];\nrz(-pi/8) q[1];\ncx q[0],q[1];\n';
		const r = importQasm(text);
		expect(sig(r.document.body as GateItem[])).toEqual(['cp(q0,q1) 1/2^3 turn']);
		expect(r.notes.join(' ')).toMatch(/rz read as p: equal up to a global phase/);
		expect(samePhaseClass(text)).toBeLessThan(1e-12);
	});
	it('interleaved gates on other qubits stay where they are', () => {
		const text = head2 + 'qreg q[3];\nu1(pi/8) q[0];\ncx q[0],q[1];\nh q[2];\nu1(-pi/8) q[1];\ncx q[0],q[1];\nu1(pi/8) q[1];\n';
		expect(sig(gates(text))).toEqual(['h(q2)', 'cp(q0,q1) 1/2^3 turn']);
		expect(samePhaseClass(text)).toBeLessThan(1e-12);
	});
	it('a halved rotation is not hidden: the rewrite stays exact and leaves the difference as a p on its own line', () => {
		const text = head2 + 'qreg q[2];\nu1(pi/8) q[0];\nu1(pi/16) q[1];\ncx q[0],q[1];\nu1(-pi/8) q[1];\ncx q[0],q[1];\n';
		const b = gates(text);
		expect(sig(b)).toEqual(['p(q1) 1/2^5 turn', 'p(q1) 15/2^4 turn', 'cp(q0,q1) 1/2^3 turn']);
		expect(b.map((g) => g.source?.line)).toEqual([5, 7, 7]);
		expect(samePhaseClass(text)).toBeLessThan(1e-12);
	});
	it('doubly controlled phase written with cp and CNOTs, and with everything decomposed, becomes mcp', () => {
		const a = head2 + 'qreg q[3];\ncu1(pi/4) q[1],q[2];\ncx q[0],q[1];\ncu1(-pi/4) q[1],q[2];\ncx q[0],q[1];\ncu1(pi/4) q[0],q[2];\n';
		expect(sig(gates(a))).toEqual(['mcp(q0,q1,q2) 1/2^2 turn']);
		expect(samePhaseClass(a)).toBeLessThan(1e-12);
		// cu1 as a gate definition of the file itself (so the importer expands it to u1 + cx).
		const b =
			head2.replace('include "qelib1.inc";\n', '') +
			'gate mycu1(l) a,b { U(0,0,l/2) a; CX a,b; U(0,0,-l/2) b; CX a,b; U(0,0,l/2) b; }\nqreg q[3];\nmycu1(pi/4) q[1],q[2];\nCX q[0],q[1];\nmycu1(-pi/4) q[1],q[2];\nCX q[0],q[1];\nmycu1(pi/4) q[0],q[2];\n';
		expect(sig(gates(b))).toEqual(['mcp(q0,q1,q2) 1/2^2 turn']);
		expect(samePhaseClass(b)).toBeLessThan(1e-12);
	});
	it('the Toffoli network becomes ccx (qubits in any roles), other qubits may interleave', () => {
		const net = (a: string, b: string, c: string) =>
			`h ${c};\ncx ${b},${c};\ntdg ${c};\ncx ${a},${c};\nt ${c};\ncx ${b},${c};\ntdg ${c};\ncx ${a},${c};\nt ${b};\nt ${c};\nh ${c};\ncx ${a},${b};\nt ${a};\ntdg ${b};\ncx ${a},${b};\n`;
		const text = head2 + 'qreg q[4];\n' + net('q[2]', 'q[0]', 'q[1]').replace('t q[0];\n', 't q[0];\nx q[3];\n');
		const b = gates(text);
		expect(sig(b)).toEqual(['ccx(q2,q0,q1)', 'x(q3)']);
		expect(b[0].source?.line).toBe(4);
		expect(samePhaseClass(text)).toBeLessThan(1e-12);
	});
	it('nothing changes where the CNOTs do not close or a gate in between breaks the region', () => {
		const open = head2 + 'qreg q[2];\ncx q[0],q[1];\nu1(pi/8) q[1];\n';
		expect(sig(gates(open))).toEqual(['cx(q0,q1)', 'p(q1) 1/2^4 turn']);
		const broken = head2 + 'qreg q[2];\ncx q[0],q[1];\nh q[1];\ncx q[0],q[1];\n';
		expect(sig(gates(broken))).toEqual(['cx(q0,q1)', 'h(q1)', 'cx(q0,q1)']);
		// A Hadamard on the control while the target holds c⊕t: not movable, so no rewrite.
		const ctl = head2 + 'qreg q[2];\ncx q[0],q[1];\nh q[0];\nu1(pi/8) q[1];\nh q[0];\ncx q[0],q[1];\n';
		expect(sig(gates(ctl))).toHaveLength(5);
		expect(samePhaseClass(ctl)).toBeLessThan(1e-12);
	});
	it('can be turned off', () => {
		const text = head2 + 'qreg q[2];\nu1(pi/8) q[0];\nu1(pi/8) q[1];\ncx q[0],q[1];\nu1(-pi/8) q[1];\ncx q[0],q[1];\n';
		expect(gates(text, { recogniseDecompositions: false })).toHaveLength(5);
	});
});

describe('a doubly controlled phase through a clean ancilla (Toffoli · controlled phase · Toffoli)', () => {
	// Textbook identity (Nielsen & Chuang §4.3: computing a ∧ b into a clean ancilla, using it as a
	// control, and uncomputing it): n holds n ⊕ ab between the Toffolis, so the phase is
	// θ·t·(n ⊕ ab) = θ·n·t + θ·a·b·t − 2θ·n·a·b·t for every n (exact; −2·⅛ turn = ¾ turn), which is ccp(θ) on (a, b, t)
	// when n = 0. Checked here as matrices with mathjs, then through the importer and the checker.
	it('as matrices: ccx(a,b,n) · cp(θ)(n,t) · ccx(a,b,n) = cp(θ)(n,t) · ccp(θ)(a,b,t) · c³p(−2θ) on every input, and = ccp(θ) on n = 0', () => {
		const C3Pm = (th: number) => matrix(4, (x) => [[x, bit(x, 0) && bit(x, 1) && bit(x, 2) && bit(x, 3) ? eiθ(th) : one]]);
		// qubits: a = 0, b = 1, n = 2, t = 3
		const lhs = circuit(CCXm(4, 0, 1, 2), CPm(4, 2, 3, TH), CCXm(4, 0, 1, 2));
		expect(distanceExact(lhs, circuit(CPm(4, 2, 3, TH), CCPm(4, 0, 1, 3, TH), C3Pm(-2 * TH)))).toBeLessThan(1e-12);
		const ccp = CCPm(4, 0, 1, 3, TH);
		let worst = 0;
		for (let col = 0; col < 16; col++) if (!bit(col, 2)) for (let row = 0; row < 16; row++) worst = Math.max(worst, cmath.abs(cmath.add(lhs[row][col], cmath.multiply(-1, ccp[row][col]) as Complex) as Complex) as unknown as number);
		expect(worst).toBeLessThan(1e-12);
		// … and not on n = 1: the pattern is only a ccp while the ancilla is clean.
		expect(distanceExact(lhs, ccp)).toBeGreaterThan(0.1);
	});
	it('the importer reads it as the ccp and the terms on the ancilla, all at the phase’s line; the Toffolis go', () => {
		const text = head2 + 'qreg q[4];\nccx q[0],q[1],q[2];\nh q[3];\ncp(pi/4) q[2],q[3];\nccx q[0],q[1],q[2];\n';
		const r = importQasm(text);
		expect(sig(r.document.body as GateItem[])).toEqual(['h(q3)', 'cp(q2,q3) 1/2^3 turn', 'mcp(q0,q1,q3) 1/2^3 turn', 'mcp(q0,q1,q2,q3) 3/2^2 turn']);
		expect((r.document.body as GateItem[]).slice(1).every((g) => g.source?.line === 6)).toBe(true);
		expect(r.notes.join(' ')).toMatch(/1 Toffoli pair around a phase on an ancilla read as doubly controlled phases/);
		expect(samePhaseClass(text)).toBeLessThan(1e-12);
		// A gate that flips the ancilla, or an H on a control, in between: not the pattern, left as written.
		for (const mid of ['x q[2];\n', 'h q[0];\n'])
			expect(sig(importQasm(text.replace('h q[3];\n', mid)).document.body as GateItem[]).filter((g) => g.startsWith('ccx'))).toHaveLength(2);
	});

	// A controlled Fourier adder y ← y + c·x mod 2^n (Draper 2000, quant-ph/0008033, each adding
	// rotation given a second control c through the ancilla), our own file.
	const controlledAdder = (n: number, dirty: boolean) => {
		const L = [head2.trim(), 'qreg c[1];', `qreg x[${n}];`, `qreg y[${n}];`, 'qreg anc[1];'];
		if (dirty) L.push('x anc[0];');
		for (let i = n - 1; i >= 0; i--) {
			L.push(`h y[${i}];`);
			for (let k = i - 1; k >= 0; k--) L.push(`cp(pi/${2 ** (i - k)}) y[${k}], y[${i}];`);
		}
		for (let j = 0; j < n; j++)
			for (let k = 0; k <= j; k++) L.push(`ccx c[0], x[${k}], anc[0];`, `cp(pi/${2 ** (j - k)}) anc[0], y[${j}];`, `ccx c[0], x[${k}], anc[0];`);
		for (let i = 0; i < n; i++) {
			for (let k = 0; k < i; k++) L.push(`cp(-pi/${2 ** (i - k)}) y[${k}], y[${i}];`);
			L.push(`h y[${i}];`);
		}
		if (dirty) L.push('x anc[0];');
		return L.join('\n') + '\n';
	};
	it('a 2-bit controlled adder written so is proved; the exhaustive sweep and the unitary (mathjs) agree', () => {
		const r = importQasm(controlledAdder(2, false));
		expect(r.decompositions?.toffoliPhases).toBe(3);
		expect((r.document.body as GateItem[]).some((g) => g.gate === 'ccx')).toBe(false);
		const d = { ...r.document, specs: ['y = y + c*x mod 4'] };
		const rep = checkCircuit(lowerCircuit(d), d.specs, {});
		expect(rep.exhaustive).toBe(true);
		expect([rep.ok, rep.failed, rep.proof.status]).toEqual([true, 0, 'proved']);
		// The rewritten circuit and the file as written agree up to one global phase on every basis state.
		expect(samePhaseClass(controlledAdder(2, false))).toBeLessThan(1e-9);
	});
	it('with the ancilla set to 1 around it, the same pattern is not a ccp: refuted, and the sweep agrees', () => {
		const r = importQasm(controlledAdder(2, true));
		const d = { ...r.document, specs: ['y = y + c*x mod 4'] };
		const rep = checkCircuit(lowerCircuit(d), d.specs, {});
		expect(rep.exhaustive).toBe(true);
		expect(rep.failed).toBeGreaterThan(0);
		expect(rep.proof.status).toBe('refuted');
		expect(samePhaseClass(controlledAdder(2, true))).toBeLessThan(1e-9);
	});
});
