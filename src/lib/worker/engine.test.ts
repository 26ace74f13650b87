import { readFileSync } from 'node:fs';
import { importQasm } from '$lib/quantum/qasm/import';
import { describe, expect, it } from 'vitest';
import { beginLoad, EngineSession, handleRequest, parseInputValue, runCheck } from './engine';
import { makeTemplate, plantedFaultAdder, demoMultiplier, periodFindingUnreduced, TEMPLATE_NAMES } from '$lib/quantum/templates';
import type { CircuitDocument } from '$lib/quantum/circuit';
import type { FrameView } from './protocol';

describe('engine session (what the workbench worker serves)', () => {
	it('a 3-bit Fourier adder with a = 5, b = 6 ends with b = 3 (11 mod 8; arithmetic)', () => {
		const s = new EngineSession({ id: 1, type: 'load', doc: makeTemplate('adder'), inputs: { values: { a: '5', b: '6' }, superposed: [] } });
		const end = s.frame(s.summary.lastStep);
		expect(end.registerValues).toEqual({ a: '5', b: '3' });
		// At every block boundary every expected Fourier angle equals the actual one.
		for (const step of s.summary.boundaries) {
			const f = s.frame(step);
			for (const q of f.qubits) if (q.expected !== undefined) expect(q.angle).toBeCloseTo(q.expected, 12);
			expect(f.diverged).toEqual([]);
		}
	});

	it('a failed reset claim: the frame right after it draws that dial as diverging and says why', () => {
		const text = 'OPENQASM 3.0;\ninclude "stdgates.inc";\nqubit[1] a;\nqubit[1] c;\nqubit[1] b;\nqubit[1] anc;\nccx a[0], c[0], anc[0];\ncx anc[0], b[0];\nreset anc[0];\nccx a[0], c[0], anc[0];\n';
		const doc = importQasm(text).document;
		const bad = new EngineSession({ id: 1, type: 'load', doc, inputs: { values: { a: '1', c: '1' }, superposed: [] } });
		const f = bad.frame(3);
		expect(f.diverged).toEqual([3]);
		expect(f.qubits[3]).toMatchObject({ divergence: 0.5, divergenceText: 'the reset claims |0⟩ here; it holds 1' });
		expect(bad.frame(2).diverged).toEqual([]);
		const good = new EngineSession({ id: 1, type: 'load', doc, inputs: { values: { a: '1', c: '0' }, superposed: [] } });
		expect(good.frame(3).diverged).toEqual([]);
	});

	it('reads binary and decimal inputs and refuses values that do not fit', () => {
		expect(parseInputValue('0b101', 'a', 3)).toBe(5n);
		expect(parseInputValue('12', 'a', 4)).toBe(12n);
		expect(() => parseInputValue('8', 'a', 3)).toThrow(/does not fit in 3 qubits/);
		expect(() => parseInputValue('five', 'a', 3)).toThrow(/not a whole number/);
	});

	it('the demo multiplier computes 13·11 = 143 on 8 product qubits (arithmetic)', () => {
		const s = new EngineSession({ id: 1, type: 'load', doc: demoMultiplier(), inputs: { values: { a: '13', b: '11' }, superposed: [] } });
		expect(s.frame(s.summary.lastStep).registerValues.p).toBe('143');
	});

	it('the planted-fault demo gives a wrong sum for a[1] = 1 and c = 1', () => {
		const s = new EngineSession({ id: 1, type: 'load', doc: plantedFaultAdder(), inputs: { values: { c: '1', a: '2', b: '0' }, superposed: [] } });
		const end = s.frame(s.summary.lastStep);
		expect(end.registerValues.b).not.toBe('2');
	});

	it('answers a bad document with an error that names the field', () => {
		const doc = makeTemplate('adder');
		(doc.body[1] as { addend: string }).addend = 'nope';
		const out = handleRequest(null, { id: 7, type: 'load', doc, inputs: { values: {}, superposed: [] } });
		expect(out.response.type).toBe('error');
		if (out.response.type === 'error') expect(out.response.message).toMatch(/nope/);
	});
});

describe('spec-based angles in a hand-written Fourier section', () => {
	const load = (values: Record<string, string>, doc = plantedFaultAdder()) =>
		new EngineSession({ id: 1, type: 'load', doc, inputs: { values, superposed: [] } });

	it('finds the planted rotation: c·a[1] → b[3] turns 1/16 where b = b + c·a needs 1/8', () => {
		// b[3] sits at level 4 (QFT without swaps), so a[1]·2^1 adds 2/16 = 1/8 turn (arithmetic).
		const s = load({ c: '1', a: '2', b: '0' });
		expect(s.summary.warnings).toEqual([]);
		const d = s.summary.firstDivergence!;
		expect(d.label).toBe('b[3]');
		const pos = s.position(d.step);
		expect(pos.itemId).toBe('rot-b3-a1');
		const f = s.frame(d.step);
		const b3 = f.qubits.find((q) => q.register === 'b' && q.index === 3)!;
		expect(b3.angleText).toBe('1/16');
		expect(b3.expectedText).toBe('1/8');
		expect(b3.divergenceText).toBe('-1/16');
	});

	it('stays quiet when the faulty monomial is off for the input (c = 0, or a[1] = 0)', () => {
		expect(load({ c: '0', a: '15', b: '3' }).summary.firstDivergence).toBeNull();
		expect(load({ c: '1', a: '5', b: '3' }).summary.firstDivergence).toBeNull();
	});

	it('with the rotation fixed, no input diverges anywhere (all 2·16·16 inputs)', () => {
		const doc = plantedFaultAdder();
		const rot = doc.body.find((b) => b.id === 'rot-b3-a1') as { angle: string };
		rot.angle = 'pi/4';
		for (let c = 0; c < 2; c++)
			for (let a = 0; a < 16; a++)
				for (let b = 0; b < 16; b++) {
					const s = load({ c: String(c), a: String(a), b: String(b) }, doc);
					expect(s.summary.firstDivergence).toBeNull();
					expect(s.frame(s.summary.lastStep).registerValues.b).toBe(String((b + c * a) % 16));
				}
	});
});

describe('an imported OpenQASM file gets the same expected angles', () => {
	// The fixture is our hand-written 3-bit Fourier adder (Draper 2000, quant-ph/0008033).
	const text = readFileSync('src/lib/quantum/qasm/fixtures/adder3.qasm', 'utf8');
	const load = (src: string, values: Record<string, string>) => {
		const doc = importQasm(src, { file: 'adder3.qasm' }).document;
		doc.specs = ['b = a + b mod 8'];
		return new EngineSession({ id: 1, type: 'load', doc, inputs: { values, superposed: [] } });
	};

	it('finds the QFT section in the raw gates and holds for every input of the correct file', () => {
		for (let a = 0; a < 8; a++)
			for (let b = 0; b < 8; b++) {
				const s = load(text, { a: String(a), b: String(b) });
				expect(s.summary.firstDivergence).toBeNull();
				expect(s.frame(s.summary.lastStep).registerValues.b).toBe(String((a + b) % 8));
			}
		// Inside the section the table has expected angles to compare against.
		const s = load(text, { a: '3', b: '1' });
		const mid = s.frame(9);
		expect(mid.qubits.filter((q) => q.register === 'b' && q.expectedText !== undefined).length).toBeGreaterThan(0);
	});

	it('stops at the faulty line when an exponent is off by one', () => {
		const bad = text.replace('cu1(pi/2) a[1], b[2];', 'cu1(pi/4) a[1], b[2];');
		const s = load(bad, { a: '2', b: '0' });
		const d = s.summary.firstDivergence!;
		expect(d.label).toBe('b[2]');
		const line = bad.split('\n').findIndex((l) => l.startsWith('cu1(pi/4) a[1], b[2];')) + 1;
		expect(s.position(d.step).source?.line).toBe(line);
	});
});

describe('the check a workbench runs', () => {
	it('proves the planted fault wrong for all 512 inputs and locates each failing input at the faulty rotation', () => {
		const res = runCheck({ id: 3, type: 'check', doc: plantedFaultAdder(), inputs: { mode: 'auto' } }, () => {});
		expect(res.type).toBe('checked');
		if (res.type !== 'checked') return;
		expect(res.report.ok).toBe(false);
		expect(res.report.cases).toBe(512);
		// Every failing input has c = 1 and a[1] = 1: only those switch the wrong monomial on.
		for (const f of res.report.failures) {
			expect(f.input.c).toBe('1');
			expect((BigInt(f.input.a) >> 1n) & 1n).toBe(1n);
		}
		// 1/4 of the inputs have c = 1 and a[1] = 1: 128 of 512 (counting).
		expect(res.report.failed).toBe(128);
		for (const d of res.firstDivergences) {
			expect(d?.qubit).toBe('b[3]');
			expect(d?.gate).toContain('c[0], a[1] → b[3]');
		}
	});
});

describe('step 0 before the whole run (the preview the board draws first)', () => {
	// The preview is computed without the specs' section angles and without the pass over the
	// gates; it must be exactly the frame the whole run gives at step 0, values, expectations,
	// notes, checksum and all.
	const adder3 = readFileSync('src/lib/quantum/qasm/fixtures/adder3.qasm', 'utf8');
	const imported = importQasm(adder3, { file: 'adder3.qasm' }).document;
	imported.specs = ['b = a + b mod 8'];
	const docs: [string, CircuitDocument][] = [
		...TEMPLATE_NAMES.flatMap((n) => [2, 3].map((bits): [string, CircuitDocument] => [`${n} ${bits}`, makeTemplate(n, '', bits)])),
		['multiplier 16', makeTemplate('multiplier', '', 16)],
		['planted fault', plantedFaultAdder()],
		['demo multiplier', demoMultiplier()],
		['period finding, unreduced', periodFindingUnreduced()],
		['imported adder3.qasm with a spec', imported]
	];

	it('equals frame(0) of the finished run for every template, the demos and an imported file, on several inputs', () => {
		let compared = 0;
		for (const [name, doc] of docs) {
			const regs = doc.registers;
			const inputSets: { values: Record<string, string>; superposed: string[] }[] = [
				{ values: {}, superposed: [] },
				{ values: Object.fromEntries(regs.map((r, i) => [r.name, String(((i + 1) * 5) % 2 ** Math.min(r.size, 20))])), superposed: [] },
				{ values: Object.fromEntries(regs.map((r) => [r.name, String(2 ** Math.min(r.size, 20) - 1)])), superposed: [] }
			];
			if (regs.length > 1 && regs[0].size <= 4) inputSets.push({ values: {}, superposed: [regs[0].name] });
			for (const inputs of inputSets) {
				const previews: FrameView[] = [];
				const out = beginLoad({ id: 1, type: 'load', doc: structuredClone(doc), inputs, preview: true }, (f) => previews.push(f)).finish();
				if (out.response.type !== 'loaded') throw new Error(`${name}: ${JSON.stringify(out.response)}`);
				expect(previews.length, name).toBe(1);
				expect(previews[0], `${name} ${JSON.stringify(inputs)}`).toEqual(out.response.frame);
				expect(previews[0]).toEqual(out.session!.frame(0));
				compared++;
			}
		}
		expect(compared).toBeGreaterThan(40);
	});

	it('beginLoad (the worker\'s two-part load) sends step 0 at once and finish() gives the same answer as a whole load', () => {
		const doc = makeTemplate('multiplier', '', 3);
		const inputs = { values: { a: '5', b: '3' }, superposed: [] };
		const previews: FrameView[] = [];
		const begun = beginLoad({ id: 4, type: 'load', doc, inputs, preview: true }, (f) => previews.push(f));
		expect(begun.previewed).toBe(true);
		expect(previews).toHaveLength(1);
		const out = begun.finish();
		const whole = handleRequest(null, { id: 4, type: 'load', doc: structuredClone(doc), inputs });
		expect(out.response).toEqual({ ...whole.response, summary: { ...(whole.response as { summary: object }).summary, millis: (out.response as { summary: { millis: number } }).summary.millis } });
		if (out.response.type === 'loaded') expect(previews[0]).toEqual(out.response.frame);
		// 5·3 = 15 on the 6-bit product (arithmetic)
		expect(out.session!.frame(out.session!.summary.lastStep).registerValues.p).toBe('15');
		// a bad input: nothing previewed, and finish() answers the error a load always gave
		const bad = beginLoad({ id: 5, type: 'load', doc, inputs: { values: { a: '9' }, superposed: [] }, preview: true }, (f) => previews.push(f));
		expect(bad.previewed).toBe(false);
		expect(previews).toHaveLength(1);
		expect(bad.finish().response).toMatchObject({ type: 'error', message: expect.stringMatching(/does not fit in 3 qubits/) });
	});

	it('a load that fails sends no preview when lowering fails, and the error as before', () => {
		const doc = makeTemplate('adder');
		(doc.body[1] as { addend: string }).addend = 'nope';
		const previews: FrameView[] = [];
		const out = beginLoad({ id: 7, type: 'load', doc, inputs: { values: {}, superposed: [] }, preview: true }, (f) => previews.push(f)).finish();
		expect(out.response.type).toBe('error');
		expect(previews).toEqual([]);
	});
});
