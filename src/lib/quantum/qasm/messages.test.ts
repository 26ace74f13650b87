// Every message the OpenQASM importer can give (lexer.ts, parser.ts, expand.ts, emit.ts, expr.ts,
// import.ts), one bad file each, with the exact line:column of the token at fault and the exact
// wording (issue 10: messages pointed at a false 1:1). Syntax per the OpenQASM 2.0 and 3.0
// specifications; the files are our own. Reviewed one by one: each position is the token the
// message is about (the unclosed "{", the "[" of a bad index, the value of a bad constant, just
// after the last token where a ";" is missing, the top-level call for limits met while expanding).
import { describe, expect, it } from 'vitest';
import { importQasm } from './import.js';
import { QasmError } from './lexer.js';
import type { QasmImportOptions } from './types.js';

const H2 = 'OPENQASM 2.0;\ninclude "qelib1.inc";\n';
const H3 = 'OPENQASM 3.0;\ninclude "stdgates.inc";\n';
/** [what, expected `line:column: message`, file text, options?]: one bad file per importer message. */
const CASES: [string, string, string, QasmImportOptions?][] = [
	// lexer.ts
	['unterminated comment', "4:3: unterminated comment: expected \"*/\" before the end of the file", H2 + 'qreg q[1];\n  /* never closed\nh q[0];\n'],
	['number too long', "4:4: number is too long", H2 + 'qreg q[1];\nu1(' + '1'.repeat(401) + ') q[0];\n'],
	['malformed number', "4:4: malformed number \"12ab\": expected digits, a decimal point or an exponent", H2 + 'qreg q[1];\nu1(12ab) q[0];\n'],
	['unterminated string', "2:9: unterminated string: expected a closing \" on the same line", H2.replace('"qelib1.inc";', '"qelib1.inc;')],
	['unexpected character', "4:9: unexpected character \"$\"", H2 + 'qreg q[1];\nh q[0]; $\n'],
	// import.ts
	['file too large', "3:10: file is too large: 63 characters exceeds the limit of 45; the limit is crossed here", H2 + 'qreg q[1];\nh q[0];\nh q[0];\n', { limits: { maxBytes: 45 } }],
	// A document holds at most 100 000 body items (MAX_BODY_ITEMS); the 100 001st top-level gate is named (it was a schema message about "body").
	[
		'too many top-level gates',
		"100004:1: more than 100000 top-level gates: a circuit holds at most 100000 items; write repeated parts as gate definitions, loops or broadcasts",
		H2 + 'qreg q[2];\n' + 'h q[0];\n'.repeat(100_001)
	],
	// parser.ts: header
	['version not a number', "1:10: bad version header: expected a version number after OPENQASM (2.0 or 3.0), found \"two\"", 'OPENQASM two;\n'],
	['unsupported version', "1:10: bad version header: unsupported OpenQASM version 4.0; expected 2.0 or 3.0", 'OPENQASM 4.0;\n'],
	['OPENQASM not first', "4:1: bad version header: OPENQASM must be the first statement of the file", H2 + 'qreg q[1];\nOPENQASM 2.0;\n'],
	// statements and punctuation
	['missing ;', "3:10: missing \";\" after qreg q[2]; found \"h\"", H2 + 'qreg q[2]\nh q[0];\n'],
	['expected punct', "3:7: expected \"[\" after the register name (qreg name[size];), found \"(\"", H2 + 'qreg q(2);\n'],
	['expected ident', "3:6: expected a register name after qreg, found \"5\"", H2 + 'qreg 5;\n'],
	['not a statement', "4:3: expected a statement (declaration, gate definition or gate call), found \"5\"", H2 + 'qreg q[1];\n  5;\n'],
	['eof in expression', "4:6: unexpected end of the file in a gate parameter", H2 + 'qreg q[1];\nu1(pi'],
	['empty parameter list', "4:1: gate u1 takes 1 parameter, got 0", H2 + 'qreg q[1];\nu1() q[0];\n'],
	['integer expected', "3:8: register size must be an integer", H2 + 'qreg q[1.5];\n'],
	['out of range', "3:8: register size 0 is out of range; expected 1..1024", H2 + 'qreg q[0];\n'],
	['missing ] eof', "4:4: missing \"]\" to close this index", H3 + 'qubit[2] q;\nh q[0'],
	['expected ] found )', "4:6: expected \"]\" to close the index, found \")\"", H3 + 'qubit[2] q;\nh q[0);\n'],
	['missing ] before ;', "4:6: missing \"]\" to close the index before \";\"", H3 + 'qubit[2] q;\nh q[0;\n'],
	['empty index', "4:4: empty index; expected an index, a range a:b or a set {i, j}", H3 + 'qubit[2] q;\nh q[];\n'],
	['set must end with }', "4:5: a set in the index of \"q\" must end with \"}\"", H3 + 'qubit[4] q;\nh q[{0, 1} + 1];\n'],
	['empty set element', "4:5: empty element in the set of the index of \"q\"", H3 + 'qubit[4] q;\nh q[{0,,1}];\n'],
	['bad range', "4:5: a range in the index of \"q\" is start:end or start:step:end (both ends given)", H3 + 'qubit[4] q;\nh q[0:1:2:3];\n'],
	['range step 0', "4:7: the range step must not be 0", H3 + 'qubit[4] q;\nh q[0:0:3];\n'],
	['range too long', "4:5: the range 0:1:9 has 10 values; at most 4 here", H3 + 'qubit[4] q;\nh q[0:9];\n'],
	['classical register as qubits', "5:3: \"c\" is a classical register; expected a qubit register", H2 + 'qreg q[1];\ncreg c[1];\nh c[0];\n'],
	['undefined register', "4:3: undefined register \"r\"; declare it first with qreg", H2 + 'qreg q[1];\nh r[0];\n'],
	['index out of range', "4:12: index 2 out of range for register \"q\" of size 2; expected 0..1", H2 + 'qreg q[2];\ncx q[0], q[2];\n'],
	['missing } of box', "4:5: missing \"}\" to close the body of box before the end of the file", H3 + 'qubit[1] q;\nbox {\nh q[0];\n'],
	['missing } of def', "4:16: missing \"}\" to close the body of def f before the end of the file", H3 + 'qubit[1] q;\ndef f(qubit a) {\nh a;\n'],
	['range longer than the limit', "4:16: the range 0:1:9 has 10 values; at most 5 here", H3 + 'qubit[1] q;\nfor uint i in [0:9] { h q[0]; }\n', { limits: { maxGates: 5 } }],
	['loop iterations limit', "4:1: more than 5 loop iterations and subroutine calls in all (limit)", H3 + 'qubit[1] q;\nfor uint i in [0:3] {\n  for uint j in [0:3] { }\n}\n', { limits: { maxGates: 5 } }],
	['expected in', "4:12: expected \"in\" after the loop variable, found \"on\"", H3 + 'qubit[1] q;\nfor uint i on [0:3] { h q[0]; }\n'],
	['missing } of loop set', "4:15: missing \"}\" to close the set of loop values", H3 + 'qubit[1] q;\nfor uint i in {0, 1; h q[0];\n'],
	['expected range after in', "4:15: expected a range [a:b] or a set {i, j} after \"in\", found \"5\"", H3 + 'qubit[1] q;\nfor uint i in 5 { h q[0]; }\n'],
	['loop variable hides register', "4:10: loop variable \"q\" hides a qubit register of the same name", H3 + 'qubit[1] q;\nfor uint q in [0:1] { }\n'],
	['duplicate def', "4:5: duplicate declaration: \"h\" is already defined", H3 + 'qubit[1] q;\ndef h(qubit a) { }\n'],
	['unsupported parameter type', "4:7: unsupported parameter type \"bit\"; expected qubit, qubit[n], angle, float, int or uint", H3 + 'qubit[1] q;\ndef f(bit a) { }\n'],
	['duplicate parameter', "4:22: duplicate declaration: parameter \"a\" appears twice", H3 + 'qubit[1] q;\ndef f(qubit a, qubit a) { }\n'],
	['def returns', "4:16: subroutines that return a value are not supported; expected a body \"{\"", H3 + 'qubit[1] q;\ndef f(qubit a) -> bit { }\n'],
	['sub argument count', "5:1: subroutine f takes 1 argument, got 2", H3 + 'qubit[1] q;\ndef f(qubit a) { h a; }\nf(q[0], q[0]);\n'],
	['sub nesting limit', "4:18: subroutine calls nested deeper than 64 (limit)", H3 + 'qubit[1] q;\ndef f(qubit a) { f(a); }\nf(q[0]);\n'],
	['sub argument not qubits', "5:3: argument 1 of f must be qubits (parameter \"a\")", H3 + 'qubit[1] q;\ndef f(qubit a) { h a; }\nf(3);\n'],
	['sub argument bad index', "5:5: argument 1 of f: expected a register, an alias or an indexed qubit", H3 + 'qubit[2] q;\ndef f(qubit a) { h a; }\nf(q + 1);\n'],
	['sub argument size', "5:3: argument 1 of f has 2 qubits; parameter \"a\" takes 1", H3 + 'qubit[2] q;\ndef f(qubit a) { h a; }\nf(q);\n'],
	['sub argument repeats', "5:9: argument 2 of f repeats a qubit of an earlier argument", H3 + 'qubit[2] q;\ndef f(qubit a, qubit b) { cx a, b; }\nf(q[0], q[0]);\n'],
	['sub int argument', "5:3: argument 1 of f must be an integer (parameter \"k\")", H3 + 'qubit[2] q;\ndef f(int k, qubit a) { h a; }\nf(1.5, q[0]);\n'],
	['sub argument ;', "5:7: unexpected \";\" in an argument of f", H3 + 'qubit[2] q;\ndef f(qubit a) { h a; }\nf(q[0];\n'],
	['sub argument missing', "5:9: expected an argument of f, found \")\"", H3 + 'qubit[2] q;\ndef f(qubit a, qubit b) { h a; }\nf(q[0], );\n'],
	['let duplicate', "4:5: duplicate declaration: \"q\" is already declared", H3 + 'qubit[2] q;\nlet q = q[0];\n'],
	['let names a qubit twice', "4:5: let x names a qubit twice", H3 + 'qubit[2] q;\nlet x = q[0] ++ q[0];\n'],
	['input type', "3:7: unsupported input type \"bit\"; expected angle, float, int or uint", H3 + 'input bit b;\n'],
	['input without value', "3:13: input angle theta has no value; give it with --param theta=… (for example pi/8)", H3 + 'input angle theta;\n'],
	['input duplicate', "4:13: duplicate declaration: \"theta\" is already declared", H3 + 'const int theta = 1;\ninput angle theta;\n', { params: { theta: 'pi' } }],
	['input bad value (lexer)', "3:13: --param theta=pi $: unexpected character \"$\"", H3 + 'input angle theta;\n', { params: { theta: 'pi $' } }],
	['input empty', "3:13: --param theta is empty", H3 + 'input angle theta;\n', { params: { theta: ' ' } }],
	['input bad value (expression)', "3:13: --param theta=pi +: expression does not parse (Unexpected end of expression); expected an arithmetic expression", H3 + 'input angle theta;\n', { params: { theta: 'pi +' } }],
	['input not integer', "3:11: --param k=1.5 must be an integer", H3 + 'input int k;\n', { params: { k: '1.5' } }],
	['qubit in OpenQASM 2', "3:1: \"qubit\" declarations need OpenQASM 3; this file declares OPENQASM 2.0 (use qreg)", H2 + 'qubit[2] q;\n'],
	['bit in OpenQASM 2', "3:1: \"bit\" declarations need OpenQASM 3; this file declares OPENQASM 2.0 (use creg)", H2 + 'bit[2] c;\n'],
	['const in OpenQASM 2', "3:1: \"const\" needs OpenQASM 3; this file declares OPENQASM 2.0", H2 + 'const int n = 2;\n'],
	['opaque', "4:1: opaque gates have no definition to simulate; define the gate with \"gate\" instead", H2 + 'qreg q[1];\nopaque g q;\n'],
	['if', "5:1: classically controlled gates (\"if\") are not supported; the checker simulates unitary circuits only", H2 + 'qreg q[1];\ncreg c[1];\nif (c == 1) x q[0];\n'],
	['unsupported OpenQASM 3 word', "4:1: \"while\" is not supported; expected gates, gate definitions, registers and const values", H3 + 'qubit[1] q;\nwhile (true) { }\n'],
	['measure without ;', "5:21: missing \";\" at the end of the \"measure\" statement before the end of the file", H2 + 'qreg q[1];\ncreg c[1];\nmeasure q[0] -> c[0]'],
	['assignment not measure', "5:1: assignment to \"c\" is not supported; only measurement results may be assigned", H3 + 'qubit[1] q;\nbit c;\nc = 1;\n'],
	['include without string', "2:9: expected a file name in quotes after include, found \"qelib1\"", 'OPENQASM 2.0;\ninclude qelib1;\n'],
	['include of the other version', "2:9: \"qelib1.inc\" belongs to OpenQASM 2; this file declares OPENQASM 3 (include \"stdgates.inc\")", 'OPENQASM 3.0;\ninclude "qelib1.inc";\n'],
	['include of another file', "2:9: cannot include \"mine.inc\": only \"qelib1.inc\" (OpenQASM 2) and \"stdgates.inc\" (OpenQASM 3) are built in; paste other definitions into the file", 'OPENQASM 2.0;\ninclude "mine.inc";\n'],
	['duplicate register', "4:6: duplicate declaration: \"q\" is already declared at line 3", H2 + 'qreg q[1];\nqreg q[2];\n'],
	['register name not ASCII', "3:10: register name \"θ\" must use ASCII letters, digits and _", H3 + 'qubit[1] θ;\n'],
	['too many qubits', "4:6: too many qubits: 6 exceeds the limit of 4", H2 + 'qreg q[3];\nqreg r[3];\n', { limits: { maxQubits: 4 } }],
	['duplicate creg', "4:6: duplicate declaration: \"q\" is already declared", H2 + 'qreg q[1];\ncreg q[1];\n'],
	['const type', "3:7: unsupported const type \"bit\"; expected int, uint, float or angle", H3 + 'const bit b = 1;\n'],
	['const duplicate', "4:11: duplicate declaration: \"n\" is already declared", H3 + 'const int n = 1;\nconst int n = 2;\n'],
	['const not integer', "3:15: value of int \"n\" must be an integer", H3 + 'const int n = 1.5;\n'],
	['uint negative', "3:16: value of uint \"n\" must not be negative", H3 + 'const uint n = -1;\n'],
	['modifier in OpenQASM 2', "4:1: gate modifier \"ctrl @\" needs OpenQASM 3; this file declares OPENQASM 2.0", H2 + 'qreg q[2];\nctrl @ x q[0], q[1];\n'],
	['inv with argument', "4:1: inv takes no argument; write \"inv @\"", H3 + 'qubit[1] q;\ninv(2) @ h q[0];\n'],
	['pow without exponent', "4:5: pow needs an exponent: pow(k) @", H3 + 'qubit[1] q;\npow @ h q[0];\n'],
	['indexed qubit inside gate', "4:15: qubit arguments inside a gate definition cannot be indexed; \"a\" is a single qubit", H2 + 'qreg q[1];\ngate g a { h a[0]; }\n'],
	['not a formal', "4:14: \"b\" is not a qubit argument of this gate definition", H2 + 'qreg q[1];\ngate g a { h b; }\n'],
	['duplicate gate', "5:6: duplicate declaration: gate \"g\" is already defined at line 4", H2 + 'qreg q[1];\ngate g a { h a; }\ngate g a { x a; }\n'],
	['gate redefines a standard one', "4:6: duplicate declaration: gate \"h\" is already defined by qelib1.inc", H2 + 'qreg q[1];\ngate h a { x a; }\n'],
	['gate named by a keyword', "3:6: \"measure\" is a keyword and cannot name a gate", 'OPENQASM 2.0;\nqreg q[1];\ngate measure a { U(0,0,0) a; }\n'],
	['duplicate gate parameter', "3:11: duplicate declaration: parameter \"t\" appears twice", H2 + 'gate g(t, t) a { h a; }\n'],
	['duplicate gate qubit', "3:11: duplicate declaration: qubit argument \"a\" appears twice", H2 + 'gate g a, a { h a; }\n'],
	['gate body unclosed', "4:10: missing \"}\" to close the body of gate g before the end of the file", H2 + 'qreg q[1];\ngate g a {\nh a;\n'],
	['measure inside gate', "4:12: \"measure\" is not allowed inside a gate definition", H2 + 'qreg q[1];\ngate g a { measure a; }\n'],
	['recursive gate', "4:12: recursive gate definition: gate \"g\" calls itself", H2 + 'qreg q[1];\ngate g a { g a; }\n'],
	['gphase in OpenQASM 2', "4:1: \"gphase\" needs OpenQASM 3", H2 + 'qreg q[1];\ngphase(pi) q[0];\n'],
	['gate of the other version', "4:1: unknown gate \"phase\" in OpenQASM 2; it is defined in OpenQASM 3 only", H2 + 'qreg q[1];\nphase(pi) q[0];\n'],
	['gate without include', "3:1: unknown gate \"h\": it is defined in qelib1.inc; add include \"qelib1.inc\"; before using it", 'OPENQASM 2.0;\nqreg q[1];\nh q[0];\n'],
	['unknown gate', "4:1: unknown gate \"frob\"; expected a gate from qelib1.inc or one defined earlier with \"gate\"", H2 + 'qreg q[1];\nfrob q[0];\n'],
	['parameter count', "4:4: gate u1 takes 1 parameter, got 2", H2 + 'qreg q[1];\nu1(pi, pi) q[0];\n'],
	['qubit count', "4:4: gate cx takes 2 qubit arguments, got 1", H2 + 'qreg q[2];\ncx q[0];\n'],
	['unknown name in definition', "4:18: unknown name \"s\" in expression; expected a parameter of this gate, a constant or pi", H2 + 'qreg q[1];\ngate g(t) a { u1(s) a; }\n'],
	['qubit twice in definition', "4:21: qubit \"a\" is used twice in one gate call", H2 + 'qreg q[2];\ngate g a, b { cx a, a; }\n'],
	['gate limit before expansion', "5:1: more than 2 gates after expanding gate definitions (limit)", H2 + 'qreg q[1];\ngate g a { h a; h a; h a; }\ng q[0];\n', { limits: { maxGates: 2 } }],
	['broadcast size mismatch', "5:7: register size mismatch in broadcast: \"b\" has 3 qubits but \"a\" has 2", H2 + 'qreg a[2];\nqreg b[3];\ncx a, b;\n'],
	['qubit twice in a call', "4:10: qubit q[1] is used twice in one gate call", H2 + 'qreg q[2];\ncx q[1], q[1];\n'],
	['no qubits', "4:1: the file declares no qubits; expected at least one qreg or qubit declaration", H2 + 'creg c[1];\n'],
	// expand.ts
	['gate nesting limit', "7:3: gate calls nested deeper than 1 (limit)", H2 + 'qreg q[1];\ngate g0 a { h a; }\ngate g1 a { g0 a; }\ngate g2 a { g1 a; }\n  g2 q[0];\n', { limits: { maxDepth: 1 } }],
	['non-integer pow of a non-phase gate', "4:1: pow(0.5) @ h: a non-integer power is supported on phase gates only", H3 + 'qubit[1] q;\npow(0.5) @ h q[0];\n'],
	['pow exceeds the gate limit', "4:1: pow(10) @ h exceeds the limit of 5 gates", H3 + 'qubit[1] q;\npow(10) @ h q[0];\n', { limits: { maxGates: 5 } }],
	['calls limit', "6:3: more than 2 gate calls after expanding gate definitions (limit); \"e\" is called too often", H2 + 'qreg q[1];\ngate e a { }\ngate f a { e a; e a; e a; }\n  f q[0];\n', { limits: { maxCalls: 2 } }],
	['gates limit while emitting', "6:3: more than 2 gates after expanding gate definitions (limit)", H2 + 'qreg q[1];\nh q[0];\nh q[0];\n  h q[0];\n', { limits: { maxGates: 2 } }],
	// expr.ts
	['unknown function', "4:4: unknown function \"foo\" in expression; expected one of sin, cos, tan, arcsin, arccos, arctan, asin, acos, atan, sqrt, exp, ln, log, floor, ceiling, ceil, abs, pow, mod", H2 + 'qreg q[1];\nu1(foo(1)) q[0];\n'],
	['unknown name', "4:6: unknown name \"theta\" in expression; expected a parameter, a constant or pi", H2 + 'qreg q[1];\nu1(2*theta) q[0];\n'],
	['a name mathjs knows but OpenQASM does not', "4:4: unknown name \"i\" in expression; expected a parameter, a constant or pi", H2 + 'qreg q[1];\nu1(i) q[0];\n'],
	['unexpected operator', "4:7: unexpected \"&\" in expression; expected + - * / ** ^ % or parentheses", H2 + 'qreg q[1];\nu1(pi & 2) q[0];\n'],
	['string in expression', "4:4: unexpected string \"pi\" in expression", H2 + 'qreg q[1];\nu1("pi") q[0];\n'],
	['missing operator', "4:6: expected an operator before \"pi\"", H2 + 'qreg q[1];\nu1(2 pi) q[0];\n'],
	['does not parse', "4:4: expression does not parse (Unexpected end of expression); expected an arithmetic expression", H2 + 'qreg q[1];\nu1(pi * ) q[0];\n'],
	['division by zero', "4:4: division by zero in expression", H2 + 'qreg q[1];\nu1(pi/(2-2)) q[0];\n'],
	['not finite', "4:4: expression does not evaluate to a finite number", H2 + 'qreg q[1];\nu1(exp(1000)) q[0];\n'],
	['number size budget', "4:7: number too large: about 415,552 bits; the limit is 8192 bits per number in this expression", H2 + 'qreg q[1];\nU(0,0,(3**4096)**64/(5**4096)**64) q[0];\n'],
	['huge register size', '3:8: number too large: about 16.8 million bits; the limit is 8192 bits per number in this expression', H2 + 'qreg q[(2**4096)**4096];\n']
];


describe('importer messages: one bad file per message, exact line:column and wording', () => {
	it('has one case per message (no two cases give the same text)', () => {
		expect(new Set(CASES.map((c) => c[1])).size).toBe(CASES.length);
	});
	for (const [what, expected, text, options] of CASES)
		it(`${what}: ${expected.slice(0, 60)}`, () => {
			let thrown: unknown = null;
			try {
				importQasm(text, { file: 'f.qasm', ...options });
			} catch (e) {
				thrown = e;
			}
			expect(thrown).toBeInstanceOf(QasmError);
			expect((thrown as QasmError).message).toBe(`f.qasm:${expected}`);
			// The position points inside the file (never a made-up 1:1 past its first line).
			const { line, column } = thrown as QasmError;
			const lines = text.split('\n');
			expect(line).toBeGreaterThanOrEqual(1);
			expect(line).toBeLessThanOrEqual(lines.length);
			expect(column).toBeLessThanOrEqual(lines[line - 1].length + 1);
		});
});
