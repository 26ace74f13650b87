import { describe, expect, it } from 'vitest';
import { lowerCircuit, LoweringError } from './lower.js';
import { parseCircuitDocument, serializeCircuitDocument } from './schema.js';
import { gateAt, gateProvenance, GateCode, type CircuitDocument } from './circuit.js';

// Invented scenario: an inventory counter for a warehouse robot fleet.
const doc = (body: CircuitDocument['body'], registers: CircuitDocument['registers'] = [{ name: 'a', size: 3 }, { name: 'b', size: 3 }], blocks?: CircuitDocument['blocks']): CircuitDocument => ({
	format: 'orrery.circuit',
	version: 1,
	title: 'fleet counter',
	registers,
	body,
	...(blocks ? { blocks } : {})
});

function countKinds(c: ReturnType<typeof lowerCircuit>) {
	const counts: Record<string, number> = {};
	for (let g = 0; g < c.gateCount; g++) {
		const k = gateAt(c, g).kind;
		counts[k] = (counts[k] ?? 0) + 1;
	}
	return counts;
}

describe('QFT gate counts', () => {
	// Nielsen and Chuang, Quantum Computation and Quantum Information, §5.1: n Hadamards,
	// n(n−1)/2 controlled rotations, ⌊n/2⌋ swaps.
	for (let n = 1; n <= 8; n++)
		it(`n = ${n}`, () => {
			const c = lowerCircuit(doc([{ id: 'f', type: 'qft', register: 'x' }], [{ name: 'x', size: n }]));
			const k = countKinds(c);
			expect(k.h ?? 0).toBe(n);
			expect(k.cp ?? 0).toBe((n * (n - 1)) / 2);
			expect(k.swap ?? 0).toBe(Math.floor(n / 2));
			expect(c.gateCount).toBe(n + (n * (n - 1)) / 2 + Math.floor(n / 2));
		});
});

describe('Fourier adder rotation count', () => {
	// Draper 2000, "Addition on a quantum computer", quant-ph/0008033: the n-bit adder mod 2^n
	// uses n(n+1)/2 controlled rotations (count recalled from memory). Derivation: the target
	// qubit at level m receives one rotation per addend bit k < m, so the total is 1+2+…+n.
	for (let n = 1; n <= 8; n++)
		it(`n = ${n}`, () => {
			const c = lowerCircuit(doc([{ id: 'add', type: 'add', addend: 'a', target: 'b' }], [{ name: 'a', size: n }, { name: 'b', size: n }]));
			let levels = 0;
			for (let m = 1; m <= n; m++) levels += m;
			expect(countKinds(c).cp).toBe(levels);
			expect(levels).toBe((n * (n + 1)) / 2);
		});
});

describe('document schema', () => {
	it('names the JSON path of a bad field', () => {
		const bad = doc([{ id: 'g', type: 'gate', gate: 'cp', qubits: [{ register: 'a', index: 0 }, { register: 'b', index: 7 }], angle: 'pi/4' }]);
		const r = parseCircuitDocument(bad);
		expect(r.ok).toBe(false);
		if (!r.ok) expect(r.issues[0].path).toBe('body[0].qubits[1].index');
		const r2 = parseCircuitDocument({ ...bad, body: [{ id: 'g', type: 'gate', gate: 'p', qubits: [{ register: 'a', index: -1 }], angle: 'pi' }] });
		expect(r2.ok).toBe(false);
		if (!r2.ok) expect(r2.issues.map((i) => i.path)).toContain('body[0].qubits[0].index');
		const r3 = parseCircuitDocument({ ...bad, body: [{ id: 'g', type: 'gate', gate: 'p', qubits: [{ register: 'a', index: 0 }], angle: 'pi/' }] });
		expect(r3.ok).toBe(false);
		if (!r3.ok) expect(r3.issues[0].path).toBe('body[0].angle');
		const r4 = parseCircuitDocument({ ...bad, body: [{ id: 'x', type: 'qft', register: 'a' }, { id: 'x', type: 'qft', register: 'zz' }] });
		expect(r4.ok).toBe(false);
		if (!r4.ok) expect(r4.issues.map((i) => i.path)).toEqual(['body[1].id', 'body[1].register']);
	});
	it('round-trips exactly', () => {
		const d = doc([
			{ id: 'q1', type: 'qft', register: 'b', swaps: false },
			{ id: 'g1', type: 'gate', gate: 'p', qubits: [{ register: 'b', index: 2 }], angle: '5/32 turn', source: { line: 3, column: 1 } },
			{ id: 'g2', type: 'gate', gate: 'p', qubits: [{ register: 'b', index: 2 }], angle: '2*pi*5/2^40' },
			{ id: 'add1', type: 'add', addend: 'a', target: 'b', shift: 1, control: { register: 'c', index: 0 }, ccpLowering: 'quarter' }
		], [{ name: 'a', size: 3 }, { name: 'b', size: 3 }, { name: 'c', size: 1 }]);
		const text = serializeCircuitDocument(d);
		const r = parseCircuitDocument(JSON.parse(text));
		expect(r.ok).toBe(true);
		if (r.ok) {
			expect(r.document).toEqual(d);
			const again = serializeCircuitDocument(r.document);
			const r2 = parseCircuitDocument(JSON.parse(again));
			expect(r2.ok && serializeCircuitDocument(r2.document)).toBe(again);
		}
	});
});

describe('lowering', () => {
	it('keeps provenance (block path, loop indices, source)', () => {
		const c = lowerCircuit(
			doc([{ id: 'mul', type: 'multiply', a: 'a', b: 'b', product: 'p', source: { line: 4, column: 2 } }], [{ name: 'a', size: 2 }, { name: 'b', size: 2 }, { name: 'p', size: 4 }])
		);
		const g = c.blocks.find((b) => b.itemId === 'mul/add[1]')!;
		const pr = gateProvenance(c, g.start);
		expect(pr.path).toEqual(['mul', 'mul/add[1]']);
		// shift 1: the level-1 qubit p[0] gets no rotation, so the first gate targets p[1].
		expect(pr.loop).toEqual({ i: 1, j: 1, k: 0 });
		expect(pr.source).toEqual({ line: 4, column: 2 });
		expect(pr.blockKind).toBe('add');
	});
	it('substitutes user blocks', () => {
		const c = lowerCircuit(
			doc(
				[{ id: 'call1', type: 'call', block: 'kick', args: { r: 'b', t: 2, theta: 'pi/8' } }],
				undefined,
				[{ name: 'kick', params: [{ name: 'r', kind: 'register' }, { name: 't', kind: 'int' }, { name: 'theta', kind: 'angle' }], body: [{ id: 'k1', type: 'gate', gate: 'p', qubits: [{ register: 'r', index: 't' }], angle: 'theta*2^t' }] }]
			)
		);
		expect(c.gateCount).toBe(1);
		const v = gateAt(c, 0);
		expect(v.targets).toEqual([3 + 2]);
		expect(v.angle).toEqual({ exact: true, num: 1n, exp: 2 }); // pi/8·4 = pi/2 = 1/4 turn
		expect(gateProvenance(c, 0).path).toEqual(['call1', 'call1/k1']);
	});
	it('enforces limits with clear errors', () => {
		expect(() => lowerCircuit(doc([{ id: 'f', type: 'qft', register: 'a' }]), { limits: { maxGates: 3 } })).toThrow(/body\[0\].*limit of 3 gates/);
		expect(() => lowerCircuit(doc([], [{ name: 'a', size: 30 }]), { limits: { maxQubits: 20 } })).toThrow(LoweringError);
		expect(() => lowerCircuit(doc([{ id: 'c', type: 'ccp', controls: [{ register: 'a', index: 0 }, { register: 'a', index: 1 }], target: { register: 'b', index: 0 }, angle: 'pi', lowering: 'ancilla' }]))).toThrow(/ancilla/);
	});
	it('lowers ccp four ways', () => {
		const counts = (lowering: 'native' | 'ancilla' | 'no-ancilla' | 'quarter') =>
			countKinds(
				lowerCircuit(
					doc(
						[{ id: 'c', type: 'ccp', controls: [{ register: 'a', index: 0 }, { register: 'a', index: 1 }], target: { register: 'b', index: 0 }, angle: 'pi/4', lowering }],
						[{ name: 'a', size: 2 }, { name: 'b', size: 1 }, { name: 'anc', size: 1, role: 'ancilla' }]
					)
				)
			);
		expect(counts('native')).toEqual({ mcp: 1 });
		expect(counts('ancilla')).toEqual({ ccx: 2, cp: 1 });
		expect(counts('no-ancilla')).toEqual({ cp: 3, cx: 2 });
		expect(counts('quarter')).toEqual({ p: 7, cx: 6 });
		expect(GateCode.mcp).toBe(7);
	});
});
