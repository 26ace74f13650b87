import { describe, expect, it } from 'vitest';
import { lowerCircuit } from './lower.js';
import { Run } from './run.js';
import { findFourierSections, type RegisterIntent } from './intent.js';
import type { BodyItem, CircuitDocument } from './circuit.js';

// A hand-written 3-bit Fourier adder b += a on the unswapped layout: qubit b[k] has level k+1, so
// a[j] adds 2^j/2^(k+1) = 1/2^(k+1−j) turn to it (Draper 2000, quant-ph/0008033, rewritten in
// our layout; the angles follow from the product representation, Nielsen and Chuang eq. 5.4).
function handAdder(tamper?: (items: BodyItem[]) => void): CircuitDocument {
	const body: BodyItem[] = [{ id: 'qft', type: 'qft', register: 'b', swaps: false }];
	for (let k = 2; k >= 0; k--)
		for (let j = k; j >= 0; j--)
			body.push({ id: `r${k}${j}`, type: 'gate', gate: 'cp', qubits: [{ register: 'a', index: j }, { register: 'b', index: k }], angle: `${1}/${2 ** (k + 1 - j)} turn` });
	body.push({ id: 'iqft', type: 'iqft', register: 'b', swaps: false });
	tamper?.(body);
	return { format: 'orrery.circuit', version: 1, title: 'hand adder', registers: [{ name: 'a', size: 3 }, { name: 'b', size: 3 }], body };
}
const intent: RegisterIntent = { register: 'b', value: (x) => (x.get('a')! + x.get('b')!) % 8n };

function run(doc: CircuitDocument, a: number, b: number) {
	const c = lowerCircuit(doc);
	return { c, r: new Run(c, { values: { a, b } }, { intents: [intent] }) };
}

describe('spec-based expectations in hand-written Fourier sections', () => {
	it('find the section between the QFT and the inverse QFT on b', () => {
		const c = lowerCircuit(handAdder());
		const [s] = findFourierSections(c);
		expect(s).toMatchObject({ register: 'b', layout: 'unswapped' });
		expect(s.end - s.start).toBe(6); // 3·4/2 rotations (Draper 2000, from memory: n(n+1)/2)
	});

	it('hold for every input of the correct adder, at every step', () => {
		for (let a = 0; a < 8; a++)
			for (let b = 0; b < 8; b++) {
				const { r } = run(handAdder(), a, b);
				expect(r.intentWarnings).toEqual([]);
				expect(r.divergences).toEqual([]);
				expect(r.frameAt(r.lastStep).registerValues.b).toBe(BigInt((a + b) % 8));
			}
	});

	it('name the faulty rotation when an exponent is off by one', () => {
		const doc = handAdder((body) => ((body.find((x) => x.id === 'r21') as { angle: string }).angle = '1/8 turn'));
		const { c, r } = run(doc, 2, 0);
		const d = r.divergences[0];
		expect(c.itemIds[c.itemOf[d.step - 1]]).toBe('r21');
		expect(d.qubit).toBe(c.registers[1].offset + 2);
	});

	it('show a missing rotation at the end of the section', () => {
		const doc = handAdder((body) => body.splice(body.findIndex((x) => x.id === 'r20'), 1));
		const { c, r } = run(doc, 1, 0);
		const [s] = findFourierSections(c);
		expect(r.divergences[0].step).toBe(s.end);
	});

	it('step aside, with a warning, when the section is not of the form', () => {
		const doc = handAdder((body) => body.splice(2, 0, { id: 'h', type: 'gate', gate: 'h', qubits: [{ register: 'b', index: 0 }] }));
		const { r } = run(doc, 1, 0);
		expect(r.intentWarnings[0]).toMatch(/acts on b inside its Fourier section/);
	});
});
