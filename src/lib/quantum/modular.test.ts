import { describe, expect, it } from 'vitest';
import { lowerCircuit, LoweringError } from './lower.js';
import type { BodyItem, CcpLowering, CircuitDocument, RegisterSpec } from './circuit.js';
import { gcd, modInverse, powMod, multiplierConstants, checkModularParameters } from './modular.js';
import { sweepCircuit } from './check/sweep.js';
import { parseSpec, parseCondition } from './check/spec.js';
import { Run } from './run.js';
import { checkCircuit } from './check/index.js';
import { applyLedgerGate, buildLedgerTables, createLedgerState, LedgerKind } from './ledger.js';

// Modular parts after Beauregard 2003 (quant-ph/0205095): Fig. 5 (adder), Fig. 6 (multiplier),
// Fig. 7 (in-place multiplier). Expected values are plain modular arithmetic, computed here.

const doc = (registers: RegisterSpec[], body: BodyItem[]): CircuitDocument => ({ format: 'orrery.circuit', version: 1, title: 'modular', registers, body });

function sweepAll(d: CircuitDocument, spec: string, domain: string[]) {
	const c = lowerCircuit(d);
	const s = parseSpec(spec, c.registers);
	return sweepCircuit(c, [s], { choice: { mode: 'all' }, domain: domain.map((t) => parseCondition(t, c.registers)) });
}

/**
 * The exhaustive sweep over the domain and the prover (decision diagrams) must agree: both say
 * right, for every lowering (the quarter-angle one puts CNOTs on Fourier qubits).
 */
function sweepAndProve(d: CircuitDocument, spec: string, domain: string[]) {
	const c = lowerCircuit(d);
	const r = checkCircuit(c, [spec], { assume: domain, inputs: { mode: 'all' } });
	expect(r.exhaustive).toBe(true);
	expect(r.failed).toBe(0);
	expect(r.proof.status).toBe('proved');
	return r;
}

const LOWERINGS: CcpLowering[] = ['native', 'ancilla', 'no-ancilla', 'quarter'];

describe('number theory helpers', () => {
	it('gcd, inverse and powers agree with direct arithmetic', () => {
		for (let N = 2n; N < 40n; N++)
			for (let a = 1n; a < N; a++) {
				const inv = modInverse(a, N);
				if (gcd(a, N) === 1n) expect((a * inv!) % N).toBe(1n);
				else expect(inv).toBeNull();
			}
		expect(powMod(7n, 4n, 15n)).toBe(2401n % 15n);
		expect(multiplierConstants(4n, 21n, 5)).toEqual([4n, 8n, 16n, 11n, 1n]);
	});
	it('parameter rules name the field', () => {
		const size = (r: string) => ({ b: 5, x: 4, w: 5 })[r as 'b'];
		const base = { id: 'm', ancilla: { register: 'anc', index: 0 } };
		expect(checkModularParameters({ ...base, type: 'mod-add', target: 'b', value: '3', modulus: '1' }, size)[0]).toMatchObject({ field: 'modulus', blocking: true });
		expect(checkModularParameters({ ...base, type: 'mod-add', target: 'b', value: '3', modulus: '16' }, size)[0]).toMatchObject({ field: 'modulus', blocking: true });
		expect(checkModularParameters({ ...base, type: 'mod-add', target: 'b', value: '20', modulus: '13' }, size)[0]).toMatchObject({ field: 'value', blocking: false });
		const g = checkModularParameters({ ...base, type: 'mod-mul-inplace', x: 'x', work: 'w', value: '6', modulus: '15' }, size);
		expect(g[0]).toMatchObject({ field: 'value', blocking: true });
		expect(g[0].message).toContain('gcd(a, N) = 3');
		expect(checkModularParameters({ ...base, type: 'mod-mul-inplace', x: 'x', work: 'w', value: '7', modulus: '15' }, size)).toEqual([]);
	});
	it('lowering refuses gcd(a, N) ≠ 1 at the value field', () => {
		const d = doc(
			[{ name: 'x', size: 4 }, { name: 'w', size: 5 }, { name: 'anc', size: 1, role: 'ancilla' }],
			[{ id: 'm', type: 'mod-mul-inplace', x: 'x', work: 'w', value: '5', modulus: '15', ancilla: { register: 'anc', index: 0 } }]
		);
		expect(() => lowerCircuit(d)).toThrow(LoweringError);
		expect(() => lowerCircuit(d)).toThrow(/body\[0\]\.value: gcd\(a, N\) = 5/);
	});
});

describe('modular adder (Fig. 5): exhaustive sweep over b < N, every control pattern and lowering', () => {
	const cases: { n: number; N: number; a: number }[] = [
		{ n: 2, N: 3, a: 2 },
		{ n: 3, N: 5, a: 3 },
		{ n: 3, N: 7, a: 6 },
		{ n: 4, N: 13, a: 5 },
		{ n: 4, N: 11, a: 10 },
		{ n: 5, N: 21, a: 8 },
		{ n: 5, N: 31, a: 30 }
	];
	for (const { n, N, a } of cases)
		for (const controls of [0, 1, 2])
			for (const lowering of controls === 2 ? LOWERINGS : (['native'] as CcpLowering[]))
				it(`n = ${n}, N = ${N}, a = ${a}, ${controls} control(s)${controls === 2 ? `, ${lowering}` : ''}`, () => {
					const regs: RegisterSpec[] = [
						{ name: 'c', size: 2, role: 'input' },
						{ name: 'b', size: n + 1, role: 'output' },
						{ name: 'anc', size: 2, role: 'ancilla' }
					];
					const ctl = [{ register: 'c', index: 0 }, { register: 'c', index: 1 }].slice(0, controls);
					const d = doc(regs, [
						{ id: 'f', type: 'qft', register: 'b', swaps: false },
						{ id: 'm', type: 'mod-add', target: 'b', value: String(a), modulus: String(N), controls: ctl, ancilla: { register: 'anc', index: 0 }, ccpLowering: lowering },
						{ id: 'g', type: 'iqft', register: 'b', swaps: false }
					]);
					const factor = controls === 0 ? '' : controls === 1 ? '(c mod 2)*' : '(c == 3)*';
					const r = sweepAndProve(d, `b = b + ${factor}${a} mod ${N}`, [`b < ${N}`]);
					expect(r.cases).toBe((controls ? 4 : 1) * N); // every c the spec reads, every b < N
					expect(r.failed).toBe(0); // includes: anc back to |0⟩ on every input
				});
	it('the swapped layout works too (QFT with swaps around it)', () => {
		const d = doc(
			[{ name: 'b', size: 5 }, { name: 'anc', size: 1, role: 'ancilla' }],
			[
				{ id: 'f', type: 'qft', register: 'b' },
				{ id: 'm', type: 'mod-add', target: 'b', value: '9', modulus: '13', layout: 'swapped', ancilla: { register: 'anc', index: 0 } },
				{ id: 'g', type: 'iqft', register: 'b' }
			]
		);
		expect(sweepAll(d, 'b = b + 9 mod 13', ['b < 13']).failed).toBe(0);
	});
	it('a constant not reduced mod N is caught: it fails on some b < N', () => {
		const d = doc(
			[{ name: 'b', size: 6 }, { name: 'anc', size: 1, role: 'ancilla' }],
			[
				{ id: 'f', type: 'qft', register: 'b', swaps: false },
				{ id: 'm', type: 'mod-add', target: 'b', value: '46', modulus: '21', ancilla: { register: 'anc', index: 0 } },
				{ id: 'g', type: 'iqft', register: 'b', swaps: false }
			]
		);
		const r = sweepAll(d, 'b = b + 46 mod 21', ['b < 21']);
		expect(r.failed).toBeGreaterThan(0);
	});
});

describe('modular multiplier, out of place (Fig. 6): b ← (b + c·a·x) mod N over b < N', () => {
	for (const { n, N, a } of [
		{ n: 2, N: 3, a: 2 },
		{ n: 3, N: 7, a: 3 },
		{ n: 4, N: 15, a: 7 }
	])
		for (const controlled of [false, true])
			for (const lowering of controlled ? LOWERINGS : (['native'] as CcpLowering[]))
				it(`n = ${n}, N = ${N}, a = ${a}${controlled ? `, controlled, ${lowering}` : ''}`, () => {
					const d = doc(
						[
							{ name: 'c', size: 1 },
							{ name: 'x', size: n },
							{ name: 'b', size: n + 1 },
							{ name: 'anc', size: 2, role: 'ancilla' }
						],
						[{ id: 'm', type: 'mod-mul', x: 'x', target: 'b', value: String(a), modulus: String(N), ancilla: { register: 'anc', index: 0 }, ccpLowering: lowering, ...(controlled ? { control: { register: 'c', index: 0 } } : {}) }]
					);
					const r = (n <= 3 ? sweepAndProve : sweepAll)(d, `b = b + ${controlled ? 'c*' : ''}${a}*x mod ${N}`, [`b < ${N}`, ...(controlled ? [] : ['c == 0'])]);
					expect(r.cases).toBe((controlled ? 2 : 1) * N * 2 ** n);
					expect(r.failed).toBe(0);
				});
});

describe('modular multiplier in place (Fig. 7): x ← a·x mod N over x < N, work and ancilla clean', () => {
	for (const { n, N, a } of [
		{ n: 2, N: 3, a: 2 },
		{ n: 3, N: 5, a: 3 },
		{ n: 3, N: 7, a: 5 },
		{ n: 4, N: 15, a: 7 },
		{ n: 4, N: 15, a: 11 }
	])
		for (const controlled of [false, true])
			for (const lowering of controlled ? LOWERINGS : (['native'] as CcpLowering[]))
				it(`n = ${n}, N = ${N}, a = ${a} (a⁻¹ = ${modInverse(BigInt(a), BigInt(N))})${controlled ? `, controlled, ${lowering}` : ''}`, () => {
					const d = doc(
						[
							{ name: 'c', size: 1 },
							{ name: 'x', size: n },
							{ name: 'w', size: n + 1, role: 'work' },
							{ name: 'anc', size: 2, role: 'ancilla' }
						],
						[{ id: 'm', type: 'mod-mul-inplace', x: 'x', work: 'w', value: String(a), modulus: String(N), ancilla: { register: 'anc', index: 0 }, ccpLowering: lowering, ...(controlled ? { control: { register: 'c', index: 0 } } : {}) }]
					);
					const spec = controlled ? `x = x + c*(${a}*x mod ${N} - x)` : `x = ${a}*x mod ${N}`;
					const r = (n <= 3 ? sweepAndProve : sweepAll)(d, spec, [`x < ${N}`, ...(controlled ? ['c < 2'] : ['c == 0'])]);
					expect(r.cases).toBe((controlled ? 2 : 1) * N);
					expect(r.failed).toBe(0); // w and anc end at 0 on every input
				});
});

/** Run the lowered circuit on one basis input with the exact ledger engine; read back every register. */
function runBasis(d: CircuitDocument, input: Record<string, number>): Record<string, number> {
	const c = lowerCircuit(d);
	const bits = new Uint8Array(c.qubitCount);
	for (const r of c.registers) for (let i = 0; i < r.size; i++) bits[r.offset + i] = ((input[r.name] ?? 0) >> i) & 1;
	const lt = buildLedgerTables(c);
	const s = createLedgerState(c.qubitCount, bits);
	for (let g = 0; g < c.gateCount; g++) if (!applyLedgerGate(s, c, lt, g, null)) throw new Error(`gate ${g} left the ledger`);
	const out: Record<string, number> = {};
	for (const r of c.registers) {
		let v = 0;
		for (let i = 0; i < r.size; i++) {
			expect(s.kind[r.offset + i]).toBe(LedgerKind.classical);
			v += s.bit[r.offset + i] << i;
		}
		out[r.name] = v;
	}
	return out;
}

describe('worked example: modular exponentiation on basis inputs (exact ledger engine)', () => {
	// Nielsen & Chuang, Quantum Computation and Quantum Information, §5.3.1 (Box 5.4, factoring
	// 15 with x = 7) lists 7^k mod 15 = 1, 7, 4, 13, 1, 7, 4, 13, … (from memory); the values
	// are also plain arithmetic, computed here with powMod as the independent check.
	const expMod = (a: number, N: number, n: number, e: number) => {
		const d = doc(
			[
				{ name: 'e', size: e, role: 'input' },
				{ name: 'y', size: n, role: 'output' },
				{ name: 'w', size: n + 1, role: 'work' },
				{ name: 'anc', size: 1, role: 'ancilla' }
			],
			[{ id: 'exp', type: 'mod-exp', exponent: 'e', y: 'y', work: 'w', value: String(a), modulus: String(N), ancilla: { register: 'anc', index: 0 } }]
		);
		const got: number[] = [];
		for (let x = 0; x < 2 ** e; x++) {
			const r = runBasis(d, { e: x, y: 1 });
			expect(r.w).toBe(0);
			expect(r.anc).toBe(0);
			expect(r.e).toBe(x);
			got.push(r.y);
		}
		return got;
	};
	it('7^x mod 15 for every x of a 4-bit exponent register', () => {
		const got = expMod(7, 15, 4, 4);
		expect(got.slice(0, 8)).toEqual([1, 7, 4, 13, 1, 7, 4, 13]); // the table, period 4
		expect(got).toEqual(Array.from({ length: 16 }, (_, x) => Number(powMod(7n, BigInt(x), 15n))));
	});
	it('2^x mod 21 for every x of a 6-bit exponent register', () => {
		const got = expMod(2, 21, 5, 6);
		// 2^x mod 21: 1, 2, 4, 8, 16, 11, then repeats (period 6) — plain arithmetic.
		expect(got.slice(0, 7)).toEqual([1, 2, 4, 8, 16, 11, 1]);
		expect(got).toEqual(Array.from({ length: 64 }, (_, x) => Number(powMod(2n, BigInt(x), 21n))));
	});
});

describe('modular exponentiation proved over its domain (spec with a register exponent)', () => {
	// The spec y = a^e·y mod N has the exponent register in it; the prover builds a^e mod N bit by
	// bit of e. Cross-checked against the exhaustive sweep over the same domain (sweepAndProve).
	for (const [a, N, n, t] of [[7, 15, 4, 3], [2, 21, 5, 2], [4, 21, 5, 2]] as const)
		it(`y ← ${a}^e·y mod ${N}, e of ${t} bits, every y < ${N}`, () => {
			const d = doc(
				[
					{ name: 'e', size: t, role: 'input' },
					{ name: 'y', size: n, role: 'output' },
					{ name: 'w', size: n + 1, role: 'work' },
					{ name: 'anc', size: 1, role: 'ancilla' }
				],
				[{ id: 'exp', type: 'mod-exp', exponent: 'e', y: 'y', work: 'w', value: String(a), modulus: String(N), ancilla: { register: 'anc', index: 0 } }]
			);
			const r = sweepAndProve(d, `y = ${a}^e * y mod ${N}`, [`y < ${N}`]);
			expect(r.cases).toBe(2 ** t * N);
		}, 120_000);
	it('a wrong base is refuted by the prover with an input the sweep also finds failing', () => {
		const d = doc(
			[
				{ name: 'e', size: 2, role: 'input' },
				{ name: 'y', size: 4, role: 'output' },
				{ name: 'w', size: 5, role: 'work' },
				{ name: 'anc', size: 1, role: 'ancilla' }
			],
			[{ id: 'exp', type: 'mod-exp', exponent: 'e', y: 'y', work: 'w', value: '7', modulus: '15', ancilla: { register: 'anc', index: 0 } }]
		);
		const r = checkCircuit(lowerCircuit(d), ['y = 2^e * y mod 15'], { assume: ['y < 15'], inputs: { mode: 'all' } });
		expect(r.exhaustive).toBe(true);
		expect(r.failed).toBeGreaterThan(0);
		expect(r.proof.status).toBe('refuted');
		const cx = r.proof.counterexample!;
		expect(r.failures.some((f) => f.input.e === cx.e && f.input.y === cx.y)).toBe(true);
		// e = 0 is right for any base; the counterexample needs an exponent bit set
		expect(BigInt(cx.e)).not.toBe(0n);
	}, 120_000);
});

describe('dials: expected values inside the modular adder follow the construction', () => {
	const adder = (a: number) =>
		doc(
			[
				{ name: 'b', size: 6, role: 'output' },
				{ name: 'anc', size: 1, role: 'ancilla' }
			],
			[
				{ id: 'f', type: 'qft', register: 'b', swaps: false },
				{ id: 'm', type: 'mod-add', target: 'b', value: String(a), modulus: '21', ancilla: { register: 'anc', index: 0 } },
				{ id: 'g', type: 'iqft', register: 'b', swaps: false }
			]
		);
	it('a correct adder never departs from its expectations; the ancilla carries its comparison', () => {
		for (const b of [0, 2, 17, 20]) {
			const c = lowerCircuit(adder(16));
			const run = new Run(c, { values: { b } });
			expect(run.firstDivergenceStep()).toBeNull();
			const m = c.blocks.find((x) => x.itemId === 'm')!;
			if (m.spec.kind !== 'mod-add') throw new Error('spec');
			const anc = c.registers[1].offset;
			const f = run.frameAt(m.spec.compareGate + 1).qubits[anc];
			expect(f.expected).toMatchObject({ kind: 'classical', bit: b + 16 < 21 ? 1 : 0 });
			expect(f.expected?.note).toBe(`b + a < N: ${b} + 16 < 21 ${b + 16 < 21 ? 'holds' : 'fails'}`);
			// after "subtract N" the Fourier register reads b + a − N, negative when b + a < N
			const sub = c.blocks.find((x) => x.label === 'subtract N')!;
			const top = run.frameAt(sub.end).qubits[c.registers[0].offset + 5];
			expect(top.expected?.note).toBe(`b + a − N = ${b + 16 - 21}`);
		}
	});
	it('a constant not reduced mod N first departs at the ancilla, which shows the wrong comparison', () => {
		const c = lowerCircuit(adder(46)); // 46 ≡ 4 mod 21, written unreduced
		// b = 10: b + a − N = 35 ≥ 2^5 sets the top qubit, so the copy writes 1 where "b + a < N" fails.
		const run = new Run(c, { values: { b: 10 } });
		const m = c.blocks.find((x) => x.itemId === 'm')!;
		if (m.spec.kind !== 'mod-add') throw new Error('spec');
		const step = run.firstDivergenceStep();
		expect(step).toBe(m.spec.compareGate + 1);
		const q = run.frameAt(step!).qubits[c.registers[1].offset];
		expect(q.state).toMatchObject({ kind: 'classical', bit: 1 });
		expect(q.expected).toMatchObject({ kind: 'classical', bit: 0, note: 'b + a < N: 10 + 46 < 21 fails' });
		expect(q.matches).toBe(false);
		// and the whole adder gives 56, not (10 + 46) mod 21 = 14
		expect(run.frameAt(c.gateCount).registerValues.b).toBe(56n);
	});
});

describe('check over a domain', () => {
	it('checkCircuit with assume runs only the domain, says so, and the prover agrees', () => {
		const d = doc(
			[
				{ name: 'b', size: 5, role: 'output' },
				{ name: 'anc', size: 1, role: 'ancilla' }
			],
			[
				{ id: 'f', type: 'qft', register: 'b', swaps: false },
				{ id: 'm', type: 'mod-add', target: 'b', value: '9', modulus: '13', ancilla: { register: 'anc', index: 0 } },
				{ id: 'g', type: 'iqft', register: 'b', swaps: false }
			]
		);
		const c = lowerCircuit(d);
		const r = checkCircuit(c, ['b = b + 9 mod 13'], { assume: ['b < 13'] });
		expect(r.ok).toBe(true);
		expect(r.domain).toEqual({ conditions: ['b < 13'], inputs: 13, count: '13', total: '32' });
		// the general prover covers the domain: proved for all 13 inputs, agreeing with the exhaustive sweep
		expect(r.proof.status).toBe('proved');
		expect(r.notes.join(' ')).toContain('domain: b < 13 (13 of 32 basis inputs)');
		// without the domain, inputs b ≥ 13 fail: the construction assumes b < N
		expect(checkCircuit(c, ['b = b + 9 mod 13'], { proof: false }).failed).toBeGreaterThan(0);
	});
	it('a condition that is not a comparison is refused with its column', () => {
		expect(() => parseCondition('b + 1', [{ name: 'b', size: 3 }])).toThrow(/column 1: expected a comparison/);
		expect(() => parseCondition('q < 3', [{ name: 'b', size: 3 }])).toThrow(/unknown register "q"/);
	});
	it('the exponentiation states expectations that a correct circuit meets at every step', () => {
		const d = doc(
			[
				{ name: 'e', size: 3 },
				{ name: 'y', size: 4 },
				{ name: 'w', size: 5 },
				{ name: 'anc', size: 1, role: 'ancilla' }
			],
			[{ id: 'x', type: 'mod-exp', exponent: 'e', y: 'y', work: 'w', value: '7', modulus: '15', ancilla: { register: 'anc', index: 0 } }]
		);
		const c = lowerCircuit(d);
		for (const e of [0, 3, 5]) {
			const run = new Run(c, { values: { e, y: 1 } });
			expect(run.firstDivergenceStep()).toBeNull();
			expect(run.frameAt(c.gateCount).registerValues.y).toBe(powMod(7n, BigInt(e), 15n));
		}
	});
});
