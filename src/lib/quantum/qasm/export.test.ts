import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { importQasm } from './import.js';
import { exportQasm } from './export.js';
import { lowerCircuit } from '../lower.js';
import { anglesEqual } from '../angle.js';
import { gateAt, type CircuitDocument, type LoweredCircuit } from '../circuit.js';
import { distanceUpToPhase } from './matrix.js';
import { circuitUnitary, unitaryDistance } from '../check/equivalence.js';

const fixture = (name: string) => readFileSync(new URL(`./fixtures/${name}`, import.meta.url), 'utf8');

/** Same lowered gates: kinds, qubits, exact angles equal exactly, u matrices equal up to global phase. */
function expectSameGates(a: LoweredCircuit, b: LoweredCircuit) {
	expect(b.gateCount).toBe(a.gateCount);
	for (let g = 0; g < a.gateCount; g++) {
		const x = gateAt(a, g);
		const y = gateAt(b, g);
		expect([y.kind, y.controls, y.targets]).toEqual([x.kind, x.controls, x.targets]);
		if (x.angle) {
			expect(y.angle!.exact).toBe(x.angle.exact);
			expect(anglesEqual(x.angle, y.angle!, 1e-12)).toBe(true);
		}
		if (x.matrix) expect(distanceUpToPhase(x.matrix, y.matrix!)).toBeLessThan(1e-12);
	}
}

// Invented demo circuit: a product and a sum on small registers, with every ccp lowering.
const demo = (lowering: 'native' | 'no-ancilla' | 'quarter' | 'ancilla'): CircuitDocument => ({
	format: 'orrery.circuit',
	version: 1,
	title: `demo ${lowering}`,
	registers: [
		{ name: 'a', size: 2 },
		{ name: 'b', size: 2 },
		{ name: 'p', size: 4 },
		{ name: 'anc', size: 1, role: 'ancilla' }
	],
	body: [
		{ id: 'm', type: 'multiply', a: 'a', b: 'b', product: 'p', ccpLowering: lowering },
		{ id: 'f', type: 'qft', register: 'p' },
		{ id: 'c', type: 'add-const', target: 'p', value: '3', layout: 'swapped' },
		{ id: 'r', type: 'gate', gate: 'rz', qubits: [{ register: 'a', index: 0 }], angle: 'pi/2^40' },
		{ id: 'u', type: 'gate', gate: 'u', qubits: [{ register: 'b', index: 1 }], matrix: [[[0.6, 0], [0, 0.8]], [[0, 0.8], [0.6, 0]]] },
		{ id: 'i', type: 'iqft', register: 'p' }
	]
});

describe('export then import gives the same circuit', () => {
	for (const lowering of ['native', 'no-ancilla', 'quarter', 'ancilla'] as const)
		it(`OpenQASM 3, ccp lowering ${lowering}`, () => {
			const L = lowerCircuit(demo(lowering));
			const text = exportQasm(L, { version: 3 });
			// Gate for gate with recognition off; with it on, decomposed ccp become mcp: same unitary.
			expectSameGates(L, lowerCircuit(importQasm(text, { recogniseDecompositions: false }).document));
			expect(unitaryDistance(circuitUnitary(L), circuitUnitary(lowerCircuit(importQasm(text).document)))).toBeLessThan(1e-9);
		});
	it('OpenQASM 3 writes mcp with two controls as ctrl(2) @ p and 40-bit angles exactly', () => {
		const text = exportQasm(demo('native'), { version: 3 });
		expect(text).toContain('ctrl(2) @ p(pi/2) a[0], b[0], p[1];');
		expect(text).toContain('rz(pi/2**40) a[0];');
	});
	it('OpenQASM 2 without multi-controlled gates round-trips gate for gate', () => {
		const L = lowerCircuit(demo('no-ancilla'));
		const text = exportQasm(L, { version: 2 });
		expect(text.startsWith('OPENQASM 2.0;\ninclude "qelib1.inc";')).toBe(true);
		expectSameGates(L, lowerCircuit(importQasm(text, { recogniseDecompositions: false }).document));
	});
	it('OpenQASM 2 defines multi-controlled phases as gates; the re-import is the same unitary', () => {
		const doc: CircuitDocument = {
			format: 'orrery.circuit',
			version: 1,
			title: 'mcp',
			registers: [{ name: 'q', size: 5 }],
			body: [
				{ id: 'h', type: 'gate', gate: 'h', qubits: [0, 1, 2, 3, 4].map((index) => ({ register: 'q', index })) .slice(4) },
				{ id: 'm2', type: 'gate', gate: 'mcp', qubits: [0, 1, 4].map((index) => ({ register: 'q', index })), angle: 'pi/8' },
				{ id: 'm4', type: 'gate', gate: 'mcp', qubits: [0, 1, 2, 3, 4].map((index) => ({ register: 'q', index })), angle: '3*pi/16' }
			]
		};
		const L = lowerCircuit(doc);
		const text = exportQasm(L, { version: 2 });
		expect(text).toContain('gate orr_mcp2(theta) c0, c1, t {');
		expect(text).toContain('orr_mcp4(3*pi/16) q[0], q[1], q[2], q[3], q[4];');
		const back = lowerCircuit(importQasm(text).document);
		expect(unitaryDistance(circuitUnitary(L), circuitUnitary(back))).toBeLessThan(1e-9);
	});
	it('the worked-example files survive a round trip through both versions', () => {
		for (const f of ['adder3.qasm', 'mult2.qasm3']) {
			const L = lowerCircuit(importQasm(fixture(f)).document);
			expectSameGates(L, lowerCircuit(importQasm(exportQasm(L, { version: 3 })).document));
			expectSameGates(L, lowerCircuit(importQasm(exportQasm(L, { version: 2 })).document));
		}
	});
});
