import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { importQasm } from '../qasm/import.js';
import { exportQasm } from '../qasm/export.js';
import { lowerCircuit } from '../lower.js';
import { applyLoweredGates, buildGateTables, createState, setBasisState } from '../amplitudes.js';
import type { CircuitDocument, LoweredCircuit } from '../circuit.js';
import { checkCircuit, countResources, parseSpec, evaluateSpec, SpecError, type CheckReport } from './index.js';
import { specPolynomial } from './spec.js';

const fixture = (name: string) => readFileSync(new URL(`../qasm/fixtures/${name}`, import.meta.url), 'utf8');

/** Check imported QASM text, passing the definition lines the CLI would pass. */
function checkText(text: string, specs: string[]): CheckReport {
	const r = importQasm(text);
	const defs = new Map<string, number[]>();
	r.document.body.forEach((it, i) => r.origins[i].definitions.length && defs.set(it.id, r.origins[i].definitions.map((d) => d.line)));
	return checkCircuit(lowerCircuit(r.document), specs, { definitionLines: defs });
}
/** Proof and exhaustive sweep must agree whenever the proof applies. */
function expectAgreement(r: CheckReport) {
	expect(r.exhaustive).toBe(true);
	if (r.proof.status !== 'undecided' && r.proof.status !== 'skipped') expect(r.proof.status === 'proved').toBe(r.failed === 0);
}
const suspectLines = (r: CheckReport) => r.suspects.flatMap((s) => [s.line, ...s.definitionLines]);

const doc = (registers: CircuitDocument['registers'], body: CircuitDocument['body']): CircuitDocument => ({ format: 'orrery.circuit', version: 1, title: 'test', registers, body });

describe('worked examples', () => {
	it('3-bit Fourier adder (Draper 2000, quant-ph/0008033): all 64 inputs, proved and swept', () => {
		const r = checkText(fixture('adder3.qasm'), ['b = a + b mod 8']);
		expect([r.ok, r.method, r.cases, r.failed, r.proof.status]).toEqual([true, 'sweep+proof', 64, 0, 'proved']);
		expect(r.proof.sections).toHaveLength(1);
		expect(r.proof.sections[0].layout).toBe('unswapped');
		expect(r.worstSuccessProbability).toBe(1);
		// Draper 2000: n(n+1)/2 controlled rotations in the adder (from memory), plus 2·n(n−1)/2 in the QFT pair.
		expect(countResources(lowerCircuit(importQasm(fixture('adder3.qasm')).document)).byKind.cp).toBe(6 + 6);
	});
	it('2-bit multiplier (our own QASM 3 file): all 16 inputs, proved and swept', () => {
		const r = checkText(fixture('mult2.qasm3'), ['p = a*b mod 16']);
		expect([r.ok, r.method, r.cases, r.failed, r.proof.status]).toEqual([true, 'sweep+proof', 16, 0, 'proved']);
	});
	it('the same adder in OpenQASM 3 passes too', () => {
		expect(checkText(fixture('adder3.qasm3'), ['b = a + b mod 8']).ok).toBe(true);
	});
});

describe('injected faults are caught, with the faulty line among the suspects', () => {
	const adder = fixture('adder3.qasm');
	const mult = fixture('mult2.qasm3');
	const line = (text: string, n: number) => text.split('\n')[n - 1];
	const replaceLine = (text: string, n: number, by: string) => text.split('\n').map((l, i) => (i === n - 1 ? by : l)).join('\n');
	it('an exponent off by one (cu1(pi/4) where pi/2 belongs)', () => {
		expect(line(adder, 23)).toBe('cu1(pi/2) a[1], b[2];');
		const r = checkText(replaceLine(adder, 23, 'cu1(pi/4) a[1], b[2];'), ['b = a + b mod 8']);
		expect(r.ok).toBe(false);
		expectAgreement(r);
		expect(r.wrongTerms).toEqual([expect.objectContaining({ target: 'b[2]', term: 'a[1]', expectedTurns: '1/4 turn', actualTurns: '1/8 turn', lines: [23] })]);
		expect(r.suspects[0].line).toBe(23);
	});
	it('a wrong control (a[0] instead of a[1])', () => {
		const r = checkText(replaceLine(adder, 23, 'cu1(pi/2) a[0], b[2];'), ['b = a + b mod 8']);
		expect(r.ok).toBe(false);
		expectAgreement(r);
		expect(r.wrongTerms.map((w) => `${w.target} ${w.term} ${w.expectedTurns} ${w.actualTurns}`).sort()).toEqual(['b[2] a[0] 1/8 turn 3/8 turn', 'b[2] a[1] 1/4 turn 0 turn']);
		expect(r.suspects[0].line).toBe(23);
	});
	it('a missing rotation', () => {
		const r = checkText(replaceLine(adder, 23, '// (rotation removed)'), ['b = a + b mod 8']);
		expect(r.ok).toBe(false);
		expectAgreement(r);
		expect(r.wrongTerms).toEqual([expect.objectContaining({ target: 'b[2]', term: 'a[1]', expectedTurns: '1/4 turn', actualTurns: '0 turn' })]);
		// The rotation belonged between lines 22 and 24: those gates are named as its neighbours.
		expect(suspectLines(r)).toEqual(expect.arrayContaining([22, 24]));
	});
	it('a wrong sign', () => {
		expect(line(adder, 20)).toBe('cu1(pi/2) a[0], b[1];');
		const r = checkText(replaceLine(adder, 20, 'cu1(-pi/2) a[0], b[1];'), ['b = a + b mod 8']);
		expect(r.ok).toBe(false);
		expectAgreement(r);
		expect(r.wrongTerms).toEqual([expect.objectContaining({ target: 'b[1]', term: 'a[0]', expectedTurns: '1/4 turn', actualTurns: '-1/4 turn' })]);
		expect(r.suspects[0].line).toBe(20);
	});
	it('a shift off by one (the a[1]·b[0] row added with shift 2 instead of 1)', () => {
		expect(line(mult, 38)).toBe('ccphase(pi) a[1], b[0], p[1];');
		let t = replaceLine(mult, 38, '// (row shifted)');
		t = replaceLine(t, 39, 'ccphase(pi) a[1], b[0], p[2];');
		t = replaceLine(t, 40, 'ccphase(pi/2) a[1], b[0], p[3];');
		const r = checkText(t, ['p = a*b mod 16']);
		expect(r.ok).toBe(false);
		expectAgreement(r);
		expect(r.wrongTerms.map((w) => `${w.target} ${w.term}`)).toEqual(expect.arrayContaining(['p[1] a[1]*b[0]', 'p[2] a[1]*b[0]', 'p[3] a[1]*b[0]']));
		expect(suspectLines(r)).toEqual(expect.arrayContaining([39, 40]));
	});
	it('an ancilla left dirty (the uncomputing Toffoli dropped)', () => {
		const d = doc(
			[{ name: 'a', size: 2 }, { name: 'b', size: 2 }, { name: 'p', size: 4 }, { name: 'anc', size: 1, role: 'ancilla' }],
			[{ id: 'm', type: 'multiply', a: 'a', b: 'b', product: 'p', ccpLowering: 'ancilla' }]
		);
		const text = exportQasm(d, { version: 3, comments: false });
		const lines = text.split('\n');
		const lastCcx = lines.map((l, i) => [l, i] as const).filter(([l]) => l.startsWith('ccx')).pop()![1];
		expect(checkText(text, ['p = a*b mod 16']).ok).toBe(true);
		const broken = lines.filter((_, i) => i !== lastCcx);
		const computeLine = broken.map((l, i) => [l, i + 1] as const).filter(([l]) => l.startsWith('ccx')).pop()![1];
		const r = checkText(broken.join('\n'), ['p = a*b mod 16']);
		expect(r.ok).toBe(false);
		expectAgreement(r);
		expect(r.proof.registerMismatches).toEqual([expect.objectContaining({ qubit: 'anc[0]', holds: 'a[1]*b[1]', expected: '0' })]);
		// The Toffoli that computed a[1]·b[1] into the ancilla is left without its partner.
		expect(r.suspects[0]).toEqual(expect.objectContaining({ line: computeLine, kind: 'ccx' }));
		expect(r.suspects[0].reason).toContain('ancilla left dirty');
	});
	it('a wrong sign inside the ancilla-free ccp decomposition (gate definition line 16)', () => {
		expect(line(mult, 16)).toBe('  cp(-θ/2) y, t;');
		const r = checkText(replaceLine(mult, 16, '  cp(θ/2) y, t;'), ['p = a*b mod 16']);
		expect(r.ok).toBe(false);
		expectAgreement(r);
		// θ/2·(x⊕y) with the wrong sign leaves terms in x, y and x·y: e.g. a[0] alone on p[0].
		expect(r.wrongTerms.some((w) => w.term === 'a[0]' || w.term === 'b[0]')).toBe(true);
		expect(r.suspects[0].definitionLines).toContain(16);
	});
	it('swapped qubit order: a QFT with swaps undone by an inverse QFT without them', () => {
		const d = doc(
			[{ name: 'a', size: 3 }, { name: 'b', size: 3 }],
			[
				{ id: 'f', type: 'qft', register: 'b', swaps: true },
				{ id: 'add', type: 'add', addend: 'a', target: 'b', layout: 'swapped' },
				{ id: 'i', type: 'iqft', register: 'b', swaps: false }
			]
		);
		const r = checkCircuit(lowerCircuit(d), ['b = a + b mod 8']);
		expect(r.ok).toBe(false);
		expect(r.proof.status).toBe('refuted');
		expect(r.proof.reason).toContain('not exact inverses');
	});
});

describe('proof over the library blocks', () => {
	const mult = (n: number, lowering: 'native' | 'ancilla' | 'no-ancilla' | 'quarter') =>
		lowerCircuit(
			doc(
				[{ name: 'a', size: n }, { name: 'b', size: n }, { name: 'p', size: 2 * n }, { name: 'anc', size: 1, role: 'ancilla' }],
				[{ id: 'm', type: 'multiply', a: 'a', b: 'b', product: 'p', ccpLowering: lowering }]
			)
		);
	for (const lowering of ['native', 'ancilla', 'no-ancilla', 'quarter'] as const)
		it(`3-bit multiplier, ccp lowering ${lowering}: proof and all 64 inputs agree`, () => {
			const r = checkCircuit(mult(3, lowering), ['p = a*b mod 2^6']);
			expect([r.ok, r.method, r.failed, r.proof.status]).toEqual([true, 'sweep+proof', 0, 'proved']);
			expectAgreement(r);
		});
	it('p = p + 3*a with the output register also an input, swapped layout', () => {
		const d = doc(
			[{ name: 'a', size: 3 }, { name: 'p', size: 6 }],
			[
				{ id: 'f', type: 'qft', register: 'p' },
				{ id: 'x1', type: 'add', addend: 'a', target: 'p', layout: 'swapped' },
				{ id: 'x2', type: 'add', addend: 'a', target: 'p', shift: 1, layout: 'swapped' },
				{ id: 'i', type: 'iqft', register: 'p' }
			]
		);
		const r = checkCircuit(lowerCircuit(d), ['p = p + 3*a mod 2^6']);
		expect([r.ok, r.cases, r.proof.status, r.proof.sections[0].layout]).toEqual([true, 512, 'proved', 'swapped']);
		expect(checkCircuit(lowerCircuit(d), ['p = p + 5*a mod 2^6']).proof.status).toBe('refuted');
	});
	it('a 16-bit multiplier is proved for all 2^32 inputs (and a random sample is swept)', () => {
		const r = checkCircuit(mult(16, 'native'), ['p = a*b mod 2^32'], { inputs: { mode: 'random', count: 20, seed: 7 } });
		expect([r.ok, r.method, r.exhaustive, r.proof.status]).toEqual([true, 'sweep+proof', false, 'proved']);
	});
	it('says plainly when a circuit is outside the form', () => {
		const d = doc([{ name: 'a', size: 2 }, { name: 'b', size: 2 }], [
			{ id: 'f', type: 'qft', register: 'b' },
			{ id: 'c', type: 'gate', gate: 'cp', qubits: [{ register: 'b', index: 0 }, { register: 'b', index: 1 }], angle: 'pi/2' },
			{ id: 'i', type: 'iqft', register: 'b' }
		]);
		const r = checkCircuit(lowerCircuit(d), ['b = b']);
		expect(r.method).toBe('sweep');
		expect(r.proof.status).toBe('undecided');
		expect(r.notes.join(' ')).toMatch(/Fourier form: .*two qubits in the Fourier basis.*the general prover ran instead/);
		expect(r.proof.reason).toMatch(/couples b\[\d\] and b\[\d\], two qubits in superposition/);
		expect(r.proof.summary).toMatch(/^Undecided: /);
	});
});

describe('approximate QFT adder', () => {
	it('worst-case success probability from the sweep equals the amplitude engine run directly', () => {
		// Coppersmith 1994: the approximate QFT drops rotations R_d with d > k; here n = 4, k = 2.
		const d = doc([{ name: 'a', size: 4 }, { name: 'b', size: 4 }], [
			{ id: 'f', type: 'qft', register: 'b', swaps: false, approx: 2 },
			{ id: 'add', type: 'add', addend: 'a', target: 'b' },
			{ id: 'i', type: 'iqft', register: 'b', swaps: false, approx: 2 }
		]);
		const c: LoweredCircuit = lowerCircuit(d);
		const r = checkCircuit(c, ['b = a + b mod 16']);
		// The prover refutes exactness and names the rotations the approximate QFT leaves out.
		expect(r.proof.status).toBe('refuted');
		expect(r.wrongTerms.every((w) => w.where === 'qft')).toBe(true);
		expect(r.wrongTerms.map((w) => `${w.target} ${w.term}`)).toContain('b[3] b[0] (starting bit)');
		const t = buildGateTables(c);
		const s = createState(8);
		let worst = 1;
		for (let a = 0; a < 16; a++)
			for (let b = 0; b < 16; b++) {
				setBasisState(s, a | (b << 4));
				applyLoweredGates(s, c, t, 0, c.gateCount);
				const want = a | (((a + b) % 16) << 4);
				worst = Math.min(worst, s.data[2 * want] ** 2 + s.data[2 * want + 1] ** 2);
			}
		expect(worst).toBeLessThan(1);
		expect(Math.abs(r.worstSuccessProbability - worst)).toBeLessThan(1e-12);
		expect(r.failed).toBeGreaterThan(0);
	});
});

describe('specs', () => {
	const regs = [{ name: 'a', size: 64 }, { name: 'b', size: 64 }, { name: 'p', size: 64 }];
	it('evaluates exactly with BigInt, including 64-bit products', () => {
		const s = parseSpec('p = a*b mod 2^64', regs);
		const a = 0xfedcba9876543210n;
		const b = 0x0123456789abcdefn;
		expect(evaluateSpec(s, new Map([['a', a], ['b', b]]))).toBe((a * b) % (1n << 64n));
	});
	it('a trailing mod applies to the whole right side', () => {
		const s = parseSpec('b = a + b mod 16', [{ name: 'a', size: 4 }, { name: 'b', size: 4 }]);
		expect(evaluateSpec(s, new Map([['a', 9n], ['b', 9n]]))).toBe(2n);
	});
	it('errors name the column', () => {
		const err = (t: string) => {
			try {
				parseSpec(t, regs);
			} catch (e) {
				return (e as SpecError).message;
			}
			return 'no error';
		};
		expect(err('p = a*c mod 2^8')).toBe('spec "p = a*c mod 2^8", column 7: unknown register "c" on the right side');
		expect(err('q = a')).toBe('spec "q = a", column 1: unknown register "q"; the circuit has a, b, p');
		expect(err('p a*b')).toBe('spec "p a*b", column 1: expected OUT = EXPR, e.g. "p = a*b mod 2^8"');
		expect(err('p = a*b mod ')).toBe('spec "p = a*b mod ", column 12: expected an expression');
		expect(err('p = sqrt(a)')).toBe('spec "p = sqrt(a)", column 5: unknown function "sqrt"; expected floor, mod, min, max, abs');
	});
	it('the polynomial form of a*b agrees with its values (independent check by evaluation)', () => {
		const small = [{ name: 'a', size: 3, offset: 0 }, { name: 'b', size: 3, offset: 3 }, { name: 'p', size: 6, offset: 6 }];
		const s = parseSpec('p = a*b + 3', small);
		const poly = specPolynomial(s, small, new Set(['a', 'b']))!;
		for (let a = 0; a < 8; a++)
			for (let b = 0; b < 8; b++) {
				let v = 0n;
				for (const [k, c] of poly) if (k === '' || k.split('.').every((q) => ((Number(q) < 3 ? a : b) >> (Number(q) % 3)) & 1)) v += c;
				expect(v).toBe(BigInt(a * b + 3));
			}
	});
});

describe('resource counts', () => {
	it('QFT: n Hadamards, n(n−1)/2 controlled phases, ⌊n/2⌋ swaps (Nielsen and Chuang §5.1); rotations named R_k', () => {
		const r = countResources(lowerCircuit(doc([{ name: 'x', size: 5 }], [{ id: 'f', type: 'qft', register: 'x' }])));
		expect(r.byKind).toEqual({ h: 5, cp: 10, swap: 2 });
		expect(r.rotations).toEqual({ R_2: 4, R_3: 3, R_4: 2, R_5: 1 });
		expect(r.twoQubitGates).toBe(12);
	});
	it('our multiplier block: Σ_i Σ_j min(n, max(0, j + 1 − i)) doubly controlled phases (derived for this construction)', () => {
		for (const n of [2, 3, 4]) {
			let want = 0;
			for (let i = 0; i < n; i++) for (let j = 0; j < 2 * n; j++) want += Math.min(n, Math.max(0, j + 1 - i));
			const c = lowerCircuit(doc([{ name: 'a', size: n }, { name: 'b', size: n }, { name: 'p', size: 2 * n }], [{ id: 'm', type: 'multiply', a: 'a', b: 'b', product: 'p' }]));
			expect(countResources(c).byKind.mcp).toBe(want);
		}
	});
});
