import { describe, expect, it } from 'vitest';
import { lowerCircuit } from '../lower.js';
import type { BodyItem, CcpLowering, CircuitDocument, RegisterSpec } from '../circuit.js';
import { modularFigures } from './modular-resources.js';

// The formulas are derived in modular-resources.ts for this lowering of Beauregard 2003
// (quant-ph/0205095) Figs. 5–7; here they are checked against the lowered circuits, n = 3 … 8.

const doc = (registers: RegisterSpec[], body: BodyItem[]): CircuitDocument => ({ format: 'orrery.circuit', version: 1, title: 'counts', registers, body });
const LOWERINGS: CcpLowering[] = ['native', 'ancilla', 'no-ancilla', 'quarter'];
const anc = { register: 'anc', index: 0 };

function figures(d: CircuitDocument) {
	const c = lowerCircuit(d);
	const f = modularFigures(d, c);
	expect(f).toHaveLength(1);
	return { f: f[0], c };
}

describe('resource formulas against the lowered circuit, n = 3 … 8', () => {
	for (let n = 3; n <= 8; n++) {
		const N = 2 ** n - 1; // odd, so N's rotations never vanish
		for (const lowering of LOWERINGS)
			it(`n = ${n}, N = ${N}, ${lowering}`, () => {
				const regs: RegisterSpec[] = [
					{ name: 'c', size: 2 },
					{ name: 'x', size: n },
					{ name: 'b', size: n + 1 },
					{ name: 'anc', size: 2, role: 'ancilla' }
				];
				// modular adder, odd a, two controls: the closed form holds exactly
				const add = figures(doc(regs, [{ id: 'm', type: 'mod-add', target: 'b', value: '5', modulus: String(N), controls: [{ register: 'c', index: 0 }, { register: 'c', index: 1 }], ancilla: anc, ccpLowering: lowering }]));
				expect(add.f.lowered).toEqual(add.f.formula);
				expect(add.f.lowered.gates).toBe(add.f.closed.value);
				expect(add.c.gateCount).toBe(add.f.closed.value);
				// multiplier and in-place multiplier (constants 2^j·a mod N, some even): formula exact, closed form an upper bound
				const mul = figures(doc(regs, [{ id: 'm', type: 'mod-mul', x: 'x', target: 'b', value: '2', modulus: String(N), control: { register: 'c', index: 0 }, ancilla: anc, ccpLowering: lowering }]));
				expect(mul.f.lowered).toEqual(mul.f.formula);
				expect(mul.f.lowered.gates).toBeLessThanOrEqual(mul.f.closed.value);
				const inplace = figures(doc(regs, [{ id: 'm', type: 'mod-mul-inplace', x: 'x', work: 'b', value: '2', modulus: String(N), control: { register: 'c', index: 0 }, ancilla: anc, ccpLowering: lowering }]));
				expect(inplace.f.lowered).toEqual(inplace.f.formula);
				// with an approximate QFT (keep R_d for d ≤ 3) fewer rotations, a coarser QFT angle
				const approx = figures(doc(regs, [{ id: 'm', type: 'mod-mul', x: 'x', target: 'b', value: '2', modulus: String(N), ancilla: anc, ccpLowering: lowering, approx: 3 }]));
				expect(approx.f.lowered).toEqual(approx.f.formula);
				expect(approx.f.lowered.rotations).toBeLessThan(approx.f.exact.rotations);
				// T count: Toffoli = 7 T (Nielsen & Chuang Fig. 4.9); undefined while native ccp remain
				expect(inplace.f.tCount).toBe(lowering === 'native' ? null : inplace.f.lowered.toffolis * 7);
			});
	}
	it('modular exponentiation: qubits against 2n + 3 and gates against the formula', () => {
		const d = doc(
			[
				{ name: 'e', size: 4 },
				{ name: 'y', size: 4 },
				{ name: 'w', size: 5 },
				{ name: 'anc', size: 1, role: 'ancilla' }
			],
			[{ id: 'x', type: 'mod-exp', exponent: 'e', y: 'y', work: 'w', value: '7', modulus: '15', ancilla: anc }]
		);
		const { f, c } = figures(d);
		expect(f.lowered).toEqual(f.formula);
		expect(c.gateCount).toBe(f.formula.gates);
		expect(f.qubits).toBe(4 + 4 + 5 + 1);
		expect(f.published?.qubits).toBe(2 * 4 + 3); // Beauregard 2003, title: "using 2n+3 qubits"
	});
});
