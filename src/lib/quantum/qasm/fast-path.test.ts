import { readdirSync, readFileSync } from 'node:fs';
import { afterEach, describe, expect, it } from 'vitest';
import { importQasm } from './import.js';
import { FAST_PATH } from './parser.js';
import { exporterStyleQasm } from '../bench/import-bench.js';
import { mulberry32 } from '../testing/rng.js';

// The reader's fast path (`parser.ts: fastCall`) reads plain gate calls straight from the text.
// Its reference is the token path of the same reader: with the fast path off, every statement is
// read by the tokens, as before it existed. Each case below imports a file both ways and asserts
// the same outcome: the whole result (document, origins, warnings, printed-angle counts, notes) or
// the same `file:line:column: message`.

/** Outcome of an import as comparable text: the result as JSON, or the error message. */
function outcome(text: string, fast: boolean, options: Parameters<typeof importQasm>[1] = {}): { text: string; fastReads: number } {
	FAST_PATH.enabled = fast;
	const before = FAST_PATH.read;
	let out: string;
	try {
		out = JSON.stringify(importQasm(text, { file: 'f.qasm', ...options }));
	} catch (e) {
		out = `error ${(e as Error).name}: ${(e as Error).message}`;
	}
	return { text: out, fastReads: FAST_PATH.read - before };
}

function expectSame(text: string, options: Parameters<typeof importQasm>[1] = {}): number {
	const tokens = outcome(text, false, options);
	const fast = outcome(text, true, options);
	expect(fast.text).toBe(tokens.text);
	expect(tokens.fastReads).toBe(0);
	return fast.fastReads;
}

afterEach(() => {
	FAST_PATH.enabled = true;
});

// Every standard gate the fast path reads, written as exporters write them (our own file).
const QELIB = `OPENQASM 2.0;
include "qelib1.inc";
qreg q[5];
qreg r[3];
creg c[5];
x q[0]; h q[1]; cx q[0],q[1]; CX q[1], q[2]; ccx q[0],q[1],q[2]; swap q[3],q[4];
u1(0.785398) q[0];
u1(0.785398) q[1];
p(-pi/8) q[2]; rz(1.5707963267948966) q[3]; rz( -0.392699 ) q[4];
cp(pi/16) q[0],q[4]; cu1(0.19634954084936207) q[1],q[3];
z q[0]; cz q[1],q[2]; s q[3]; sdg q[4]; t q[0]; tdg q[1];
u3(pi/2, 0, pi) q[0]; u2(0, pi) q[1]; u(0,0,pi/4) q[2]; U(0, 0, 0.3) q[3];
y q[0]; sx q[1]; sxdg q[2]; rx(pi/3) q[3]; ry(0.1) q[4];
cy q[0],q[1]; ch q[2],q[3]; crz(pi/4) q[0],q[1]; cswap q[0],q[1],q[2]; rccx q[0],q[1],q[2];
c3x q[0],q[1],q[2],q[3]; u0(1) q[0];
// a comment between statements
h r[0];   // and after one
	cx r[0] , r[2] ;
u1(0.785398) r[1]; u1(0.7853981) r[1]; u1(0.12345) r[2]; u1(0.12345) r[2];
barrier q; measure q[0] -> c[0];
h q; cx q[0], r[1];
u1(2*pi/3) q[0]; u1(2*pi/3) q[1];
id q[0];
`;

const STDGATES = `OPENQASM 3.0;
include "stdgates.inc";
qubit[4] q;
qubit a;
phase(pi/4) q[0]; cphase(pi/8) q[0], q[1]; p(pi/4) q[2]; rz(pi) a[0];
const float theta = pi/8;
p(theta) q[0]; p(theta) q[1];
p(pi/4) q[3];
const float pi2 = 0.5;
p(pi2) q[0];
for int i in [0:2] { h q[i]; p(pi/4) q[i]; }
p(pi/4) q[1];
let x = q[0:1];
h x[0]; h q[2];
ctrl @ x q[0], q[1]; inv @ s q[2]; gphase(pi/2);
def f(qubit b, angle t) { p(t) b; h b; }
f(q[3], pi/4);
p(pi/4) q[3];
gate g(t) u { p(t) u; }
g(pi/4) q[0]; p(pi/4) q[0];
h q[0]; h q[1]
`;

describe('the fast path reads plain gate calls exactly as the token path', () => {
	it('every standard gate of qelib1.inc, with spacing, comments, decimals, broadcasts and idle gates', () => {
		expect(expectSame(QELIB)).toBeGreaterThan(25);
	});

	it('OpenQASM 3: constants, loops, aliases, subroutines, definitions and modifiers between plain calls', () => {
		expect(expectSame(STDGATES)).toBeGreaterThan(5);
		// The missing ";" at the very end is still worded by the token path.
		expect(outcome(STDGATES, true).text).toMatch(/^error QasmError: f\.qasm:\d+:\d+: missing ";"/);
	});

	it('a constant named like a built-in constant changes later parameters (the remembered texts are dropped)', () => {
		const text = 'OPENQASM 3.0;\ninclude "stdgates.inc";\nqubit[2] q;\np(pi/2) q[0];\nconst float e = 1.0;\np(e) q[1];\np(pi/2) q[1];\n';
		expectSame(text);
	});

	it('options: exact decimals off, decompositions off, a 12 000-gate exporter-style file', () => {
		expectSame(QELIB, { exactDecimals: false });
		expectSame(exporterStyleQasm(400), { recogniseDecompositions: false });
		expect(expectSame(exporterStyleQasm(12_000))).toBeGreaterThan(11_000);
	});

	it('limits: the gate limit and the size limit are met at the same statement with the same message', () => {
		const text = exporterStyleQasm(50);
		expectSame(text, { limits: { maxGates: 20 } });
		expect(outcome(text, true, { limits: { maxGates: 20 } }).text).toMatch(/more than 20 gates/);
		expectSame(QELIB, { limits: { maxGates: 12 } });
	});

	it('a lexical error anywhere still wins over an earlier reading error, as when the whole file was lexed first', () => {
		const text = 'OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[2];\nh q[0];\nfoo q[0];\nh q[1];\nh q[1] $;\n';
		expectSame(text);
		expect(outcome(text, true).text).toBe('error QasmError: f.qasm:7:8: unexpected character "$"');
	});

	it('bad statements inside runs of plain calls are worded by the token path', () => {
		const cases = [
			'h q[2];', // out of range
			'cx q[0], q[0];', // repeated qubit
			'u1(0.785398) q[0], q[1];', // arity
			'h q[0]', // missing ;
			'u1(0.785398 q[0];',
			'cx q[0], r[0];', // undefined register
			'h c[0];', // classical register
			'h q[1_0];',
			'h q[1a];',
			'u1(0.785398) q[0]; u1(0.785398 /* c */) q[1];',
			'u1(0.785398e) q[0];',
			'u1(2^3) q[0];',
			'hh q[0];',
			'h q[-1];',
			'h q[0.5];'
		];
		for (const bad of cases) {
			const text = `OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[2];\ncreg c[2];\nh q[0]; u1(0.785398) q[1]; cx q[0],q[1];\n${bad}\nh q[1];\n`;
			expectSame(text);
		}
	});
});

// Seeded mutations (mulberry32, as in fuzz.test.ts): the outcome must not depend
// on which path read a statement.
const PIECES = ['(', ')', ';', 'q[', ']', '[0]', ',', ' ', '\n', '//', '/*', '*/', 'pi', '-', '0.785398', 'h', 'cx', 'u1', 'q', 'r[1]', 'qreg r[2];', 'const float pi = 1;', '$', 'é', 'π', '_', '1e', '{', '}'];

describe('seeded mutations read the same both ways', () => {
	it('400 mutated files from the fixtures and an exporter-style file', () => {
		const fixtures = new URL('./fixtures/', import.meta.url);
		const seeds = [
			QELIB,
			STDGATES,
			exporterStyleQasm(60),
			...readdirSync(fixtures)
				.filter((f) => /\.qasm3?$/.test(f))
				.map((f) => readFileSync(new URL(f, fixtures), 'utf8'))
		];
		const r = mulberry32(0x5eed13);
		for (let k = 0; k < 400; k++) {
			let t = seeds[k % seeds.length];
			const steps = 1 + Math.floor(r() * 3);
			for (let s = 0; s < steps; s++) {
				const at = Math.floor(r() * (t.length + 1));
				const kind = Math.floor(r() * 3);
				if (kind === 0) t = t.slice(0, at) + t.slice(at + 1 + Math.floor(r() * 6));
				else if (kind === 1) t = t.slice(0, at) + PIECES[Math.floor(r() * PIECES.length)] + t.slice(at);
				else t = t.slice(0, at) + String.fromCharCode(32 + Math.floor(r() * 95)) + t.slice(at);
			}
			expectSame(t);
		}
	});
});
