// OpenQASM 3 control flow and aliases in the importer. Each construct is written as the OpenQASM 3
// specification (openqasm.com, "Classical instructions: Looping and branching" for for-loops over
// ranges and sets; "Subroutines" for def with qubit, qubit-array and angle arguments; "Register
// concatenation and slicing" for let, slices a:b / a:s:b (end included) and ++; "Input/output"
// for input angle; "Gate broadcasting"; "Box" and "barrier") writes it.
import { describe, expect, it } from 'vitest';
import { importQasm } from './import.js';
import { QasmError } from './lexer.js';
import { lowerCircuit } from '../lower.js';
import { circuitUnitary, distanceUpToPhase } from '../testing/unitary.js';
import type { GateItem } from '../circuit.js';

const head = 'OPENQASM 3.0;\ninclude "stdgates.inc";\n';
const sig = (text: string, opts = {}) =>
	(importQasm(head + text, { recogniseDecompositions: false, ...opts }).document.body as GateItem[]).map(
		(g) => `${g.gate} ${g.qubits.map((q) => `${q.register}[${q.index}]`).join(',')}${g.angle ? ' ' + g.angle : ''}`
	);
const error = (text: string, opts = {}) => {
	try {
		importQasm(head + text, { file: 'f.qasm3', ...opts });
	} catch (e) {
		expect(e).toBeInstanceOf(QasmError);
		return (e as Error).message;
	}
	return 'no error';
};

describe('for loops', () => {
	it('over an inclusive range, a stepped range and a set, with integer arithmetic in indices and angles', () => {
		expect(sig('qubit[4] q;\nfor uint i in [0:2] { cx q[i], q[i+1]; }')).toEqual(['cx q[0],q[1]', 'cx q[1],q[2]', 'cx q[2],q[3]']);
		expect(sig('qubit[4] q;\nfor int i in [3:-2:0] { x q[i]; }')).toEqual(['x q[3]', 'x q[1]']);
		expect(sig('qubit[4] q;\nfor int k in {2, 0} { p(pi / 2**k) q[k]; }')).toEqual(['p q[2] 1/2^3 turn', 'p q[0] 1/2^1 turn']);
		expect(sig('qubit[2] q;\nfor int i in [1:0] { x q[i]; }')).toEqual([]);
	});
	it('nested, the inner range depending on the outer variable', () => {
		expect(sig('qubit[3] q;\nfor int j in [0:2] { for int k in [0:j-1] { cp(pi/2**(j-k)) q[k], q[j]; } }')).toEqual([
			'cp q[0],q[1] 1/2^2 turn',
			'cp q[0],q[2] 1/2^3 turn',
			'cp q[1],q[2] 1/2^2 turn'
		]);
	});
	it('bounded: too many iterations stop with file:line:column', () => {
		expect(error('qubit q;\nfor int i in [0:99] { for int j in [0:99] { x q; } }', { limits: { maxGates: 500 } })).toMatch(/^f\.qasm3:4:(23|1): more than 500/);
	});
});

describe('def subroutines', () => {
	it('take qubit, qubit-array and angle arguments', () => {
		const text = 'qubit[4] q;\ndef rot(angle t, qubit c, qubit[2] r) { cp(t) c, r[1]; h r[0]; }\nrot(pi/4, q[0], q[2:3]);\nrot(pi/2, q[3], q[{1,0}]);';
		expect(sig(text)).toEqual(['cp q[0],q[3] 1/2^3 turn', 'h q[2]', 'cp q[3],q[0] 1/2^2 turn', 'h q[1]']);
	});
	it('arity, sizes and recursion are checked with file:line:column', () => {
		expect(error('qubit[2] q;\ndef f(qubit a) { x a; }\nf(q);')).toMatch(/^f\.qasm3:5:3: argument 1 of f has 2 qubits; parameter "a" takes 1/);
		expect(error('qubit[2] q;\ndef f(qubit a) { x a; }\nf(q[0], q[1]);')).toMatch(/^f\.qasm3:5:1: subroutine f takes 1 argument, got 2/);
		expect(error('qubit[2] q;\ndef f(qubit a, qubit b) { x a; }\nf(q[0], q[0]);')).toMatch(/repeats a qubit/);
		expect(error('qubit q;\ndef f(qubit a) { f(a); }\nf(q);')).toMatch(/^f\.qasm3:4:18: subroutine calls nested deeper than 64 \(limit\)/);
	});
});

describe('let aliases', () => {
	it('slices and concatenations name qubits; at top level they become registers', () => {
		const r = importQasm(head + 'qubit[6] q;\nlet lo = q[0:2];\nlet hi = q[5:-1:3];\nx lo[0];\nx hi[0];\ncx lo[2], hi[-1];');
		expect(r.document.registers).toEqual([{ name: 'lo', size: 3 }, { name: 'hi', size: 3 }]);
		expect((r.document.body as GateItem[]).map((g) => g.qubits.map((q) => `${q.register}[${q.index}]`).join(','))).toEqual(['lo[0]', 'hi[0]', 'lo[2],hi[2]']);
		expect(r.notes).toContain('let aliases read as registers: lo, hi');
	});
	it('an alias over two registers stays an alias (with a warning); overlapping aliases too', () => {
		const r = importQasm(head + 'qubit[2] a;\nqubit[2] b;\nlet ab = a ++ b[0];\nx ab[2];');
		expect(r.document.registers.map((x) => x.name)).toEqual(['a', 'b']);
		expect(r.warnings.map((w) => w.message).join(' ')).toMatch(/let ab joins qubits of several registers/);
		const o = importQasm(head + 'qubit[3] q;\nlet x = q[0:1];\nlet y = q[1:2];\nh y[0];');
		expect(o.document.registers.map((x) => x.name)).toEqual(['q']);
		expect(o.warnings.map((w) => w.message).join(' ')).toMatch(/kept as aliases.*registers must not overlap/);
	});
	it('out-of-range slices name the line', () => {
		expect(error('qubit[3] q;\nlet x = q[1:3];')).toMatch(/^f\.qasm3:4:11: index 3 out of range for register "q" of size 3; expected 0\.\.2/);
	});
});

describe('input angle, gphase, box, barrier', () => {
	it('input angle takes its value from params (exact when it is a multiple of π/2^k)', () => {
		expect(sig('input angle theta;\nqubit q;\np(theta) q;', { params: { theta: 'pi/8' } })).toEqual(['p q[0] 1/2^4 turn']);
		expect(error('input angle theta;\nqubit q;\np(theta) q;')).toMatch(/^f\.qasm3:3:13: input angle theta has no value; give it with --param theta=…/);
		expect(error('input angle theta;\nqubit q;', { params: { theta: 'pi/' } })).toMatch(/--param theta=pi\//);
	});
	it('box runs its body; barrier is ignored; gphase alone changes nothing measurable but is accepted', () => {
		expect(sig('qubit[2] q;\nbox { h q[0]; barrier q; cx q[0], q[1]; }\ngphase(pi/2);')).toEqual(['h q[0]', 'cx q[0],q[1]']);
	});
});

describe('OpenQASM 2 names common exporters write', () => {
	const h2 = 'OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[4];\n';
	it('cp, cu1, crz, cswap, ch, c3x, rccx, u0 are all read', () => {
		const r = importQasm(h2 + 'cp(pi/2) q[0],q[1];\ncu1(pi/2) q[0],q[1];\ncrz(pi/2) q[0],q[1];\ncswap q[0],q[1],q[2];\nch q[0],q[1];\nc3x q[0],q[1],q[2],q[3];\nrccx q[0],q[1],q[2];\nu0(1) q[0];\n');
		expect(r.document.body.length).toBeGreaterThan(8);
	});
	it('rccx is the Toffoli up to relative phases: the same |entries| as ccx (mathjs distance of magnitudes)', () => {
		const a = circuitUnitary(lowerCircuit(importQasm(h2.replace('q[4]', 'q[3]') + 'rccx q[0],q[1],q[2];\n').document));
		const b = circuitUnitary(lowerCircuit(importQasm(h2.replace('q[4]', 'q[3]') + 'ccx q[0],q[1],q[2];\n').document));
		for (let i = 0; i < 8; i++) for (let j = 0; j < 8; j++) expect(Math.hypot(a[i][j].re, a[i][j].im)).toBeCloseTo(Math.hypot(b[i][j].re, b[i][j].im), 12);
		expect(distanceUpToPhase(a, b)).toBeGreaterThan(0.1); // not the same gate
	});
});

describe('broadcast over an alias', () => {
	it('h over a let alias is three gates on the aliased qubits (no crash, no compaction)', () => {
		expect(sig('qubit[4] q;\nlet x = q[1:3];\nh x;')).toEqual(['h x[0]', 'h x[1]', 'h x[2]']);
	});
});
