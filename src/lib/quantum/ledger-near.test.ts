// The ledger on basis inputs with float angles: an inexact Fourier qubit whose phase is within
// 1e-6 turn of 0 or ½ is read as classical at an H (the dropped probability is recorded), so float
// angles alone never force the amplitude engine; real entanglement still does, and says where.
// Reference: the amplitude engine on the same circuit (values, probabilities and global phase).
import { describe, expect, it } from 'vitest';
import { importQasm } from './qasm/import.js';
import { lowerCircuit } from './lower.js';
import { runBasisInput } from './check/run-input.js';
import { applyLedgerGate, buildLedgerTables, createLedgerState, ledgerGlobalPhase, NEAR_CLASSICAL_TURNS } from './ledger.js';
import { applyLoweredGates, buildGateTables, createState, setBasisState } from './amplitudes.js';
import { toTurns } from './angle.js';

// A 3-bit QFT adder (Draper 2000) with angles printed to 6 digits and read as floats.
const text = `OPENQASM 2.0;
include "qelib1.inc";
qreg a[3];
qreg b[3];
h b[2]; cu1(1.570796) b[1],b[2]; cu1(0.785398) b[0],b[2]; h b[1]; cu1(1.570796) b[0],b[1]; h b[0];
cu1(3.141593) a[0],b[0]; cu1(1.570796) a[0],b[1]; cu1(3.141593) a[1],b[1];
cu1(0.785398) a[0],b[2]; cu1(1.570796) a[1],b[2]; cu1(3.141593) a[2],b[2];
h b[0]; cu1(-1.570796) b[0],b[1]; h b[1]; cu1(-0.785398) b[0],b[2]; cu1(-1.570796) b[1],b[2]; h b[2];
`;

describe('ledger with inexact angles', () => {
	const c = lowerCircuit(importQasm(text, { exactDecimals: false }).document);
	it('stays in the ledger for every input, with the same values and probabilities as the amplitude engine', () => {
		let near = 0;
		for (let a = 0n; a < 8n; a++)
			for (let b = 0n; b < 8n; b++) {
				const values = new Map([
					['a', a],
					['b', b]
				]);
				const L = runBasisInput(c, values, { engine: 'ledger' });
				const A = runBasisInput(c, values, { engine: 'amplitudes' });
				expect(L.engine).toBe('ledger');
				expect(L.registers[1].values[0].value).toBe(String((a + b) % 8n));
				expect(A.registers[1].values[0].value).toBe(String((a + b) % 8n));
				expect(Math.abs(L.registers[1].values[0].probability - A.registers[1].values[0].probability)).toBeLessThan(1e-9);
				// At most the 3 Hadamards of the inverse QFT read a near-classical phase.
				expect(L.nearClassical?.count ?? 0).toBeLessThanOrEqual(3);
				expect(L.nearClassical?.droppedProbability ?? 0).toBeLessThan(3 * Math.sin(Math.PI * NEAR_CLASSICAL_TURNS) ** 2);
				near += L.nearClassical?.count ?? 0;
			}
		expect(near).toBeGreaterThan(100);
	});
	it('keeps the global phase the amplitude engine has (within 1e-9 turn)', () => {
		const bits = [1, 0, 1, 1, 1, 0]; // a = 5, b = 3
		const s = createLedgerState(c.qubitCount, bits);
		const t = buildLedgerTables(c);
		for (let g = 0; g < c.gateCount; g++) expect(applyLedgerGate(s, c, t, g, null)).toBe(true);
		const st = createState(c.qubitCount, 16);
		setBasisState(st, 0b011101);
		applyLoweredGates(st, c, buildGateTables(c), 0, c.gateCount);
		const out = 0b000101 | (((5 + 3) % 8) << 3);
		const amp = Math.atan2(st.data[2 * out + 1], st.data[2 * out]) / (2 * Math.PI);
		const d = toTurns(ledgerGlobalPhase(s, t)) - amp;
		expect(Math.abs(d - Math.round(d))).toBeLessThan(1e-9);
	});
	it('real entanglement still hands over, naming the gate and its line', () => {
		const e = lowerCircuit(importQasm('OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[2];\nh q[0];\nh q[1];\ncu1(0.3) q[0],q[1];\n').document);
		const r = runBasisInput(e, new Map(), { engine: 'ledger' });
		expect(r.engine).toBe('amplitudes');
		expect(r.handoverReason).toBe('gate 2 (line 6) acts on 2 qubits in superposition (q0, q1) and would entangle them');
	});
	it('a CNOT from a classical control onto a Fourier qubit stays in the ledger', () => {
		const e = lowerCircuit(importQasm('OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[2];\nh q[1];\nu1(0.3) q[1];\ncx q[0],q[1];\nh q[1];\n').document);
		const r = runBasisInput(e, new Map([['q', 1n]]), { engine: 'ledger' });
		expect(r.engine).toBe('ledger');
	});
});
