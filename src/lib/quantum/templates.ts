// Starting points for a new circuit, and the demo circuits of the seeds (invented scenario).
// Qubit order: index 0 is the least significant bit. Angles are radian expressions.
import { CIRCUIT_FORMAT, CIRCUIT_VERSION, type BodyItem, type CircuitDocument } from './circuit.js';

export type TemplateName = 'blank' | 'adder' | 'multiplier';

export const TEMPLATES: { name: TemplateName; title: string; text: string }[] = [
	{ name: 'blank', title: 'Empty', text: 'two 3-qubit registers a and b, nothing else' },
	{ name: 'adder', title: '3-bit Fourier adder', text: 'QFT on b, b += a, inverse QFT' },
	{ name: 'multiplier', title: '3-bit multiplier', text: 'p += a·b by controlled shifted adds' }
];

function doc(title: string, registers: CircuitDocument['registers'], body: BodyItem[]): CircuitDocument {
	return { format: CIRCUIT_FORMAT, version: CIRCUIT_VERSION, title, registers, body };
}

function withSpec(spec: string, d: CircuitDocument): CircuitDocument {
	d.specs = [spec];
	return d;
}

export function makeTemplate(name: TemplateName, title?: string, n = 3): CircuitDocument {
	switch (name) {
		case 'blank':
			return doc(title || 'Untitled circuit', [
				{ name: 'a', size: n, role: 'input' },
				{ name: 'b', size: n, role: 'output' }
			], []);
		case 'adder':
			return withSpec(`b = a + b mod ${2 ** n}`, doc(title || `${n}-bit Fourier adder`, [
				{ name: 'a', size: n, role: 'input' },
				{ name: 'b', size: n, role: 'output' }
			], [
				{ id: 'qft-b', type: 'qft', register: 'b', swaps: false },
				{ id: 'add-a', type: 'add', addend: 'a', target: 'b' },
				{ id: 'iqft-b', type: 'iqft', register: 'b', swaps: false }
			]));
		case 'multiplier':
			return withSpec(`p = p + a*b mod ${2 ** (2 * n)}`, doc(title || `${n}-bit multiplier`, [
				{ name: 'a', size: n, role: 'input' },
				{ name: 'b', size: n, role: 'input' },
				{ name: 'p', size: 2 * n, role: 'output' }
			], [{ id: 'mul', type: 'multiply', a: 'a', b: 'b', product: 'p' }]));
	}
}

/**
 * Demo: a controlled adder b += a when c = 1, written out rotation by rotation as doubly
 * controlled phases on the unswapped Fourier layout (qubit b[k] has level k+1). One rotation is
 * planted wrong: c, a[1] → b[3] should turn by 1/8 (pi/4 rad) and turns by 1/16 (pi/8 rad).
 */
export function plantedFaultAdder(): CircuitDocument {
	const n = 4;
	const body: BodyItem[] = [{ id: 'qft-b', type: 'qft', register: 'b', swaps: false, label: 'b into the Fourier basis' }];
	for (let k = n - 1; k >= 0; k--) {
		for (let j = k; j >= 0; j--) {
			// b[k] holds b/2^(k+1) of a turn; adding a[j]·2^j adds 2^j/2^(k+1) = 1/2^(k+1−j) turn = pi/2^(k−j) rad.
			let angle = k - j === 0 ? 'pi' : `pi/${2 ** (k - j)}`;
			if (k === 3 && j === 1) angle = 'pi/8'; // the planted fault (should be pi/4)
			body.push({
				id: `rot-b${k}-a${j}`,
				type: 'ccp',
				controls: [{ register: 'c', index: 0 }, { register: 'a', index: j }],
				target: { register: 'b', index: k },
				angle,
				lowering: 'native',
				label: `c·a[${j}] → b[${k}]`
			});
		}
	}
	body.push({ id: 'iqft-b', type: 'iqft', register: 'b', swaps: false, label: 'b back' });
	const d = doc('Controlled adder, hand-written (fault planted)', [
		{ name: 'c', size: 1, role: 'input' },
		{ name: 'a', size: n, role: 'input' },
		{ name: 'b', size: n, role: 'output' }
	], body);
	d.specs = ['b = b + c*a mod 16'];
	return d;
}

/** Demo: a correct 4-bit multiplier built from the library block, ancilla-free lowering. */
export function demoMultiplier(): CircuitDocument {
	const d = makeTemplate('multiplier', '4-bit multiplier (half-angle lowering)', 4);
	(d.body[0] as { ccpLowering?: string }).ccpLowering = 'no-ancilla';
	d.specs = ['p = p + a*b mod 256'];
	return d;
}

let counter = 0;
/** A fresh, document-unique item id (for items added to a document by an editor or a template). */
export function newItemId(doc: CircuitDocument, prefix = 'item'): string {
	const taken = new Set(doc.body.map((b) => b.id));
	let id: string;
	do id = `${prefix}-${Date.now().toString(36)}-${(counter++).toString(36)}`;
	while (taken.has(id));
	return id;
}
