import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { importQasm } from '$lib/quantum/qasm/import';
import { makeTemplate } from '$lib/quantum/templates';
import { EngineSession } from '$lib/worker/engine';
import type { CircuitDocument } from '$lib/quantum/circuit';
import { runVerdict } from './run-verdict';

// The run summary's verdict line: "every stated angle holds" only when some angle is stated.
const load = (doc: CircuitDocument, values: Record<string, string>) =>
	new EngineSession({ id: 1, type: 'load', doc, inputs: { values, superposed: [] } }).summary;

describe('the run verdict line', () => {
	// The fixture is our hand-written 3-bit Fourier adder (Draper 2000, quant-ph/0008033), imported
	// as raw gates: with no spec nothing states an expected angle (the imported-file case).
	const text = readFileSync('src/lib/quantum/qasm/fixtures/adder3.qasm', 'utf8');

	it('says plainly that nothing is compared when no qubit states an expected angle', () => {
		const s = load(importQasm(text, { file: 'adder3.qasm' }).document, { a: '3', b: '1' });
		expect(s.stated.angles).toBe(0);
		const v = runVerdict(s);
		expect(v.tone).toBe('none');
		expect(v.text).not.toMatch(/✓|holds/);
		expect(v.text).toMatch(/no qubit states an expected angle/);
	});

	it('keeps "every stated angle holds" where angles are stated and none diverges', () => {
		const doc = importQasm(text, { file: 'adder3.qasm' }).document;
		doc.specs = ['b = a + b mod 8'];
		const s = load(doc, { a: '3', b: '1' });
		expect(s.stated.angles).toBeGreaterThan(0);
		expect(s.firstDivergence).toBeNull();
		expect(runVerdict(s)).toEqual({ tone: 'holds', text: '✓ every stated angle holds for these inputs' });
	});

	it('with expected bits but no angle, says the bits hold and that no angle was compared', () => {
		const v = runVerdict({ firstDivergence: null, stated: { angles: 0, bits: 3 } });
		expect(v.tone).toBe('holds');
		expect(v.text).toMatch(/every stated bit holds.*no angle is compared/);
	});

	it('names the first divergence when there is one', () => {
		const bad = text.replace('cu1(pi/2) a[1], b[2];', 'cu1(pi/4) a[1], b[2];');
		const doc = importQasm(bad, { file: 'adder3.qasm' }).document;
		doc.specs = ['b = a + b mod 8'];
		const s = load(doc, { a: '2', b: '0' });
		const v = runVerdict(s);
		expect(v.tone).toBe('diverged');
		expect(v.text).toBe(`✗ first divergence at step ${s.firstDivergence!.step} on b[2]`);
	});

	it('a template with QFT blocks states angles (the multiplier, 2 bits)', () => {
		const s = load(makeTemplate('multiplier', 'm', 2), { a: '1', b: '1' });
		expect(s.stated.angles).toBeGreaterThan(0);
		expect(runVerdict(s).tone).toBe('holds');
	});
});
