import { describe, expect, it } from 'vitest';
import { importQasm } from '../qasm/import.js';
import { exportQasm } from '../qasm/export.js';
import { lowerCircuit } from '../lower.js';
import { GateCode } from '../circuit.js';
import { checkCircuit, type CheckReport } from './index.js';
import { runBasisInput } from './run-input.js';
import { Run } from '../run.js';
import { circuitUnitary } from './equivalence.js';

// `reset` on an ancilla is read as a checked claim: "this qubit is |0⟩ here" (issue 13). The
// OpenQASM 3 specification defines reset as a non-unitary operation that puts the qubit in |0⟩;
// on a qubit that is already |0⟩ it does nothing, which is the only case a clean ancilla should
// meet. Every verdict below is set beside the exhaustive sweep of the same inputs.

const check = (text: string, specs: string[], opts: { ignorePhase?: boolean } = {}): CheckReport => checkCircuit(lowerCircuit(importQasm(text).document), specs, { ...opts });
/** The prover and the exhaustive sweep agree whenever the prover decides. */
function agree(r: CheckReport) {
	expect(r.exhaustive).toBe(true);
	if (r.proof.status === 'proved' || r.proof.status === 'refuted') expect(r.proof.status === 'proved').toBe(r.failed === 0);
}

// b ^= a·c through an ancilla: a Toffoli computes a·c into anc, a CNOT copies it onto b, a second
// Toffoli uncomputes it (Nielsen and Chuang §4.3, the uncompute trick; from memory).
const header = 'OPENQASM 3.0;\ninclude "stdgates.inc";\nqubit[1] a;\nqubit[1] c;\nqubit[1] b;\nqubit[1] anc;\n';
const clean = `${header}ccx a[0], c[0], anc[0];\ncx anc[0], b[0];\nccx a[0], c[0], anc[0];\nreset anc[0];\n`;
// The reset placed before the uncompute: the end state is right (the Toffoli after it cleans up),
// but at line 9 anc holds a·c, so the claim fails exactly when a = c = 1.
const early = `${header}ccx a[0], c[0], anc[0];\ncx anc[0], b[0];\nreset anc[0];\nccx a[0], c[0], anc[0];\n`;
const spec = ['b = b + a*c mod 2'];

describe('reset read as a checked claim', () => {
	it('imports as a reset item at its line, with one note; lowers to the reset kind; exports back as reset', () => {
		const r = importQasm(clean);
		const resets = r.document.body.filter((i) => i.type === 'gate' && i.gate === 'reset');
		expect(resets).toHaveLength(1);
		expect(resets[0].source).toEqual({ line: 10, column: 1 });
		expect(r.warnings.map((w) => `${w.line}:${w.column}`)).toEqual(['10:1']);
		const c = lowerCircuit(r.document);
		expect(c.kinds[c.gateCount - 1]).toBe(GateCode.reset);
		expect(exportQasm(c, { version: 3 })).toContain('reset anc[0];');
		// `reset reg;` claims every qubit of the register.
		const whole = importQasm('OPENQASM 3.0;\nqubit[3] w;\nreset w;\n');
		expect(whole.document.body.map((i) => (i.type === 'gate' ? `${i.gate} ${i.qubits[0].register}[${i.qubits[0].index}]` : i.type))).toEqual(['reset w[0]', 'reset w[1]', 'reset w[2]']);
	});

	it('a clean ancilla at the reset: proved, and all 8 inputs pass the sweep', () => {
		const r = check(clean, spec);
		agree(r);
		expect([r.ok, r.cases, r.failed, r.proof.status]).toEqual([true, 8, 0, 'proved']);
	});

	it('a reset before the uncompute: refuted by the prover at line 9 for a = c = 1, and the sweep fails exactly those inputs', () => {
		const r = check(early, spec);
		agree(r);
		expect(r.ok).toBe(false);
		expect(r.proof.status).toBe('refuted');
		// The only failing inputs are a = c = 1 (b either way), each failing on the reset, not the value.
		expect(r.failed).toBe(2);
		for (const f of r.failures) {
			expect([f.input.a, f.input.c]).toEqual(['1', '1']);
			expect(f.reason).toBe('reset');
			expect(f.reset).toEqual({ gate: 2, line: 9, qubit: 'anc[0]', p1: 1 });
		}
		const m = r.proof.bitMismatches.find((x) => x.qubit === 'anc[0]')!;
		expect(m.expected).toContain('reset at step 3 (line 9)');
		expect(m.atStep).toBe(3);
		expect(m.holds).toBe('a[0]*c[0]');
		expect(m.lines).toEqual([7, 9]);
		expect(m.input).toMatchObject({ a: '1', c: '1' });
	});

	it('a qubit in superposition at the reset fails with probability ½ on every input (ledger and prover)', () => {
		const text = `${header}h anc[0];\nreset anc[0];\nh anc[0];\n`;
		const r = check(text, ['b = b']);
		agree(r);
		expect(r.proof.status).toBe('refuted');
		expect(r.failed).toBe(r.cases);
		expect(r.failures.every((f) => f.reason === 'reset' && f.reset!.p1 === 0.5 && f.reset!.line === 8)).toBe(true);
	});

	it('the amplitude engine checks the claim too: an entangled ancilla fails, a disentangled one passes', () => {
		// h w; cx w, anc entangles w and anc (a Bell pair): P(anc = 1) = ½ at the reset.
		const bad = 'OPENQASM 3.0;\ninclude "stdgates.inc";\nqubit[1] b;\nqubit[1] w;\nqubit[1] anc;\nh w[0];\ncx w[0], anc[0];\nreset anc[0];\ncx w[0], anc[0];\nh w[0];\n';
		const r = check(bad, ['b = b']);
		expect(r.failed).toBe(r.cases);
		expect(r.failures[0]).toMatchObject({ reason: 'reset', engine: 'amplitudes' });
		expect(r.failures[0].reset!.p1).toBeCloseTo(0.5, 12);
		expect(r.proof.status).not.toBe('proved');
		// Undone before the reset: anc is |0⟩ there, up to float rounding.
		const good = bad.replace('reset anc[0];\ncx w[0], anc[0];', 'cx w[0], anc[0];\nreset anc[0];');
		const g = check(good, ['b = b']);
		expect([g.ok, g.failed]).toEqual([true, 0]);
	});

	it('the ancilla comes back clean but was reused dirty: only the claim catches it', () => {
		// Without the reset line the same circuit passes: the end state is right for every input.
		const noClaim = early.replace('reset anc[0];\n', '');
		expect(check(noClaim, spec).ok).toBe(true);
		expect(check(early, spec).ok).toBe(false);
	});

	it('stepping one input: the run report carries on past a failed claim (the state is left as it was)', () => {
		const c = lowerCircuit(importQasm(early).document);
		const rep = runBasisInput(c, new Map([['a', 1n], ['c', 1n], ['b', 0n]]), { engine: 'ledger' });
		expect(rep.registers.find((x) => x.name === 'b')!.values[0]).toEqual({ value: '1', probability: 1 });
		expect(rep.registers.find((x) => x.name === 'anc')!.values[0]).toEqual({ value: '0', probability: 1 });
		expect(rep.resetFailure).toEqual({ gate: 2, line: 9, qubit: 'anc[0]', p1: 1 });
		expect(runBasisInput(c, new Map([['a', 1n], ['c', 0n]]), { engine: 'ledger' }).resetFailure).toBeUndefined();
		expect(runBasisInput(c, new Map([['a', 1n], ['c', 1n]]), { engine: 'amplitudes' }).resetFailure).toMatchObject({ gate: 2, line: 9, qubit: 'anc[0]' });
	});

	it('stepping in the workbench: a failed claim is a divergence on the ancilla right after the reset, in both engines', () => {
		const c = lowerCircuit(importQasm(early).document);
		for (const engine of ['auto', 'amplitudes'] as const) {
			const bad = new Run(c, { values: { a: 1, c: 1 } }, { engine });
			const d = bad.divergences.filter((x) => x.message.includes('reset'));
			expect(d).toHaveLength(1);
			expect(d[0]).toMatchObject({ step: 3, qubit: 3 });
			expect(d[0].message).toBe('q3 (anc[0]) at step 3: the reset on line 9 claims it is |0⟩ there, but it holds 1');
			// Inputs where a·c = 0 leave anc clean at the reset.
			expect(new Run(c, { values: { a: 1, c: 0 } }, { engine }).divergences.filter((x) => x.message.includes('reset'))).toEqual([]);
		}
	});

	it('reset is refused where it has no meaning, with its position', () => {
		expect(() => circuitUnitary(lowerCircuit(importQasm(clean).document))).toThrow(/step 4 \(line 10\) is a reset/);
		expect(() => importQasm('OPENQASM 3.0;\ninclude "stdgates.inc";\nqubit q;\ngate g a { reset a; }\n')).toThrow(/4:12: "reset" is not allowed inside a gate definition/);
		expect(() => importQasm('OPENQASM 3.0;\nqubit q;\nreset;\n')).toThrow(/3:6: expected a qubit or register after reset/);
		expect(() => importQasm('OPENQASM 3.0;\nqubit[2] q;\nctrl @ reset q[0], q[1];\n')).toThrow(/3:8: reset is not a gate/);
	});
});
