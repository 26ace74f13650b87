import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { importQasm } from './import.js';
import { QasmError } from './lexer.js';
import { lowerCircuit } from '../lower.js';
import { gateAt, GateCode, type CallItem, type GateItem } from '../circuit.js';
import { circuitUnitary, unitaryDistance, type DenseUnitary } from '../check/equivalence.js';

const fixture = (name: string) => readFileSync(new URL(`./fixtures/${name}`, import.meta.url), 'utf8');

// ---------------------------------------------------------------------------------------------
// Reference matrices, written from the textbook definitions (Nielsen and Chuang §4.2; the
// OpenQASM 3 specification's U(θ, φ, λ)), independent of the importer's own tables.
type C = [number, number];
type M2 = [[C, C], [C, C]];
const e = (phi: number): C => [Math.cos(phi), Math.sin(phi)];
const sc = (s: number, z: C): C => [s * z[0], s * z[1]];
const R = Math.SQRT1_2;
const X: M2 = [[[0, 0], [1, 0]], [[1, 0], [0, 0]]];
const Y: M2 = [[[0, 0], [0, -1]], [[0, 1], [0, 0]]];
const Z: M2 = [[[1, 0], [0, 0]], [[0, 0], [-1, 0]]];
const H: M2 = [[[R, 0], [R, 0]], [[R, 0], [-R, 0]]];
const I2: M2 = [[[1, 0], [0, 0]], [[0, 0], [1, 0]]];
const P = (l: number): M2 => [[[1, 0], [0, 0]], [[0, 0], e(l)]];
const RX = (t: number): M2 => [[[Math.cos(t / 2), 0], [0, -Math.sin(t / 2)]], [[0, -Math.sin(t / 2)], [Math.cos(t / 2), 0]]];
const RY = (t: number): M2 => [[[Math.cos(t / 2), 0], [-Math.sin(t / 2), 0]], [[Math.sin(t / 2), 0], [Math.cos(t / 2), 0]]];
const RZ = (t: number): M2 => [[e(-t / 2), [0, 0]], [[0, 0], e(t / 2)]];
const U3 = (t: number, p: number, l: number): M2 => [
	[[Math.cos(t / 2), 0], sc(-Math.sin(t / 2), e(l))],
	[sc(Math.sin(t / 2), e(p)), sc(Math.cos(t / 2), e(p + l))]
];
const SX: M2 = [[[0.5, 0.5], [0.5, -0.5]], [[0.5, -0.5], [0.5, 0.5]]];
const phased = (m: M2, g: number): M2 => m.map((row) => row.map((z) => [z[0] * Math.cos(g) - z[1] * Math.sin(g), z[0] * Math.sin(g) + z[1] * Math.cos(g)])) as M2;

/** Unitary of U on `target` controlled by every qubit in `controls` (little-endian basis index). */
function controlled(n: number, controls: number[], target: number, m: M2): DenseUnitary {
	const dim = 1 << n;
	const columns: Float64Array[] = [];
	let cm = 0;
	for (const c of controls) cm |= 1 << c;
	for (let j = 0; j < dim; j++) {
		const col = new Float64Array(2 * dim);
		if ((j & cm) !== cm) col[2 * j] = 1;
		else {
			const b = (j >> target) & 1;
			for (let o = 0; o < 2; o++) {
				const i = (j & ~(1 << target)) | (o << target);
				col[2 * i] += m[o][b][0];
				col[2 * i + 1] += m[o][b][1];
			}
		}
		columns.push(col);
	}
	return { qubitCount: n, columns };
}
/** Swap of qubits a, b controlled by `controls`. */
function controlledSwap(n: number, controls: number[], a: number, b: number): DenseUnitary {
	const dim = 1 << n;
	let cm = 0;
	for (const c of controls) cm |= 1 << c;
	const columns: Float64Array[] = [];
	for (let j = 0; j < dim; j++) {
		const col = new Float64Array(2 * dim);
		let i = j;
		if ((j & cm) === cm && ((j >> a) & 1) !== ((j >> b) & 1)) i = j ^ ((1 << a) | (1 << b));
		col[2 * i] = 1;
		columns.push(col);
	}
	return { qubitCount: n, columns };
}

function unitaryOfCall(version: 2 | 3, call: string, n: number): DenseUnitary {
	const head = version === 2 ? 'OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[' + n + '];\n' : 'OPENQASM 3.0;\ninclude "stdgates.inc";\nqubit[' + n + '] q;\n';
	const qs = Array.from({ length: n }, (_, i) => `q[${i}]`).join(', ');
	const text = call.includes('q[') || call.includes(';') ? `${head}${call}\n` : `${head}${call} ${qs};\n`;
	return circuitUnitary(lowerCircuit(importQasm(text).document));
}

const cases: [2 | 3, string, number, DenseUnitary][] = [
	[2, 'x', 1, controlled(1, [], 0, X)],
	[2, 'y', 1, controlled(1, [], 0, Y)],
	[2, 'z', 1, controlled(1, [], 0, Z)],
	[2, 'h', 1, controlled(1, [], 0, H)],
	[2, 's', 1, controlled(1, [], 0, P(Math.PI / 2))],
	[2, 'sdg', 1, controlled(1, [], 0, P(-Math.PI / 2))],
	[2, 't', 1, controlled(1, [], 0, P(Math.PI / 4))],
	[2, 'tdg', 1, controlled(1, [], 0, P(-Math.PI / 4))],
	[2, 'id', 1, controlled(1, [], 0, I2)],
	[2, 'rx(0.7)', 1, controlled(1, [], 0, RX(0.7))],
	[2, 'ry(0.7)', 1, controlled(1, [], 0, RY(0.7))],
	[2, 'rz(0.7)', 1, controlled(1, [], 0, RZ(0.7))],
	[2, 'u1(0.7)', 1, controlled(1, [], 0, P(0.7))],
	[2, 'u2(0.3, 0.5)', 1, controlled(1, [], 0, U3(Math.PI / 2, 0.3, 0.5))],
	[2, 'u3(0.4, 0.3, 0.5)', 1, controlled(1, [], 0, U3(0.4, 0.3, 0.5))],
	[2, 'U(0.4, 0.3, 0.5)', 1, controlled(1, [], 0, U3(0.4, 0.3, 0.5))],
	[2, 'p(0.7)', 1, controlled(1, [], 0, P(0.7))],
	[2, 'cx', 2, controlled(2, [0], 1, X)],
	[2, 'CX', 2, controlled(2, [0], 1, X)],
	[2, 'cy', 2, controlled(2, [0], 1, Y)],
	[2, 'cz', 2, controlled(2, [0], 1, Z)],
	[2, 'ch', 2, controlled(2, [0], 1, H)],
	[2, 'crz(0.7)', 2, controlled(2, [0], 1, RZ(0.7))],
	[2, 'cu1(0.7)', 2, controlled(2, [0], 1, P(0.7))],
	[2, 'cp(0.7)', 2, controlled(2, [0], 1, P(0.7))],
	[2, 'cu3(0.4, 0.3, 0.5)', 2, controlled(2, [0], 1, U3(0.4, 0.3, 0.5))],
	[2, 'swap', 2, controlledSwap(2, [], 0, 1)],
	[2, 'ccx', 3, controlled(3, [0, 1], 2, X)],
	[2, 'cswap', 3, controlledSwap(3, [0], 1, 2)],
	[3, 'phase(0.7)', 1, controlled(1, [], 0, P(0.7))],
	[3, 'cphase(0.7)', 2, controlled(2, [0], 1, P(0.7))],
	[3, 'sx', 1, controlled(1, [], 0, SX)],
	[3, 'crx(0.7)', 2, controlled(2, [0], 1, RX(0.7))],
	[3, 'cry(0.7)', 2, controlled(2, [0], 1, RY(0.7))],
	[3, 'cu(0.4, 0.3, 0.5, 0.2)', 2, controlled(2, [0], 1, phased(U3(0.4, 0.3, 0.5), 0.2))],
	[3, 'U(0.4, 0.3, 0.5)', 1, controlled(1, [], 0, U3(0.4, 0.3, 0.5))],
	// Modifiers (OpenQASM 3 specification: ctrl adds a control on the front argument, negctrl a
	// control on |0⟩, inv the inverse, pow the power).
	[3, 'ctrl @ h', 2, controlled(2, [0], 1, H)],
	[3, 'ctrl(2) @ h', 3, controlled(3, [0, 1], 2, H)],
	[3, 'ctrl @ ctrl @ U(0.4, 0.3, 0.5)', 3, controlled(3, [0, 1], 2, U3(0.4, 0.3, 0.5))],
	[3, 'ctrl @ rz(0.7)', 2, controlled(2, [0], 1, RZ(0.7))],
	[3, 'ctrl(2) @ rz(0.7)', 3, controlled(3, [0, 1], 2, RZ(0.7))],
	[3, 'ctrl(3) @ x', 4, controlled(4, [0, 1, 2], 3, X)],
	[3, 'ctrl(2) @ swap', 4, controlledSwap(4, [0, 1], 2, 3)],
	[3, 'ctrl @ y', 2, controlled(2, [0], 1, Y)],
	[3, 'ctrl @ sx', 2, controlled(2, [0], 1, SX)],
	[3, 'inv @ s', 1, controlled(1, [], 0, P(-Math.PI / 2))],
	[3, 'inv @ U(0.4, 0.3, 0.5)', 1, controlled(1, [], 0, [[[Math.cos(0.2), 0], sc(Math.sin(0.2), e(-0.3))], [sc(-Math.sin(0.2), e(-0.5)), sc(Math.cos(0.2), e(-0.8))]])],
	[3, 'pow(2) @ t', 1, controlled(1, [], 0, P(Math.PI / 2))],
	[3, 'pow(1/2) @ z', 1, controlled(1, [], 0, P(Math.PI / 2))],
	[3, 'pow(3) @ h', 1, controlled(1, [], 0, H)],
	[3, 'ctrl @ gphase(0.7) q[0];', 1, controlled(1, [], 0, P(0.7))]
];

describe('gates as unitaries (up to global phase)', () => {
	for (const [v, call, n, want] of cases)
		it(`OpenQASM ${v}: ${call}`, () => {
			expect(unitaryDistance(unitaryOfCall(v, call, n), want)).toBeLessThan(1e-9);
		});
	it('negctrl @ x fires on |0⟩ of the control', () => {
		const u = unitaryOfCall(3, 'negctrl @ x', 2);
		// |q0=0, q1=0⟩ → |q0=0, q1=1⟩ (index 0 → 2); |q0=1, q1=0⟩ unchanged (index 1 → 1).
		expect(u.columns[0][2 * 2]).toBeCloseTo(1, 12);
		expect(u.columns[1][2 * 1]).toBeCloseTo(1, 12);
	});
	it('crz is not cp: they differ by a phase on the control, not a global phase', () => {
		expect(unitaryDistance(unitaryOfCall(2, 'crz(0.7)', 2), unitaryOfCall(2, 'cp(0.7)', 2))).toBeGreaterThan(0.1);
		// uncontrolled, rz and p agree up to global phase
		expect(unitaryDistance(unitaryOfCall(2, 'rz(0.7)', 1), unitaryOfCall(2, 'p(0.7)', 1))).toBeLessThan(1e-12);
	});
});

describe('exact angles', () => {
	const items = (text: string) => importQasm(text).document.body as GateItem[];
	it('cu1(pi/8) is cp of 1/16 turn; t is p of 1/8 turn; z is p of 1/2 turn', () => {
		const b = items('OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[2];\ncu1(pi/8) q[0], q[1];\nt q[0];\nz q[1];\ntdg q[0];\n');
		expect(b.map((i) => [i.gate, i.angle])).toEqual([
			['cp', '1/2^4 turn'],
			['p', '1/2^3 turn'],
			['p', '1/2^1 turn'],
			['p', '7/2^3 turn']
		]);
	});
	it('crz(pi/4) is p(−pi/8) on the control then cp(pi/4), exactly', () => {
		const b = items('OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[2];\ncrz(pi/4) q[0], q[1];\n');
		expect(b.map((i) => [i.gate, i.qubits.map((q) => q.index), i.angle])).toEqual([
			['p', [0], '15/2^4 turn'],
			['cp', [0, 1], '1/2^3 turn']
		]);
	});
	it('expressions: tau, π, **, ^, sqrt, const values; 64-bit exponents stay exact', () => {
		const b = items('OPENQASM 3.0;\ninclude "stdgates.inc";\nconst int m = 40;\nconst float[64] th = tau/2**m;\nqubit q;\np(th) q;\np(π/2^3) q;\np(-2*pi*5/2**6) q;\np(sqrt(4)*pi/8) q;\np(0.25*pi) q;\n');
		expect(b.map((i) => i.angle)).toEqual(['1/2^40 turn', '1/2^4 turn', '59/2^6 turn', '1/2^3 turn', '1/2^3 turn']);
	});
	it('a non-dyadic angle is a float', () => {
		const b = items('OPENQASM 3.0;\ninclude "stdgates.inc";\nqubit q;\np(1) q;\np(pi/3) q;\n');
		expect(b[0].angle!.startsWith('~')).toBe(true);
		expect(Number(b[1].angle!.slice(1))).toBeCloseTo(1 / 6, 14);
	});
});

describe('constructs', () => {
	it('OpenQASM 2: gate definitions, broadcast, barrier, comments, the measure warning and the reset note', () => {
		const r = importQasm(fixture('constructs2.qasm'), { file: 'constructs2.qasm' });
		expect(r.version).toBe(2);
		expect(r.document.registers).toEqual([
			{ name: 'a', size: 2 },
			{ name: 'b', size: 2 }
		]);
		expect(r.warnings.map((w) => `${w.line}:${w.column}: ${w.message}`)).toEqual([
			'38:1: measure skipped: the checker reads the final state directly',
			'39:1: reset is read as a checked claim, not an operation: the qubit must be |0⟩ here, and a run where it is not fails at this line'
		]);
		const body = r.document.body as GateItem[];
		// `h a;` broadcasts to a[0], a[1]; `cx a, b;` pairs a[i] with b[i] (OpenQASM 2.0 spec, §3
		// "broadcast"). Each broadcast stays one call item; its gates sit in a block (issue 10).
		const calls = r.document.body.slice(0, 2) as unknown as CallItem[];
		expect(calls.map((c) => [c.type, c.block, c.source?.line])).toEqual([
			['call', 'each_h_a', 17],
			['call', 'each_cx_a', 18]
		]);
		const inBlock = (name: string) => (r.document.blocks!.find((b) => b.name === name)!.body as GateItem[]).map((i) => [i.gate, i.qubits.map((q) => `${q.register}${q.index}`).join(' ')]);
		expect([...inBlock('each_h_a'), ...inBlock('each_cx_a')]).toEqual([
			['h', 'a0'],
			['h', 'a1'],
			['cx', 'a0 b0'],
			['cx', 'a1 b1']
		]);
		// twice(pi/8) → twist(pi/8, -pi/8) then twist(pi/4, (pi/8)^2): the call site is line 20,
		// the definitions' lines are kept in the origin.
		const fromTwice = body.filter((i) => i.source?.line === 20);
		expect(fromTwice.map((i) => [i.gate, i.angle?.startsWith('~') ? 'float' : i.angle])).toEqual([
			['cp', '1/2^5 turn'],
			['rz', '15/2^4 turn'],
			['cp', '1/2^4 turn'],
			['rz', 'float']
		]);
		const k = body.indexOf(fromTwice[0]);
		expect(r.origins[k].definitions).toEqual([
			{ gate: 'twice', line: 13, column: 3 },
			{ gate: 'twist', line: 9, column: 3 }
		]);
		expect(body.every((i) => i.source && i.source.line >= 17)).toBe(true);
		// Lowered, the broadcasts are the same gates as before, in order.
		const lowered = lowerCircuit(r.document);
		expect(Array.from(lowered.kinds.slice(0, 4))).toEqual([GateCode.h, GateCode.h, GateCode.cx, GateCode.cx]);
		expect(() => lowerCircuit(r.document)).not.toThrow();
	});
	it('OpenQASM 3: declarations, const values, modifiers, measure forms', () => {
		const r = importQasm(fixture('constructs3.qasm3'), { file: 'constructs3.qasm3' });
		expect(r.version).toBe(3);
		expect(r.document.registers).toEqual([
			{ name: 'a', size: 2 },
			{ name: 'b', size: 3 },
			{ name: 'flag', size: 1 }
		]);
		// The three measure forms (lines 33–35) make one warning, at the first, counting them all; line 36 is the reset.
		expect(r.warnings.map((w) => w.line)).toEqual([33, 36]);
		expect(r.warnings[0].message).toBe('measure skipped: the checker reads the final state directly (3 measurements skipped in all, lines 33–35)');
		const at = (line: number) => (r.document.body as GateItem[]).filter((i) => i.source?.line === line).map((i) => [i.gate, i.angle ?? '']);
		expect(at(15)).toEqual([['cp', '1/2^4 turn']]);
		expect(at(16)).toEqual([['ccx', '']]);
		expect(at(17)).toEqual([['x', ''], ['cx', ''], ['x', '']]);
		expect(at(18)).toEqual([['p', '7/2^3 turn']]);
		expect(at(19)).toEqual([['p', '3/2^3 turn']]);
		expect(at(20)).toEqual([['p', '1/2^3 turn']]);
		expect(at(22)).toEqual([['cp', '7/2^3 turn']]);
		expect(at(29)).toEqual([]); // a bare gphase is a global phase
		expect(at(31)).toEqual([['p', '1/2^5 turn']]);
		expect(at(32)).toEqual([['mcp', '1/2^1 turn']]);
		expect(() => lowerCircuit(r.document)).not.toThrow();
	});
	it('measurements after the warning limit (1000) change no other warning', () => {
		// 1000 non-const declarations fill the warnings; the measurements after them have no warning of their own to update.
		const decls = Array.from({ length: 1000 }, (_, k) => `float x${k} = 0.5;`).join('\n');
		const r = importQasm(`OPENQASM 3.0;\ninclude "stdgates.inc";\nqubit[1] q;\nbit[1] c;\n${decls}\nc[0] = measure q[0];\nc[0] = measure q[0];\n`, { file: 'many.qasm3' });
		expect(r.warnings).toHaveLength(1000);
		expect(r.warnings[999].message).toBe('"x999" is read as a constant (it is never reassigned here)');
	});
	it('the adder written in OpenQASM 2 and in OpenQASM 3 lowers to the same gates', () => {
		const a = lowerCircuit(importQasm(fixture('adder3.qasm')).document);
		const b = lowerCircuit(importQasm(fixture('adder3.qasm3')).document);
		const show = (c: typeof a) => Array.from({ length: c.gateCount }, (_, g) => {
			const v = gateAt(c, g);
			return `${v.kind} ${[...v.controls, ...v.targets].join(',')} ${v.angle ? JSON.stringify(v.angle, (_k, x) => (typeof x === 'bigint' ? String(x) : x)) : ''}`;
		});
		expect(show(b)).toEqual(show(a));
		expect(a.gateCount).toBe(6 + 6 + 6);
	});
	it('no header: read as OpenQASM 3 with a warning', () => {
		const r = importQasm('include "stdgates.inc";\nqubit q;\nh q;\n');
		expect(r.version).toBe(3);
		expect(r.warnings[0]).toEqual({ line: 1, column: 1, message: 'no OPENQASM header; reading the file as OpenQASM 3' });
	});
});

describe('malformed files', () => {
	const expected: Record<string, string> = {
		'01-unknown-gate.qasm': '5:1: unknown gate "frob"; expected a gate from qelib1.inc or one defined earlier with "gate"',
		'02-missing-include.qasm': '3:1: unknown gate "h": it is defined in qelib1.inc; add include "qelib1.inc"; before using it',
		'03-wrong-qubit-count.qasm': '4:4: gate cx takes 2 qubit arguments, got 1',
		'04-wrong-param-count.qasm': '4:4: gate rz takes 1 parameter, got 2',
		'05-index-out-of-range.qasm': '4:5: index 3 out of range for register "q" of size 3; expected 0..2',
		'06-undefined-register.qasm': '4:10: undefined register "r"; declare it first with qreg',
		'07-broadcast-mismatch.qasm': '5:7: register size mismatch in broadcast: "b" has 3 qubits but "a" has 2',
		'08-recursive-gate.qasm': '6:3: recursive gate definition: gate "spin" calls itself',
		'09-division-by-zero.qasm': '4:4: division by zero in expression',
		'10-unknown-name.qasm': '4:7: unknown name "theta" in expression; expected a parameter, a constant or pi',
		'11-missing-semicolon.qasm': '4:7: missing ";" after the call of h; found "x"',
		'12-bad-version.qasm': '1:10: bad version header: unsupported OpenQASM version 4.0; expected 2.0 or 3.0',
		'13-header-not-first.qasm': '2:1: bad version header: OPENQASM must be the first statement of the file',
		'14-duplicate-register.qasm': '4:6: duplicate declaration: "q" is already declared at line 3',
		'15-duplicate-gate.qasm': '4:6: duplicate declaration: gate "flip" is already defined at line 3',
		'16-qubit-twice.qasm': '4:10: qubit q[1] is used twice in one gate call',
		'17-too-many-qubits.qasm': '3:6: too many qubits: 1200 exceeds the limit of 1024',
		'18-gate-explosion.qasm': '26:1: more than 1000000 gates after expanding gate definitions (limit)',
		'19-nesting-depth.qasm': '74:1: gate calls nested deeper than 64 (limit)',
		'20-qubit-decl-in-v2.qasm': '2:1: "qubit" declarations need OpenQASM 3; this file declares OPENQASM 2.0 (use qreg)',
		'21-modifier-in-v2.qasm': '4:1: gate modifier "ctrl @" needs OpenQASM 3; this file declares OPENQASM 2.0',
		'22-unknown-include.qasm':
			'2:9: cannot include "mylib.inc": only "qelib1.inc" (OpenQASM 2) and "stdgates.inc" (OpenQASM 3) are built in; paste other definitions into the file',
		'23-unterminated-comment.qasm': '2:1: unterminated comment: expected "*/" before the end of the file',
		'24-bad-character.qasm': '3:3: unexpected character "$"',
		'25-indexed-formal.qasm': '4:7: qubit arguments inside a gate definition cannot be indexed; "a" is a single qubit',
		'26-classical-as-qubit.qasm': '5:3: "c" is a classical register; expected a qubit register',
		'27-if-statement.qasm': '5:1: classically controlled gates ("if") are not supported; the checker simulates unitary circuits only',
		'28-pow-fraction.qasm': '4:1: pow(0.5) @ h: a non-integer power is supported on phase gates only',
		'29-const-not-integer.qasm': '2:15: value of int "n" must be an integer',
		'30-measure-in-gate.qasm': '5:3: "measure" is not allowed inside a gate definition',
		'31-unclosed-gate.qasm': '3:13: missing "}" to close the body of gate half before the end of the file',
		'32-wrong-include-version.qasm': '2:9: "qelib1.inc" belongs to OpenQASM 2; this file declares OPENQASM 3 (include "stdgates.inc")',
		'33-missing-semicolon-decl.qasm': '3:11: missing ";" after the declaration of "a"; found "h"',
		'34-ctrl-arity.qasm': '4:13: ctrl(2) @ x takes 3 qubit arguments, got 2',
		'35-unknown-function.qasm':
			'4:4: unknown function "cosh" in expression; expected one of sin, cos, tan, arcsin, arccos, arctan, asin, acos, atan, sqrt, exp, ln, log, floor, ceiling, ceil, abs, pow, mod',
		'36-two-operands.qasm': '4:6: expected an operator before "pi"',
		'37-no-qubits.qasm': '3:1: the file declares no qubits; expected at least one qreg or qubit declaration'
	};
	for (const [file, msg] of Object.entries(expected))
		it(file, () => {
			let err: unknown;
			try {
				importQasm(fixture(`bad/${file}`), { file });
			} catch (e) {
				err = e;
			}
			expect(err).toBeInstanceOf(QasmError);
			expect((err as Error).message).toBe(`${file}:${msg}`);
		});
	it('file size limit', () => {
		expect(() => importQasm('OPENQASM 2.0;' + ' '.repeat(200), { file: 'big.qasm', limits: { maxBytes: 100 } })).toThrow(
			'big.qasm:1:101: file is too large: 213 characters exceeds the limit of 100; the limit is crossed here'
		);
	});
	it('gate limit after lowering, counted at the call site', () => {
		expect(() => importQasm('OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[4];\nh q;\nx q;\n', { limits: { maxGates: 6 } })).toThrow(
			'<input>:5:1: more than 6 gates after expanding gate definitions (limit)'
		);
	});
	it('never hangs on deep parentheses or long garbage', () => {
		const t0 = Date.now();
		expect(() => importQasm('OPENQASM 2.0;\nqreg q[1];\nU(' + '('.repeat(5000) + ') q[0];\n')).toThrow(QasmError);
		expect(() => importQasm('OPENQASM 3.0;\n' + 'qubit q;\n' + ';'.repeat(100_000) + '}')).toThrow(QasmError);
		expect(Date.now() - t0).toBeLessThan(3000);
	});
});
