import { describe, expect, it } from 'vitest';
import { lowerCircuit } from './lower.js';
import { Run } from './run.js';
import { applyLoweredGate, buildGateTables, type StateVector } from './amplitudes.js';
import { applyLedgerGate, buildLedgerTables, createLedgerState, ledgerToAmplitudes } from './ledger.js';
import type { BodyItem, CcpLowering, CircuitDocument, LoweredCircuit, RegisterSpec } from './circuit.js';

const LOWERINGS: CcpLowering[] = ['native', 'ancilla', 'no-ancilla', 'quarter'];

const doc = (registers: RegisterSpec[], body: BodyItem[]): CircuitDocument => ({ format: 'orrery.circuit', version: 1, title: 'arith', registers, body });

/** Bits of the register values, flat order. */
function inputBits(c: LoweredCircuit, values: Record<string, number>): Uint8Array {
	const bits = new Uint8Array(c.qubitCount);
	for (const r of c.registers) for (let i = 0; i < r.size; i++) bits[r.offset + i] = ((values[r.name] ?? 0) >> i) & 1;
	return bits;
}

/**
 * Run the ledger and the amplitude engine side by side and require the same state at every
 * step: |⟨ledger product state|amplitude state⟩|² ≥ 1 − 1e-10. Returns the final amplitudes.
 */
function lockstep(c: LoweredCircuit, values: Record<string, number>): StateVector {
	const lt = buildLedgerTables(c);
	const gt = buildGateTables(c);
	const ledger = createLedgerState(c.qubitCount, inputBits(c, values));
	const amp = ledgerToAmplitudes(ledger, lt, 16);
	const compare = (step: number) => {
		const p = ledgerToAmplitudes(ledger, lt, 16).data;
		const d = amp.data;
		let re = 0;
		let im = 0;
		for (let i = 0; i < d.length; i += 2) {
			re += p[i] * d[i] + p[i + 1] * d[i + 1];
			im += p[i] * d[i + 1] - p[i + 1] * d[i];
		}
		const f = re * re + im * im;
		if (!(f > 1 - 1e-10)) throw new Error(`engines differ at step ${step}: fidelity ${f}`);
	};
	compare(0);
	for (let g = 0; g < c.gateCount; g++) {
		if (!applyLedgerGate(ledger, c, lt, g, null)) throw new Error(`ledger would entangle at gate ${g}`);
		applyLoweredGate(amp, c, gt, g);
		compare(g + 1);
	}
	return amp;
}

/** Index of the single basis state with probability ≈ 1, or −1. */
function basisOf(s: StateVector): number {
	for (let i = 0; i < s.data.length / 2; i++) {
		const p = s.data[2 * i] ** 2 + s.data[2 * i + 1] ** 2;
		if (p > 1 - 1e-9) return i;
	}
	return -1;
}

function packIndex(c: LoweredCircuit, values: Record<string, number>): number {
	let idx = 0;
	for (const r of c.registers) idx += (values[r.name] ?? 0) * 2 ** r.offset;
	return idx;
}

/**
 * Check one circuit on one input: the ledger Run has no divergence from the stated expectations
 * at any step (every partial sum inside every block and every block boundary), stays on the
 * ledger, and ends in `expected`; optionally the amplitude engine agrees at every step.
 */
function check(c: LoweredCircuit, inputs: Record<string, number>, expected: Record<string, number>, engines: boolean) {
	const run = new Run(c, { values: inputs });
	expect(run.handover).toBeNull();
	if (run.divergences.length) throw new Error(`${JSON.stringify(inputs)}: ${run.divergences[0].message}`);
	const out = run.frameAt(run.stepCount).registerValues;
	for (const r of c.registers) expect(out[r.name], `${r.name} for ${JSON.stringify(inputs)}`).toBe(BigInt(expected[r.name] ?? inputs[r.name] ?? 0));
	if (engines) {
		const fin = lockstep(c, inputs);
		expect(basisOf(fin)).toBe(packIndex(c, { ...inputs, ...expected }));
	}
}

// Lockstep (every frame on both engines) for all inputs up to this size; larger sizes use
// every input on the ledger and the `SAMPLE` inputs on both engines, to keep the run short.
const LOCKSTEP_ALL_UP_TO = 3;
const sample = (n: number, k: number) => [0, 1, (2 ** n) - 1, 0b10110 % 2 ** n, 0b01101 % 2 ** n, 0b11011 % 2 ** n].slice(0, k);

describe('Fourier adders, exhaustive', () => {
	for (let n = 1; n <= 5; n++) {
		it(`plain b += a, n = ${n}, both layouts`, () => {
			for (const swapped of [false, true]) {
				const layout = swapped ? 'swapped' : 'unswapped';
				const c = lowerCircuit(doc([{ name: 'a', size: n }, { name: 'b', size: n }], [
					{ id: 'f', type: 'qft', register: 'b', swaps: swapped },
					{ id: 'add', type: 'add', addend: 'a', target: 'b', layout },
					{ id: 'g', type: 'iqft', register: 'b', swaps: swapped }
				]));
				for (let a = 0; a < 2 ** n; a++)
					for (let b = 0; b < 2 ** n; b++) check(c, { a, b }, { b: (a + b) % 2 ** n }, n <= LOCKSTEP_ALL_UP_TO || (sample(n, 3).includes(a) && sample(n, 3).includes(b)));
			}
		});
		it(`constant b += v, n = ${n}`, () => {
			for (let v = 0; v < 2 ** n; v++) {
				const c = lowerCircuit(doc([{ name: 'b', size: n }], [
					{ id: 'f', type: 'qft', register: 'b', swaps: false },
					{ id: 'add', type: 'add-const', target: 'b', value: String(v) },
					{ id: 'g', type: 'iqft', register: 'b', swaps: false }
				]));
				for (let b = 0; b < 2 ** n; b++) check(c, { b }, { b: (b + v) % 2 ** n }, n <= LOCKSTEP_ALL_UP_TO || (v % 7 === 3 && b % 5 === 1));
			}
		});
		// n = 5 runs shifts 0 and 2 only (shift 1 is covered for n ≤ 4) to keep the suite within seconds.
		for (const shift of n === 5 ? [0, 2] : [0, 1, 2]) {
			if (shift >= n) continue;
			it(`shifted b += 2^${shift}·a, n = ${n}`, () => {
				const c = lowerCircuit(doc([{ name: 'a', size: n }, { name: 'b', size: n }], [
					{ id: 'f', type: 'qft', register: 'b', swaps: false },
					{ id: 'add', type: 'add', addend: 'a', target: 'b', shift },
					{ id: 'g', type: 'iqft', register: 'b', swaps: false }
				]));
				for (let a = 0; a < 2 ** n; a++)
					for (let b = 0; b < 2 ** n; b++) check(c, { a, b }, { b: (b + a * 2 ** shift) % 2 ** n }, n <= LOCKSTEP_ALL_UP_TO || (sample(n, 2).includes(a) && sample(n, 3).includes(b)));
			});
			for (const lowering of LOWERINGS)
				it(`controlled${shift ? ' shifted' : ''} b += c·2^${shift}·a, n = ${n}, ccp ${lowering}`, () => {
					const c = lowerCircuit(doc([{ name: 'c', size: 1 }, { name: 'a', size: n }, { name: 'b', size: n }, { name: 'anc', size: 1, role: 'ancilla' }], [
						{ id: 'f', type: 'qft', register: 'b', swaps: false },
						{ id: 'add', type: 'add', addend: 'a', target: 'b', shift, control: { register: 'c', index: 0 }, ccpLowering: lowering },
						{ id: 'g', type: 'iqft', register: 'b', swaps: false }
					]));
					for (let ctl = 0; ctl <= 1; ctl++)
						for (let a = 0; a < 2 ** n; a++)
							for (let b = 0; b < 2 ** n; b++)
								check(c, { c: ctl, a, b }, { b: (b + ctl * a * 2 ** shift) % 2 ** n, anc: 0 }, n <= LOCKSTEP_ALL_UP_TO || (sample(n, 2).includes(a) && sample(n, 2).includes(b)));
				});
		}
	}
});

describe('multiplier, exhaustive', () => {
	for (let n = 1; n <= 3; n++)
		for (const lowering of LOWERINGS)
			it(`p += a·b, n = ${n} (p has ${2 * n} qubits), ccp ${lowering}`, () => {
				const c = lowerCircuit(doc([{ name: 'a', size: n }, { name: 'b', size: n }, { name: 'p', size: 2 * n }, { name: 'anc', size: 1, role: 'ancilla' }], [
					{ id: 'mul', type: 'multiply', a: 'a', b: 'b', product: 'p', ccpLowering: lowering }
				]));
				const ps = n <= 2 ? Array.from({ length: 2 ** (2 * n) }, (_, i) => i) : [0, 45];
				for (let a = 0; a < 2 ** n; a++)
					for (let b = 0; b < 2 ** n; b++)
						for (const p of ps) check(c, { a, b, p }, { p: (p + a * b) % 2 ** (2 * n), anc: 0 }, n <= 2 || (p === 0 && (a * b) % 3 === 1) || (p === 45 && a === 7));
			});
});

describe('multiplier controlled-rotation count', () => {
	// Ruiz-Perez and Garcia-Escartin 2017 (Quantum Inf. Process. 16:152): O(n³) for the
	// multiplier built from O(n²) adders. Our exact count, derived: bit i of a controls the add
	// of 2^i·b into the m-bit product in the Fourier basis; product qubit j (level j+1) gets one
	// ccp per b bit k with i + k < j + 1. So #ccp = Σ_{i<na} Σ_{k<nb} max(0, m − i − k), and the
	// QFT and inverse QFT on the product add 2·m(m−1)/2 cp. With na = nb = n, m = 2n:
	// #ccp = n³ + n², #cp = 2n(2n − 1).
	for (const [na, nb, m] of [[1, 1, 2], [2, 2, 4], [3, 3, 6], [4, 4, 8], [5, 3, 6], [3, 4, 5]])
		it(`na = ${na}, nb = ${nb}, product ${m} qubits`, () => {
			const c = lowerCircuit(doc([{ name: 'a', size: na }, { name: 'b', size: nb }, { name: 'p', size: m }], [{ id: 'mul', type: 'multiply', a: 'a', b: 'b', product: 'p', ccpLowering: 'native' }]));
			let ccp = 0;
			let cp = 0;
			for (let g = 0; g < c.gateCount; g++) {
				if (c.kinds[g] === 7) ccp++;
				if (c.kinds[g] === 6) cp++;
			}
			let formula = 0;
			for (let i = 0; i < na; i++) for (let k = 0; k < nb; k++) formula += Math.max(0, m - i - k);
			expect(ccp).toBe(formula);
			expect(cp).toBe(m * (m - 1));
			if (na === nb && m === 2 * na) expect(ccp).toBe(na ** 3 + na ** 2);
		});
});

