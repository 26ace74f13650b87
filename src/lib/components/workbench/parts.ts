// The parts shelf: templates that become circuit body items when dropped on the strip.
// Defaults are picked from the circuit's registers so a dropped part is usually valid at once.
import { gateDisplayName, type BodyItem, type CircuitDocument, type GateName, type RegisterSpec } from '$lib/quantum/circuit';
import { newItemId } from '$lib/quantum/templates';

export { newItemId };

export type PartKind =
	| 'qft'
	| 'iqft'
	| 'add'
	| 'add-const'
	| 'add-controlled'
	| 'add-shifted'
	| 'add-controlled-shifted'
	| 'multiply'
	| 'mod-add'
	| 'mod-mul'
	| 'mod-mul-inplace'
	| 'mod-exp'
	| 'ccp-native'
	| 'ccp-ancilla'
	| 'ccp-no-ancilla'
	| 'ccp-quarter'
	| `gate-${GateName}`
	| `call-${string}`;

export interface Part {
	id: string; // shelf id (svelte-dnd-action needs one)
	kind: PartKind;
	title: string;
	hint: string;
	group: 'transform' | 'arithmetic' | 'modular' | 'phase' | 'gate' | 'team';
}

const GATE_HINTS: Record<GateName, string> = {
	h: 'Hadamard',
	x: 'bit flip',
	cx: 'controlled NOT',
	ccx: 'Toffoli',
	swap: 'exchange two qubits',
	p: 'phase diag(1, e^{iθ})',
	cp: 'controlled phase',
	mcp: 'a phase on the target when every control is 1',
	rz: 'z rotation',
	u: 'any one-qubit unitary',
	reset: 'claims the qubit is |0⟩ here; a run where it is not fails'
};

const GATE_TITLES: Record<GateName, string> = {
	h: 'H',
	x: 'X',
	cx: 'CX',
	ccx: 'Toffoli',
	swap: 'SWAP',
	p: 'P(θ)',
	cp: 'CP(θ)',
	mcp: 'Phase, many controls',
	rz: 'RZ(θ)',
	u: 'U',
	reset: 'Reset: claim |0⟩'
};

export const LIBRARY_PARTS: Part[] = [
	{ id: 'shelf-qft', kind: 'qft', title: 'QFT', hint: 'register into the Fourier basis', group: 'transform' },
	{ id: 'shelf-iqft', kind: 'iqft', title: 'Inverse QFT', hint: 'back to the computational basis', group: 'transform' },
	{ id: 'shelf-add', kind: 'add', title: 'Fourier add', hint: 'target += addend', group: 'arithmetic' },
	{ id: 'shelf-add-const', kind: 'add-const', title: 'Add constant', hint: 'target += k', group: 'arithmetic' },
	{ id: 'shelf-add-c', kind: 'add-controlled', title: 'Controlled add', hint: 'if c: target += addend', group: 'arithmetic' },
	{ id: 'shelf-add-s', kind: 'add-shifted', title: 'Shifted add', hint: 'target += 2^t·addend', group: 'arithmetic' },
	{ id: 'shelf-add-cs', kind: 'add-controlled-shifted', title: 'Controlled shifted add', hint: 'if c: target += 2^t·addend', group: 'arithmetic' },
	{ id: 'shelf-mul', kind: 'multiply', title: 'Multiplier', hint: 'product += a·b', group: 'arithmetic' },
	{ id: 'shelf-mod-add', kind: 'mod-add', title: 'Modular add', hint: 'b ← (b + a) mod N, Fourier register of n+1 qubits, 0–2 controls, one ancilla', group: 'modular' },
	{ id: 'shelf-mod-mul', kind: 'mod-mul', title: 'Modular multiply-add', hint: 'if c: b ← (b + a·x) mod N, b of n+1 qubits', group: 'modular' },
	{ id: 'shelf-mod-mul-ip', kind: 'mod-mul-inplace', title: 'Modular multiply in place', hint: 'if c: x ← a·x mod N, with a work register and a⁻¹ mod N', group: 'modular' },
	{ id: 'shelf-mod-exp', kind: 'mod-exp', title: 'Modular power', hint: 'y ← a^e·y mod N, one in-place multiplier per exponent bit', group: 'modular' },
	{ id: 'shelf-ccp-n', kind: 'ccp-native', title: 'CC-phase · native', hint: 'one doubly controlled phase', group: 'phase' },
	{ id: 'shelf-ccp-a', kind: 'ccp-ancilla', title: 'CC-phase · ancilla', hint: 'Toffoli, cp, Toffoli', group: 'phase' },
	{ id: 'shelf-ccp-h', kind: 'ccp-no-ancilla', title: 'CC-phase · half angles', hint: 'cp(θ/2) and two CNOTs', group: 'phase' },
	{ id: 'shelf-ccp-q', kind: 'ccp-quarter', title: 'CC-phase · quarter angles', hint: 'p(±θ/4) and CNOTs', group: 'phase' },
	...(['h', 'x', 'cx', 'ccx', 'swap', 'p', 'cp', 'mcp', 'rz', 'reset'] as GateName[]).map(
		(g): Part => ({ id: `shelf-gate-${g}`, kind: `gate-${g}`, title: GATE_TITLES[g], hint: GATE_HINTS[g], group: 'gate' })
	)
];


function pick(regs: RegisterSpec[], role: RegisterSpec['role'], skip: string[] = []): string {
	return (regs.find((r) => r.role === role && !skip.includes(r.name)) ?? regs.find((r) => !skip.includes(r.name)) ?? regs[0]).name;
}

/** Turn a shelf part into a body item with sensible defaults for this document. */
export function itemFromPart(kind: PartKind, doc: CircuitDocument): BodyItem {
	const regs = doc.registers;
	const id = newItemId(doc, kind.replace(/^gate-/, ''));
	const out = pick(regs, 'output');
	const inp = pick(regs, 'input', [out]);
	const other = pick(regs, 'input', [out, inp]);
	const firstQubit = (name: string) => ({ register: name, index: 0 });
	switch (kind) {
		case 'qft':
		case 'iqft':
			return { id, type: kind, register: out, swaps: false };
		case 'add':
			return { id, type: 'add', addend: inp, target: out };
		case 'add-const':
			return { id, type: 'add-const', target: out, value: '1' };
		case 'add-controlled':
			return { id, type: 'add', addend: inp, target: out, control: firstQubit(other) };
		case 'add-shifted':
			return { id, type: 'add', addend: inp, target: out, shift: 1 };
		case 'add-controlled-shifted':
			return { id, type: 'add', addend: inp, target: out, shift: 1, control: firstQubit(other) };
		case 'multiply':
			return { id, type: 'multiply', a: inp, b: other, product: out };
		case 'mod-add':
		case 'mod-mul':
		case 'mod-mul-inplace':
		case 'mod-exp':
			return modularFromPart(kind, id, doc);
		case 'ccp-native':
		case 'ccp-ancilla':
		case 'ccp-no-ancilla':
		case 'ccp-quarter': {
			const lowering = kind.slice(4) as 'native' | 'ancilla' | 'no-ancilla' | 'quarter';
			const anc = regs.find((r) => r.role === 'ancilla');
			return {
				id,
				type: 'ccp',
				controls: [firstQubit(inp), firstQubit(other)],
				target: firstQubit(out),
				angle: 'pi/2',
				lowering,
				...(lowering === 'ancilla' && anc ? { ancilla: firstQubit(anc.name) } : {})
			};
		}
		default:
			if (kind.startsWith('call-')) return { id, type: 'call', block: kind.slice(5), args: {} };
			if (kind === 'gate-reset') return { id, type: 'gate', gate: 'reset', qubits: [{ register: pick(regs, 'ancilla'), index: 0 }] };
			return gateFromName(kind.slice(5) as GateName, id, inp, other, out);
	}
}

/**
 * A modular part with numbers that fit the document: the Fourier register is the largest
 * output/work register (n+1 qubits), N the largest odd number below 2^n, a = 2 (or 1).
 */
function modularFromPart(kind: 'mod-add' | 'mod-mul' | 'mod-mul-inplace' | 'mod-exp', id: string, doc: CircuitDocument): BodyItem {
	const regs = doc.registers;
	const anc = regs.find((r) => r.role === 'ancilla') ?? regs[regs.length - 1];
	const ancilla = { register: anc.name, index: 0 };
	const data = regs.filter((r) => r !== anc);
	const fourier = [...data].sort((x, y) => y.size - x.size || (x.role === 'output' || x.role === 'work' ? -1 : 1))[0] ?? regs[0];
	const n = Math.max(1, fourier.size - 1);
	const N = Math.max(2, 2 ** n - 1);
	const a = N > 2 ? 2 : 1;
	const rest = data.filter((r) => r !== fourier);
	const x = rest.find((r) => r.size === n) ?? rest[0] ?? fourier;
	const other = rest.find((r) => r !== x) ?? x;
	const numbers = { value: String(a), modulus: String(N), ancilla };
	switch (kind) {
		case 'mod-add':
			return { id, type: 'mod-add', target: fourier.name, ...numbers };
		case 'mod-mul':
			return { id, type: 'mod-mul', x: x.name, target: fourier.name, ...numbers };
		case 'mod-mul-inplace':
			return { id, type: 'mod-mul-inplace', x: x.name, work: fourier.name, ...numbers };
		case 'mod-exp':
			return { id, type: 'mod-exp', exponent: other.name, y: x.name, work: fourier.name, ...numbers };
	}
}

function gateFromName(g: GateName, id: string, a: string, b: string, out: string): BodyItem {
	const q = (r: string, i = 0) => ({ register: r, index: i });
	switch (g) {
		case 'h':
		case 'x':
			return { id, type: 'gate', gate: g, qubits: [q(out)] };
		case 'p':
		case 'rz':
			return { id, type: 'gate', gate: g, qubits: [q(out)], angle: 'pi/4' };
		case 'cx':
		case 'swap':
			return { id, type: 'gate', gate: g, qubits: [q(a), q(out)] };
		case 'cp':
			return { id, type: 'gate', gate: g, qubits: [q(a), q(out)], angle: 'pi/2' };
		case 'ccx':
			return { id, type: 'gate', gate: g, qubits: [q(a), q(b), q(out)] };
		case 'mcp':
			return { id, type: 'gate', gate: g, qubits: [q(a), q(b), q(out)], angle: 'pi/4' };
		default:
			return { id, type: 'gate', gate: 'u', qubits: [q(out)], matrix: [[[1, 0], [0, 0]], [[0, 0], [1, 0]]] };
	}
}

/** One-line description of a body item for the strip. */
export function describeItem(item: BodyItem): string {
	const qr = (r: { register: string; index: number | string }) => `${r.register}[${r.index}]`;
	switch (item.type) {
		case 'gate':
			return `${item.gate === 'mcp' ? gateDisplayName('mcp', item.qubits.length - 1) : item.gate}${item.angle ? `(${item.angle})` : ''} ${item.qubits.map(qr).join(', ')}`;
		case 'qft':
		case 'iqft':
			return `${item.type === 'qft' ? 'QFT' : 'inverse QFT'} on ${item.register}${item.swaps === false ? ', no swaps' : ''}${item.approx !== undefined ? `, keep R_k for k ≤ ${item.approx}` : ''}`;
		case 'add': {
			const sh = item.shift ? `2^${item.shift}·` : '';
			const c = item.control ? `if ${qr(item.control)}: ` : '';
			return `${c}${item.target} += ${sh}${item.addend}`;
		}
		case 'add-const': {
			const sh = item.shift ? `2^${item.shift}·` : '';
			const c = item.control ? `if ${qr(item.control)}: ` : '';
			return `${c}${item.target} += ${sh}${item.value}`;
		}
		case 'multiply':
			return `${item.product} += ${item.a}·${item.b}${item.ccpLowering ? ` (${item.ccpLowering})` : ''}`;
		case 'ccp':
			return `cc-phase(${item.angle}) ${qr(item.controls[0])}, ${qr(item.controls[1])} → ${qr(item.target)} · ${item.lowering ?? 'native'}`;
		case 'call':
			return `${item.block}(${Object.entries(item.args).map(([k, v]) => `${k}=${v}`).join(', ')})`;
		case 'mod-add': {
			const c = item.controls?.length ? `if ${item.controls.map(qr).join('·')}: ` : '';
			return `${c}${item.target} ← (${item.target} + ${item.value}) mod ${item.modulus} · ancilla ${qr(item.ancilla)}`;
		}
		case 'mod-mul': {
			const c = item.control ? `if ${qr(item.control)}: ` : '';
			return `${c}${item.target} ← (${item.target} + ${item.value}·${item.x}) mod ${item.modulus}`;
		}
		case 'mod-mul-inplace': {
			const c = item.control ? `if ${qr(item.control)}: ` : '';
			return `${c}${item.x} ← ${item.value}·${item.x} mod ${item.modulus} · work ${item.work}`;
		}
		case 'mod-exp':
			return `${item.y} ← ${item.value}^${item.exponent}·${item.y} mod ${item.modulus} · work ${item.work}`;
	}
}

/** Short kind tag for the strip card. */
export function itemTag(item: BodyItem): string {
	switch (item.type) {
		case 'gate':
			return item.gate;
		case 'qft':
			return 'QFT';
		case 'iqft':
			return 'QFT⁻¹';
		case 'add':
			return item.control ? (item.shift ? 'c-shift-add' : 'c-add') : item.shift ? 'shift-add' : 'add';
		case 'add-const':
			return '+k';
		case 'multiply':
			return 'mul';
		case 'ccp':
			return 'cc-phase';
		case 'call':
			return 'block';
		case 'mod-add':
			return '+a mod N';
		case 'mod-mul':
			return '+a·x mod N';
		case 'mod-mul-inplace':
			return '×a mod N';
		case 'mod-exp':
			return 'a^e mod N';
	}
}
