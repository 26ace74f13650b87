// Worked examples of issue 13 from the command line (fixtures written by
// scripts/make-qasm-fixtures.ts: the Fourier adder of Draper 2000, quant-ph/0008033, with every
// controlled phase written out as single-qubit phases and two CNOTs).
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { main, type Io } from './orrery.js';

const fixtures = fileURLToPath(new URL('../lib/quantum/qasm/fixtures/', import.meta.url));

function run(argv: string[]) {
	const out: string[] = [];
	const err: string[] = [];
	const io: Io = { out: (t) => out.push(t), err: (t) => err.push(t), readFile: (p) => readFileSync(p, 'utf8'), writeFile: () => {} };
	const code = main(argv, io);
	return { code, out: out.join('\n'), err: err.join('\n') };
}

const msbFirst = ['--register', 'a=q[4:-1:0]', '--register', 'b=q[9:-1:5]'];

describe('5-bit adder in one flat register, most-significant bit first, decomposed cp, 6-digit angles', () => {
	it('is proved, and the exhaustive sweep of all 1024 inputs agrees', () => {
		const r = run(['check', `${fixtures}adder5-flat-msb.qasm`, '--spec', 'b = a + b mod 32', ...msbFirst]);
		expect(r.err).toBe('');
		expect(r.code).toBe(0);
		expect(r.out).toContain('1024 checked (all), 0 failed');
		expect(r.out).toContain('proof: proved');
		expect(r.out).toContain('read: 105 printed angles read as exact k/2^m turn (largest difference 4.59e-7 rad)');
		expect(r.out).toMatch(/35 CNOT regions read as diagonal phase gates/);
	});
	it('with one rotation halved (line 102) it is refuted, line 102 the first suspect, and every input fails the sweep', () => {
		const r = run(['check', `${fixtures}adder5-flat-msb-halved.qasm`, '--spec', 'b = a + b mod 32', ...msbFirst]);
		expect(r.code).toBe(1);
		expect(r.out).toContain('1024 checked (all), 1024 failed');
		expect(r.out).toContain('proof: refuted');
		expect(r.out).toContain('wrong term on b[3]: coefficient of 1 is -1/32 turn, expected 0 turn');
		expect(r.out).toMatch(/suspect: line 102 \(gate \d+, p on b\[3\]\)/);
		expect(r.out.indexOf('suspect: line 102')).toBe(r.out.indexOf('suspect:'));
	});
	it('without the register map the specs name registers the file does not have', () => {
		const r = run(['check', `${fixtures}adder5-flat-msb.qasm`, '--spec', 'b = a + b mod 32']);
		expect(r.code).toBe(2);
	});
	it('read LSB first by mistake (a=q[0:4]) the same file fails', () => {
		const r = run(['check', `${fixtures}adder5-flat-msb.qasm`, '--spec', 'b = a + b mod 32', '--register', 'a=q[0:4]', '--register', 'b=q[5:9]']);
		expect(r.code).toBe(1);
	});
	it('with --exact-decimals off the angles stay inexact and nothing is proved', () => {
		const r = run(['check', `${fixtures}adder5-flat-msb.qasm`, '--spec', 'b = a + b mod 32', ...msbFirst, '--exact-decimals', 'off']);
		expect(r.out).not.toContain('proof: proved');
		expect(r.out).toContain('105 printed angles fit no k/2^m turn (exact reading of decimals is off)');
	});
});

describe('10-bit adder, rz-decomposed controlled phases, full-precision floats', () => {
	it('is proved for all inputs (rz differs from p only by a global phase, which the note says)', () => {
		const r = run(['check', `${fixtures}adder10-flat-rz.qasm`, '--spec', 'b = a + b mod 1024', '--register', 'a=q[0:9]', '--register', 'b=q[10:19]']);
		expect(r.code).toBe(0);
		expect(r.out).toContain('proof: proved');
		expect(r.out).toContain('1000 checked, 0 failed');
		expect(r.out).toMatch(/435 printed angles read as exact/);
		expect(r.out).toMatch(/rz read as p: equal up to a global phase/);
	});
});

describe('--register errors name the flag', () => {
	const check = (...extra: string[]) => run(['check', `${fixtures}adder5-flat-msb.qasm`, '--spec', 'b = a + b mod 32', ...extra]);
	it('out of range, overlap, unknown register, bad syntax', () => {
		expect(check('--register', 'a=q[4:-1:0]', '--register', 'b=q[10:-1:5]').err).toMatch(/^--register "b=q\[10:-1:5\]": index 10 is out of range for q\[10\]; expected 0\.\.9/);
		expect(check('--register', 'a=q[4:-1:0]', '--register', 'b=q[9:-1:4]').err).toMatch(/^--register "b=q\[9:-1:4\]": q\[4\] is already bit 0 of "a"/);
		expect(check('--register', 'a=r[0:3]').err).toMatch(/^--register "a=r\[0:3\]": the file has no register "r"/);
		expect(check('--register', 'a').err).toMatch(/^--register "a": expected NAME=QUBITS/);
		// A map that leaves qubits of q unnamed is refused, naming them (issue 13: no silent REG_rest).
		expect(check('--register', 'a=q[4:-1:0]', '--register', 'b=q[9:-1:7]').err).toMatch(
			/^--register \(.*adder5-flat-msb\.qasm\) 2 qubits of q \(q\[5:6\]\) are in no mapped register; name them too, for example work=q\[5:6\]/
		);
		expect(check('--exact-decimals', 'maybe').err).toMatch(/^--exact-decimals must be on or off/);
	});
});

describe('3-bit adder written with def, for and let', () => {
	it('is proved; the let aliases are the registers the spec names; the sweep of all 64 inputs agrees', () => {
		const r = run(['check', `${fixtures}adder3-def.qasm3`, '--spec', 'b = a + b mod 8']);
		expect(r.err).toBe('');
		expect(r.code).toBe(0);
		expect(r.out).toContain('64 checked (all), 0 failed');
		expect(r.out).toContain('proof: proved');
		expect(r.out).toContain('read: let aliases read as registers: a, b');
	});
	it('--param gives input angles; a missing one is named with its line', () => {
		const file = `${fixtures}adder3-def.qasm3`;
		const io = (text: string) => {
			const out: string[] = [];
			const err: string[] = [];
			const code = main(['count', 'p.qasm3', '--param', 'theta=pi/8'], { out: (t) => out.push(t), err: (t) => err.push(t), readFile: () => text, writeFile: () => {} });
			return { code, out: out.join('\n'), err: err.join('\n') };
		};
		void file;
		expect(io('OPENQASM 3.0;\ninclude "stdgates.inc";\ninput angle theta;\nqubit q;\np(theta) q;\n').code).toBe(0);
		const missing = io('OPENQASM 3.0;\ninclude "stdgates.inc";\ninput angle phi;\nqubit q;\np(phi) q;\n');
		expect(missing.code).toBe(2);
		expect(missing.err).toMatch(/^p\.qasm3:3:13: input angle phi has no value; give it with --param phi=/);
		expect(run(['count', file, '--param', 'nope']).err).toMatch(/^--param "nope": expected NAME=VALUE/);
	});
});

// An OpenQASM 3 file written the way exporters write one: the QFT as a gate definition over
// placeholder qubit names (Nielsen & Chuang §5.1, Fig. 5.1, with the final swaps, so the whole gate
// is the DFT with q[0] the least-significant bit), its inverse as `inv @ QFT` (OpenQASM 3
// specification, "Quantum gate modifiers"), every angle printed as a shortest round-trip double
// (16 or 17 significant digits), and results read with `c[i] = measure q[j];`. The addition in
// between is the Fourier adder of Draper 2000 (quant-ph/0008033): after the DFT, qubit j of b
// carries 2π·b·2^j/2^n, so bit i of a adds the phase 2π·2^(i+j−n) on it, for i + j < n.
function exporterStyleAdder(n: number, angleOf: (i: number, j: number) => number = (i, j) => 2 * Math.PI * 2 ** (i + j - n)): string {
	const ph = (k: number) => `_gate_q_${k}`;
	const qft: string[] = [];
	for (let j = n - 1; j >= 0; j--) {
		qft.push(`  h ${ph(j)};`);
		for (let k = j - 1; k >= 0; k--) qft.push(`  cp(${String(Math.PI / 2 ** (j - k))}) ${ph(k)}, ${ph(j)};`);
	}
	for (let i = 0; i < n >> 1; i++) qft.push(`  swap ${ph(i)}, ${ph(n - 1 - i)};`);
	const b = (j: number) => `q[${n + j}]`;
	const lines = [
		'OPENQASM 3.0;',
		'include "stdgates.inc";',
		`gate QFT ${Array.from({ length: n }, (_, k) => ph(k)).join(', ')} {`,
		...qft,
		'}',
		`bit[${n}] c;`,
		`qubit[${2 * n}] q;`,
		`QFT ${Array.from({ length: n }, (_, j) => b(j)).join(', ')};`
	];
	for (let i = 0; i < n; i++) for (let j = 0; i + j < n; j++) lines.push(`cp(${String(angleOf(i, j))}) q[${i}], ${b(j)};`);
	lines.push(`inv @ QFT ${Array.from({ length: n }, (_, j) => b(j)).join(', ')};`);
	for (let j = 0; j < n; j++) lines.push(`c[${j}] = measure ${b(j)};`);
	return lines.join('\n') + '\n';
}

describe('an exporter-style OpenQASM 3 adder: QFT as a gate definition, inv @ QFT, 16-digit angles, c[i] = measure', () => {
	const files = new Map<string, string>();
	const runText = (name: string, text: string, argv: string[]) => {
		files.set(name, text);
		const out: string[] = [];
		const err: string[] = [];
		const io: Io = { out: (t) => out.push(t), err: (t) => err.push(t), readFile: (p) => files.get(p) ?? readFileSync(p, 'utf8'), writeFile: () => {} };
		const code = main(['check', name, ...argv], io);
		return { code, out: out.join('\n'), err: err.join('\n') };
	};
	const regs = (n: number) => ['--register', `a=q[0:${n - 1}]`, '--register', `b=q[${n}:${2 * n - 1}]`];
	it('4 bits: proved, and the sweep of all 256 inputs agrees', () => {
		const r = runText('adder4.qasm3', exporterStyleAdder(4), ['--spec', 'b = a + b mod 16', ...regs(4)]);
		// The four measurements make one warning, at the first (OpenQASM 3 `c[i] = measure q[j];`).
		expect(r.err).toBe('adder4.qasm3:31:1: warning: measure skipped: the checker reads the final state directly (4 measurements skipped in all, lines 31–34)');
		expect(r.code).toBe(0);
		expect(r.out).toContain('256 checked (all), 0 failed');
		expect(r.out).toContain('proof: proved');
		expect(r.out).toMatch(/printed angles? read as exact k\/2\^m turn/);
	});
	it('4 bits with one exponent off by one (a[1] → b[1] added twice the angle): refuted, and the sweep finds every input with a[1] = 1 wrong', () => {
		const wrong = exporterStyleAdder(4, (i, j) => 2 * Math.PI * 2 ** (i + j - 4 + (i === 1 && j === 1 ? 1 : 0)));
		const r = runText('adder4-wrong.qasm3', wrong, ['--spec', 'b = a + b mod 16', ...regs(4)]);
		expect(r.code).toBe(1);
		expect(r.out).toContain('proof: refuted');
		// The extra quarter turn on b[1] controlled by a[1] adds 4·a[1] to b: half of all inputs (a[1] = 1) fail.
		expect(r.out).toContain('256 checked (all), 128 failed');
	});
	it('8 bits: proved for all inputs', () => {
		const r = runText('adder8.qasm3', exporterStyleAdder(8), ['--spec', 'b = a + b mod 256', ...regs(8)]);
		expect(r.err).toMatch(/^adder8\.qasm3:\d+:1: warning: measure skipped: the checker reads the final state directly \(8 measurements skipped in all, lines \d+–\d+\)$/);
		expect(r.code).toBe(0);
		expect(r.out).toContain('proof: proved');
	});
});
