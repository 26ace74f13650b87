import { describe, expect, it } from 'vitest';
import { lowerCircuit } from './lower.js';
import { checkCircuit } from './check/index.js';
import { makeTemplate, periodFinding, periodFindingUnreduced } from './templates.js';
import { Run } from './run.js';
import { powMod } from './modular.js';

// The modular templates and the demo's faulty copy. Expected values are plain modular arithmetic
// (2^e mod 21 has period 6: 1, 2, 4, 8, 16, 11).

describe('modular templates check over their own specs and domains', () => {
	for (const n of [2, 3, 4])
		it(`modular adder and controlled modular multiplier, ${n} bits`, () => {
			for (const name of ['modular-adder', 'modular-multiplier'] as const) {
				const d = makeTemplate(name, undefined, n);
				const r = checkCircuit(lowerCircuit(d), d.specs!, { assume: d.assume });
				expect(r.ok).toBe(true);
				expect(r.exhaustive).toBe(true);
				expect(r.domain.conditions).toEqual([`b < ${2 ** n - 1}`]);
				expect(r.proof.status).toBe('proved'); // the prover agrees with the exhaustive sweep
			}
		}, 120_000);
	it('period finding N = 21, a = 2: every exponent, y = 1', () => {
		const d = periodFinding();
		const c = lowerCircuit(d);
		// Every input of the domain (512) is swept, and the prover builds the spec's 2^e mod 21 bit by
		// bit of e: both must say right.
		const r = checkCircuit(c, d.specs!, { assume: d.assume });
		expect(r.ok).toBe(true);
		expect(r.cases).toBe(512);
		expect(r.exhaustive).toBe(true);
		expect(r.proof.status).toBe('proved');
		const run = new Run(c, { values: { e: 6, y: 1 } });
		expect(run.frameAt(c.gateCount).registerValues.y).toBe(powMod(2n, 6n, 21n));
	}, 180_000);
	it('the copy with one constant not reduced mod 21 is refuted; its first divergence is the comparison ancilla', () => {
		const d = periodFindingUnreduced();
		const c = lowerCircuit(d);
		const r = checkCircuit(c, d.specs!, { assume: d.assume });
		expect(r.ok).toBe(false);
		// the prover refutes it on its own, with an input the exhaustive sweep also finds failing
		expect(r.proof.status).toBe('refuted');
		const cx = r.proof.counterexample;
		expect(cx).toBeDefined();
		expect(r.failures.some((f) => f.input.e === cx!.e)).toBe(true);
		// each wrong bit names the gates that wrote it, each once (the Check tab keys its links by gate)
		expect(r.proof.bitMismatches.length).toBeGreaterThan(0);
		for (const m of r.proof.bitMismatches) expect(new Set(m.gates).size).toBe(m.gates.length);
		const bad = r.failures[0];
		expect(BigInt(bad.input.e) & 4n).toBe(4n); // exponent bit 2 is set on every failing input
		const run = new Run(c, { values: { e: Number(bad.input.e), y: 1 } });
		const step = run.firstDivergenceStep()!;
		const anc = c.registers.find((x) => x.name === 'anc')!.offset;
		const q = run.frameAt(step).qubits[anc];
		expect(q.matches).toBe(false);
		expect(q.expected?.note).toMatch(/^b \+ a < N: \d+ \+ 58 < 21 fails$/);
	}, 180_000);
});
