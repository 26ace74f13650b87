import { readFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { main, type Io } from './orrery.js';

const fixtures = fileURLToPath(new URL('../lib/quantum/qasm/fixtures/', import.meta.url));
const adder = readFileSync(`${fixtures}adder3.qasm`, 'utf8');

function run(argv: string[], files: Record<string, string> = {}) {
	const out: string[] = [];
	const err: string[] = [];
	const written: Record<string, string> = {};
	const io: Io = {
		out: (t) => out.push(t),
		err: (t) => err.push(t),
		readFile: (p) => {
			if (p in files) return files[p];
			if (p in written) return written[p];
			return readFileSync(p, 'utf8');
		},
		writeFile: (p, t) => {
			written[p] = t;
		}
	};
	const code = main(argv, io);
	return { code, out: out.join('\n'), err: err.join('\n'), written };
}

describe('orrery check with the document’s own specs and domain', () => {
	const modDoc = (value: string) =>
		JSON.stringify(
			{
				format: 'orrery.circuit',
				version: 1,
				title: 'modular adder',
				registers: [{ name: 'b', size: 5, role: 'output' }, { name: 'anc', size: 1, role: 'ancilla' }],
				body: [
					{ id: 'f', type: 'qft', register: 'b', swaps: false },
					{ id: 'm', type: 'mod-add', target: 'b', value, modulus: '13', ancilla: { register: 'anc', index: 0 } },
					{ id: 'g', type: 'iqft', register: 'b', swaps: false }
				],
				specs: ['b = b + 9 mod 13'],
				assume: ['b < 13']
			},
			null,
			2
		);
	it('without --spec uses the document’s specs and assume (13 inputs, b < 13), exit 0', () => {
		const r = run(['check', 'm.json'], { 'm.json': modDoc('9') });
		expect(r.code).toBe(0);
		expect(r.out).toContain('specs: b = b + 9 mod 13');
		expect(r.out).toContain('domain: b < 13 (13 of 32 basis inputs)');
		const j = JSON.parse(run(['check', 'm.json', '--json'], { 'm.json': modDoc('9') }).out);
		expect(j.domain).toMatchObject({ conditions: ['b < 13'], inputs: 13, count: '13', total: '32' });
	});
	it('refutes a constant not reduced mod N (exit 1), and a document without specs is a usage error (exit 2)', () => {
		// 9 + 13 = 22 ≡ 9 mod 13 but the adder takes 22 as written; b + 22 − 13 ≥ 2^4 flips the sign copy.
		expect(run(['check', 'm.json'], { 'm.json': modDoc('22') }).code).toBe(1);
		const bare = JSON.parse(modDoc('9'));
		delete bare.specs;
		const r = run(['check', 'm.json'], { 'm.json': JSON.stringify(bare) });
		expect(r.code).toBe(2);
		expect(r.err).toContain('m.json states no specs of its own');
	});
	it('a bad condition names the flag or the file', () => {
		const r = run(['check', 'm.json', '--spec', 'b = b + 9 mod 13', '--assume', 'b +'], { 'm.json': modDoc('9') });
		expect(r.code).toBe(2);
		expect(r.err).toContain('--assume');
	});
});

describe('orrery check', () => {
	it('exit 0 and a plain summary when every input meets the spec', () => {
		const r = run(['check', `${fixtures}adder3.qasm`, '--spec', 'b = a + b mod 8']);
		expect(r.code).toBe(0);
		expect(r.out).toContain('PASS (simulated, not a hardware run)');
		expect(r.out).toContain('64 checked (all), 0 failed');
	});
	it('exit 1 with the JSON report when some inputs fail', () => {
		const bad = adder.replace('cu1(pi/2) a[1], b[2];', 'cu1(pi/4) a[1], b[2];');
		const r = run(['check', 'bad.qasm', '--spec', 'b = a + b mod 8', '--json'], { 'bad.qasm': bad });
		expect(r.code).toBe(1);
		const j = JSON.parse(r.out);
		for (const k of ['ok', 'method', 'cases', 'failed', 'worstSuccessProbability', 'failures', 'wrongTerms', 'suspects']) expect(j).toHaveProperty(k);
		expect(j.ok).toBe(false);
		expect(j.method).toBe('sweep+proof');
		expect(j.cases).toBe(64);
		expect(j.failures.length).toBeLessThanOrEqual(20);
		expect(Object.keys(j.failures[0]).sort()).toEqual(['engine', 'expected', 'got', 'input', 'probability', 'reason']);
		expect(j.wrongTerms[0]).toEqual(expect.objectContaining({ target: 'b[2]', term: 'a[1]', expectedTurns: '1/4 turn', actualTurns: '1/8 turn', lines: [23] }));
		expect(j.suspects[0]).toEqual(expect.objectContaining({ line: 23, gate: 10, qubit: 'b[2]' }));
		expect(typeof j.suspects[0].reason).toBe('string');
	});
	it('--inputs a=5,b=3 checks one input; random:N a seeded sample', () => {
		const one = JSON.parse(run(['check', `${fixtures}adder3.qasm`, '--spec', 'b = a + b mod 8', '--inputs', 'a=5,b=3', '--json']).out);
		expect([one.cases, one.ok]).toEqual([1, true]);
		const some = JSON.parse(run(['check', `${fixtures}adder3.qasm`, '--spec', 'b = a + b mod 8', '--inputs', 'random:10', '--json']).out);
		expect(some.cases).toBe(10);
	});
	it('exit 2 for an unusable file, spec or option, with file:line:column', () => {
		const f = run(['check', 'broken.qasm', '--spec', 'b = a'], { 'broken.qasm': 'OPENQASM 2.0;\nqreg b[2];\nh b[0]\n' });
		expect(f.code).toBe(2);
		expect(f.err).toBe('broken.qasm:3:7: missing ";" after the call of h; found the end of the file');
		const s = run(['check', `${fixtures}adder3.qasm`, '--spec', 'b = a + z']);
		expect(s.code).toBe(2);
		expect(s.err).toContain('column 9: unknown register "z"');
		expect(run(['check', 'nowhere.qasm', '--spec', 'b = a']).code).toBe(2);
		expect(run(['check', `${fixtures}adder3.qasm`]).code).toBe(2);
		expect(run(['frobnicate']).code).toBe(2);
	});
});

describe('run, count, convert', () => {
	it('run prints register values with probabilities and each qubit frame', () => {
		const r = run(['run', `${fixtures}adder3.qasm`, '--input', 'a=5,b=3', '--json']);
		expect(r.code).toBe(0);
		const j = JSON.parse(r.out);
		expect(j.registers.find((x: { name: string }) => x.name === 'b').values[0]).toEqual({ value: '0', probability: 1 });
		expect(j.frames).toHaveLength(6);
		const mid = JSON.parse(run(['run', `${fixtures}adder3.qasm`, '--input', 'a=5,b=3', '--step', '6', '--json']).out);
		// After the QFT (no swaps) b[1] holds b/4 = 3/4 turn.
		expect(mid.frames[4]).toEqual(expect.objectContaining({ qubit: 'b[1]', kind: 'fourier', phaseTurns: '3/4 turn' }));
		const amp = JSON.parse(run(['run', `${fixtures}adder3.qasm`, '--input', 'a=5,b=3', '--engine', 'amplitudes', '--json']).out);
		expect(amp.engine).toBe('amplitudes');
		expect(amp.registers[1].values[0].value).toBe('0');
		expect(amp.registers[1].values[0].probability).toBeCloseTo(1, 12);
	});
	it('count --json', () => {
		const j = JSON.parse(run(['count', `${fixtures}adder3.qasm`, '--json']).out);
		expect(j).toEqual(expect.objectContaining({ qubits: 6, gates: 18, twoQubitGates: 12 }));
	});
	it('convert between OpenQASM 2, 3 and JSON', () => {
		const a = run(['convert', `${fixtures}adder3.qasm`, 'out.qasm3']);
		expect(a.code).toBe(0);
		expect(a.written['out.qasm3'].startsWith('OPENQASM 3.0;')).toBe(true);
		const b = run(['convert', `${fixtures}adder3.qasm`, 'out.json']);
		expect(JSON.parse(b.written['out.json']).format).toBe('orrery.circuit');
		const c = run(['convert', 'in.json', 'back.qasm'], { 'in.json': b.written['out.json'] });
		expect(c.written['back.qasm'].startsWith('OPENQASM 2.0;')).toBe(true);
		expect(run(['convert', `${fixtures}adder3.qasm`, 'out.txt']).code).toBe(2);
	});
});

describe('bin/orrery.js', () => {
	it('spawns the command line and passes the exit code through', () => {
		const bin = fileURLToPath(new URL('../../bin/orrery.js', import.meta.url));
		const r = spawnSync(process.execPath, [bin, 'check', `${fixtures}adder3.qasm`, '--spec', 'b = a + b mod 8', '--json'], { encoding: 'utf8' });
		expect(r.status).toBe(0);
		expect(JSON.parse(r.stdout).ok).toBe(true);
		// It ran the esbuild bundle, which lists its sources for the staleness check.
		const inputs = JSON.parse(readFileSync(fileURLToPath(new URL('../../node_modules/.cache/orrery-cli/orrery.mjs.inputs.json', import.meta.url)), 'utf8'));
		expect(inputs).toContain('src/cli/orrery.ts');
		expect(inputs).toContain('src/lib/quantum/qasm/import.ts');
	}, 120_000);
});

describe('orrery equiv', () => {
	const head = 'OPENQASM 3.0;\ninclude "stdgates.inc";\nqubit[2] c;\nqubit[1] t;\n';
	const native = `${head}ctrl(2) @ p(pi/4) c[0], c[1], t[0];\n`;
	// Barenco et al. 1995 (Phys. Rev. A 52, 3457), Lemma 6.1 with U = p(θ), V = p(θ/2): V on c1,
	// CNOT, V† on c1, CNOT, V on c0 gives the doubly controlled U.
	const half = `${head}cp(pi/8) c[1], t[0];\ncx c[0], c[1];\ncp(-pi/8) c[1], t[0];\ncx c[0], c[1];\ncp(pi/8) c[0], t[0];\n`;
	const withAncilla = `${head}qubit[1] anc;\nccx c[0], c[1], anc[0];\ncp(pi/4) anc[0], t[0];\nccx c[0], c[1], anc[0];\n`;
	const dirty = `${head}qubit[1] anc;\nccx c[0], c[1], anc[0];\ncp(pi/4) anc[0], t[0];\n`;

	it('finds the half-angle decomposition equal to the native doubly controlled phase', () => {
		const r = run(['equiv', 'n.qasm', 'h.qasm'], { 'n.qasm': native, 'h.qasm': half });
		expect(r.code).toBe(0);
		expect(r.out).toMatch(/^equivalent up to global phase/);
	});
	it('catches a wrong sign inside the decomposition', () => {
		const r = run(['equiv', 'n.qasm', 'w.qasm', '--json'], { 'n.qasm': native, 'w.qasm': half.replace('cp(-pi/8)', 'cp(pi/8)') });
		expect(r.code).toBe(1);
		expect(JSON.parse(r.out).ok).toBe(false);
	});
	it('compares a lowering with an ancilla on the clean-ancilla block, and flags an ancilla left dirty', () => {
		expect(run(['equiv', 'n.qasm', 'a.qasm', '--ancilla', 'anc'], { 'n.qasm': native, 'a.qasm': withAncilla }).code).toBe(0);
		const r = run(['equiv', 'n.qasm', 'd.qasm', '--ancilla', 'anc', '--json'], { 'n.qasm': native, 'd.qasm': dirty });
		expect(r.code).toBe(1);
		expect(JSON.parse(r.out).ancillaLeak).toBeGreaterThan(0.5);
	});
	it('refuses circuits of different sizes with a clear message (exit 2)', () => {
		const r = run(['equiv', 'n.qasm', 'a.qasm'], { 'n.qasm': native, 'a.qasm': withAncilla });
		expect(r.code).toBe(2);
		expect(r.err).toContain('must match');
	});
});

describe('orrery check: verdicts, domains and phases (issues 13 and 14)', () => {
	const files = (d: object) => ({ 'c.json': JSON.stringify(d) });
	it('a 5-bit Cuccaro adder document is proved from its own specs; the faulty one is refuted with a command to step it', async () => {
		const { cuccaroAdder } = await import('../lib/quantum/testing/arith.js');
		const ok = run(['check', 'c.json'], files(cuccaroAdder(5)));
		expect(ok.code).toBe(0);
		expect(ok.out).toMatch(/Proved: right for every one of the 1024 inputs \(values and phase\)/);
		const bad = run(['check', 'c.json', '--json'], files(cuccaroAdder(5, 'uncompute-cnot-reversed')));
		expect(bad.code).toBe(1);
		const j = JSON.parse(bad.out);
		expect(j.proof.status).toBe('refuted');
		expect(j.proof.counterexample).toEqual({ a: '4', b: '0' }); // the BDD's first satisfying assignment of "c[0] = a[2]"
		const text = run(['check', 'c.json'], files(cuccaroAdder(5, 'uncompute-cnot-reversed')));
		expect(text.out).toContain('step it: npm run orrery -- run c.json --input a=4,b=0');
	});
	it('--assume restricts the domain; the report states it and its size', async () => {
		const { beauregardModAdder } = await import('../lib/quantum/testing/arith.js');
		const d = { ...beauregardModAdder(5, 21n, 8n), assume: [] };
		const wide = JSON.parse(run(['check', 'c.json', '--json'], files(d)).out);
		expect(wide.proof.status).toBe('refuted');
		const r = JSON.parse(run(['check', 'c.json', '--assume', 'b < 21', '--json'], files(d)).out);
		expect([r.ok, r.proof.status, r.domain.count, r.cases]).toEqual([true, 'proved', '84', 84]);
		expect(run(['check', 'c.json', '--assume', 'b <'], files(d)).err).toMatch(/b </);
	});
	it('a crz Fourier adder fails on its phase with the terms named; --ignore-phase passes it', async () => {
		const { fourierAdderQasm } = await import('../lib/quantum/testing/arith.js');
		const f = { 'crz.qasm': fourierAdderQasm(4, 'crz') };
		const r = run(['check', 'crz.qasm', '--spec', 'b = a + b mod 16'], f);
		expect(r.code).toBe(1);
		expect(r.out).toContain('phase term -15/32 turn · a[0] on the whole state');
		expect(r.out).toMatch(/Refuted: input .* ends with a different phase than/);
		const ignored = run(['check', 'crz.qasm', '--spec', 'b = a + b mod 16', '--ignore-phase'], f);
		expect(ignored.code).toBe(0);
		expect(ignored.out).toContain('phases ignored');
	});
	it('--proof-limit bounds the proof: undecided, with the limit named; a bad value is refused', async () => {
		const { cuccaroAdder } = await import('../lib/quantum/testing/arith.js');
		const r = JSON.parse(run(['check', 'c.json', '--proof-limit', '100', '--inputs', 'random:5', '--json'], files(cuccaroAdder(20))).out);
		expect([r.proof.status, r.proof.limit]).toEqual(['undecided', 'nodes']);
		const bad = run(['check', 'c.json', '--proof-limit', 'lots'], files(cuccaroAdder(5)));
		expect([bad.code, bad.err]).toEqual([2, expect.stringMatching(/--proof-limit: expected a number/)]);
	});
});
