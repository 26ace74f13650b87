import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { computeTraceSummary, drawBoardAt } from './trace-compute';
import { importQasm } from '$lib/quantum/qasm/import';
import { lowerCircuit } from '$lib/quantum/lower';
import { Run } from '$lib/quantum/run';

// The server's own run of a trace from the command line. The circuit is the 3-bit Fourier adder
// of Draper 2000 (quant-ph/0008033) written as a plain gate list (our fixture adder3.qasm), with
// one rotation made wrong: cu1(pi/2) a[1], b[2] becomes pi/4. In Draper's construction, after
// the QFT without swaps b[j] carries phase b/2^(j+1) turn and adding a gives (a+b)/2^(j+1); the
// faulty gate adds 1/16 instead of 1/8 turn to b[2] when a[1] = 1.

const fixture = readFileSync('src/lib/quantum/qasm/fixtures/adder3.qasm', 'utf8');
function faulty() {
	const text = fixture.replace('cu1(pi/2) a[1], b[2];', 'cu1(pi/4) a[1], b[2];');
	expect(text).not.toBe(fixture);
	const doc = importQasm(text, { file: 'adder3-faulty.qasm', defaultVersion: 2 }).document;
	doc.specs = ['b = a + b mod 8'];
	return doc;
}
/** Step of the faulty gate: 6 QFT gates, then the adder's gates in file order; it is the 5th (1-based step 11). */
const FAULT_STEP = 11;

describe('server trace computation (issue 18: "no divergence" for a failing imported circuit)', () => {
	it('finds the first divergence of an imported gate list at the faulty rotation, on b[2]', () => {
		// Before the fix the server passed no intent sections for circuits without QFT blocks, so this was null.
		const s = computeTraceSummary(faulty(), { values: { a: '2', b: '0' }, superposed: [] });
		expect(s.firstDivergence).not.toBeNull();
		expect(s.firstDivergence!.label).toBe('b[2]');
		expect(s.firstDivergence!.step).toBe(FAULT_STEP);
	});

	it('diverges exactly for the inputs whose exhaustive simulation ends wrong (all 64 inputs)', () => {
		const doc = faulty();
		const c = lowerCircuit(doc);
		for (let a = 0; a < 8; a++)
			for (let b = 0; b < 8; b++) {
				// Independent outcome: the final value of b from a plain run without any expectations.
				const plain = new Run(c, { values: { a: BigInt(a), b: BigInt(b) }, superposed: [] });
				const wrong = plain.frameAt(plain.lastStep).registerValues.b !== BigInt((a + b) % 8);
				const s = computeTraceSummary(doc, { values: { a: String(a), b: String(b) }, superposed: [] });
				expect(s.firstDivergence !== null, `a=${a} b=${b}`).toBe(wrong);
				// The fault only acts when a[1] = 1 (common practice: a controlled rotation with its control at 0 does nothing).
				expect(wrong, `a=${a} b=${b}`).toBe(((a >> 1) & 1) === 1);
			}
	});

	it('draws the board at the divergence: b[2] marked diverged, its ledger ends at the faulty gate', () => {
		const pic = drawBoardAt(faulty(), { values: { a: '2', b: '0' }, superposed: [] }, FAULT_STEP, ['Adder v1']);
		expect(pic.step).toBe(FAULT_STEP);
		expect(pic.diverged).toEqual(['b[2]']);
		expect(pic.svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
		expect(pic.svg.trimEnd().endsWith('</svg>')).toBe(true);
		// One dial per qubit (6), exactly one of them marked; the caption says what the picture is.
		expect(pic.svg.match(/<g data-qubit=/g)!.length).toBe(6);
		expect(pic.svg.match(/data-diverged="true"/g)!.length).toBe(1);
		expect(pic.svg).toContain('<g data-qubit="5" data-diverged="true">'); // b[2] = flat qubit 3 + 2
		expect(pic.svg).toContain('exact simulation, not a hardware run');
		expect(pic.svg).toContain('Adder v1');
		expect(pic.ledger!.label).toBe('b[2]');
		const last = pic.ledger!.rows.at(-1)!;
		expect(last.step).toBe(FAULT_STEP);
		expect(last.parted).toBe(true);
		// Expected total (a+b)/2^3 = 2/8 = 1/4 turn (Draper 2000, a=2, b=0); the faulty pi/4 rotation adds 1/8 turn, so the total is 1/8.
		expect(last.expected).toBe('1/4');
		expect(last.total).toBe('1/8');
	});

	it('escapes text in the picture (register names are identifiers, titles are not)', () => {
		const pic = drawBoardAt(faulty(), { values: { a: '2', b: '0' }, superposed: [] }, FAULT_STEP, ['<script>x</script> & "q"']);
		expect(pic.svg).not.toContain('<script>');
		expect(pic.svg).toContain('&lt;script&gt;x&lt;/script&gt; &amp; &quot;q&quot;');
	});
});
