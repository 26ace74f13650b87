// Starting points for a new circuit, and the demo circuits of the seeds (invented scenario).
// Qubit order: index 0 is the least significant bit. Angles are radian expressions.
import { CIRCUIT_FORMAT, CIRCUIT_VERSION, type BodyItem, type CircuitDocument } from './circuit.js';

export type TemplateName = 'blank' | 'adder' | 'multiplier' | 'modular-adder' | 'modular-multiplier' | 'period-finding';

/** Template names, for form validation. */
export const TEMPLATE_NAMES = ['blank', 'adder', 'multiplier', 'modular-adder', 'modular-multiplier', 'period-finding'] as const satisfies readonly TemplateName[];

/** Most bits a template takes: 32 (a 32-bit multiplier, 128 qubits and 37,952 gates, is proved by
 * the Fourier prover); the controlled modular multiplier grows faster (24 bits: 34,118 gates; 32
 * bits would be 76,850, over the server's 50,000-gate trace limit). Period finding has fixed sizes. */
export const MAX_TEMPLATE_BITS = 32;

export const TEMPLATES: { name: TemplateName; title: string; text: string; maxBits: number; sized: boolean }[] = [
	{ name: 'blank', title: 'Empty', text: 'two registers a and b of the chosen size, nothing else', maxBits: MAX_TEMPLATE_BITS, sized: false },
	{ name: 'adder', title: 'Fourier adder', text: 'QFT on b, b += a, inverse QFT', maxBits: MAX_TEMPLATE_BITS, sized: true },
	{ name: 'multiplier', title: 'multiplier', text: 'p += a·b by controlled shifted adds', maxBits: MAX_TEMPLATE_BITS, sized: true },
	{ name: 'modular-adder', title: 'Modular adder', text: 'b ← (b + a) mod N in the Fourier basis, for b < N (N = 2^bits − 1)', maxBits: MAX_TEMPLATE_BITS, sized: false },
	{ name: 'modular-multiplier', title: 'Controlled modular multiplier', text: 'if c: b ← (b + 2·x) mod N, for b < N', maxBits: 24, sized: false },
	{ name: 'period-finding', title: 'Period finding N = 21, a = 2', text: 'y ← 2^e·y mod 21: one controlled in-place multiplier per exponent bit (fixed sizes; bits is not used)', maxBits: MAX_TEMPLATE_BITS, sized: false }
];

/** The label of a template for a given size ("5-bit Fourier adder", "Modular adder"). */
export function templateLabel(name: TemplateName, bits: number | string): string {
	const t = TEMPLATES.find((x) => x.name === name)!;
	return t.sized ? `${bits}-bit ${t.title}` : t.title;
}

/** The constants a^(2^i) mod N of the exponentiation, one per exponent bit. */
function squarings(a: bigint, N: bigint, count: number): bigint[] {
	const out: bigint[] = [];
	let c = a % N;
	for (let i = 0; i < count; i++) {
		out.push(c);
		c = (c * c) % N;
	}
	return out;
}

/**
 * Period finding for N = 21, a = 2 (Beauregard 2003's layout with a full exponent register):
 * exponent e of t = 9 qubits (2^9 = 512 ≥ N² = 441), y of n = 5 qubits starting at 1, a work
 * register of n+1 = 6 qubits and one comparison ancilla. Each exponent bit i controls an
 * in-place multiplier by 2^(2^i) mod 21, written out so the constants can be read (and, in
 * the demo's faulty copy, got wrong).
 */
export function periodFinding(title?: string): CircuitDocument {
	const N = 21n;
	const t = 9;
	const body: BodyItem[] = squarings(2n, N, t).map((c, i) => ({
		id: `mul-e${i}`,
		type: 'mod-mul-inplace',
		x: 'y',
		work: 'w',
		value: String(c),
		modulus: String(N),
		control: { register: 'e', index: i },
		ancilla: { register: 'anc', index: 0 },
		label: `y ← ${c}·y mod 21 if e[${i}]`
	}));
	const d = doc(title || 'Period finding N = 21, a = 2', [
		{ name: 'e', size: t, role: 'input' },
		{ name: 'y', size: 5, role: 'output' },
		{ name: 'w', size: 6, role: 'work' },
		{ name: 'anc', size: 1, role: 'ancilla' }
	], body);
	d.description = 'Modular exponentiation y ← 2^e·y mod 21 for period finding. Checked over its domain y = 1 (the work register of period finding starts at 1): every exponent e, work register and ancilla back to 0.';
	d.specs = ['y = 2^e * y mod 21'];
	d.assume = ['y == 1'];
	return d;
}

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
		case 'modular-adder': {
			const k = Math.max(2, n);
			const N = 2 ** k - 1;
			const a = Math.max(1, N - 2);
			const d = withSpec(`b = b + ${a} mod ${N}`, doc(title || `Modular adder mod ${N}`, [
				{ name: 'b', size: k + 1, role: 'output' },
				{ name: 'anc', size: 1, role: 'ancilla' }
			], [
				{ id: 'qft-b', type: 'qft', register: 'b', swaps: false },
				{ id: 'madd', type: 'mod-add', target: 'b', value: String(a), modulus: String(N), ancilla: { register: 'anc', index: 0 } },
				{ id: 'iqft-b', type: 'iqft', register: 'b', swaps: false }
			]));
			d.assume = [`b < ${N}`];
			return d;
		}
		case 'modular-multiplier': {
			const k = Math.max(2, n);
			const N = 2 ** k - 1;
			const d = withSpec(`b = b + c*2*x mod ${N}`, doc(title || `Controlled modular multiplier mod ${N}`, [
				{ name: 'c', size: 1, role: 'input' },
				{ name: 'x', size: k, role: 'input' },
				{ name: 'b', size: k + 1, role: 'output' },
				{ name: 'anc', size: 1, role: 'ancilla' }
			], [{ id: 'mmul', type: 'mod-mul', x: 'x', target: 'b', value: '2', modulus: String(N), control: { register: 'c', index: 0 }, ancilla: { register: 'anc', index: 0 } }]));
			d.assume = [`b < ${N}`];
			return d;
		}
		case 'period-finding':
			return periodFinding(title);
	}
}

/**
 * Demo: the period-finding circuit with one constant not reduced mod N: the multiplier for
 * exponent bit 2 says 58 where 58 mod 21 = 16 belongs. Its first adder then adds 58, the sign
 * copy sees b + a − N = 37 ≥ 2^5 and the comparison ancilla goes wrong.
 */
export function periodFindingUnreduced(): CircuitDocument {
	const d = periodFinding('Period finding N = 21, a = 2 (one constant to check)');
	const item = d.body[2] as { value: string; label?: string };
	item.value = '58';
	item.label = 'y ← 58·y mod 21 if e[2]';
	return d;
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
