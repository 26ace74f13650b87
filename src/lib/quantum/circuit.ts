/**
 * Circuit model: the editable document (what the workbench and the OpenQASM importer produce)
 * and the lowered circuit (flat gate list the engines run).
 *
 * Qubit order everywhere: within a register, index 0 is the least-significant bit and the
 * register's value is Σ bit_i·2^i. In a lowered circuit registers are laid out one after another
 * in document order, so flat qubit = register.offset + index. In state vectors flat qubit q is
 * bit q of the basis-state index (little-endian).
 *
 * Angle units: documents hold angle strings (radian expressions, or `"... turn"`); lowered
 * gates hold {@link Angle} values in turns.
 */
import type { Angle } from './angle.js';

// ----------------------------------------------------------------------------------------------
// Document

/** Format tag of a circuit document. */
export const CIRCUIT_FORMAT = 'orrery.circuit';
/** Current document version. */
export const CIRCUIT_VERSION = 1;

/** Purpose of a register; `ancilla` registers must start and end in |0⟩ (qubit order: index 0 = LSB). */
export type RegisterRole = 'input' | 'output' | 'ancilla' | 'work';

/** A named register of `size` qubits; index 0 is the least-significant bit. */
export interface RegisterSpec {
	name: string;
	size: number;
	role?: RegisterRole;
}

/** An integer written literally or as the name of an `int` parameter of the enclosing user block. */
export type IntRef = number | string;

/** A qubit of a named register (index 0 = LSB). Inside user blocks `register` may name a register parameter, `index` an int parameter. */
export interface QubitRef {
	register: string;
	index: IntRef;
}

/** Where an item came from in an imported source file (1-based line and column). */
export interface SourcePosition {
	line: number;
	column: number;
}

/**
 * Primitive gate names. Qubit argument order is controls first, then target(s), as in OpenQASM.
 * `reset` is not a gate but a checked claim: "this qubit is |0⟩ here" (OpenQASM `reset` on an
 * ancilla). When the claim holds it changes nothing; a run where the qubit could be found 1 there
 * fails, naming the line. Engines never apply a real (non-unitary) reset.
 */
export type GateName = 'h' | 'x' | 'cx' | 'ccx' | 'swap' | 'p' | 'cp' | 'mcp' | 'rz' | 'u' | 'reset';

/** A complex number as [re, im]. */
export type ComplexPair = [number, number];
/** A 2×2 complex matrix, row-major: [[m00, m01], [m10, m11]]. */
export type Matrix2 = [[ComplexPair, ComplexPair], [ComplexPair, ComplexPair]];

/** Common fields of every body item. `id` is stable across edits (the workbench keys items by it). */
export interface BodyItemBase {
	id: string;
	label?: string;
	source?: SourcePosition;
}

/**
 * A primitive gate. `qubits` are controls first, then the target (swap: two targets).
 * `angle` (p, cp, mcp, rz) is a radian expression or `"<expr> turn"`; `matrix` (u) is a unitary.
 */
export interface GateItem extends BodyItemBase {
	type: 'gate';
	gate: GateName;
	qubits: QubitRef[];
	angle?: string;
	matrix?: Matrix2;
}

/**
 * Layout of a register in the Fourier basis holding value x (n qubits):
 * - `swapped` (QFT with final swaps, the exact DFT): qubit i has level m = n − i,
 *   i.e. phase x/2^(n−i) turn; the MSB qubit holds x_0/2, the LSB qubit x/2^n.
 * - `unswapped` (QFT without swaps): qubit i has level m = i + 1, phase x/2^(i+1) turn.
 */
export type FourierLayout = 'swapped' | 'unswapped';

/** How a doubly controlled phase ccp(θ) is lowered (angles in turns internally). */
export type CcpLowering = 'native' | 'ancilla' | 'no-ancilla' | 'quarter';

/** QFT / inverse QFT on a register. `approx` = k keeps only rotations R_d with d ≤ k (angle 1/2^d turn). */
export interface QftItem extends BodyItemBase {
	type: 'qft' | 'iqft';
	register: string;
	swaps?: boolean; // default true (exact DFT, layout `swapped`)
	approx?: IntRef;
}

/**
 * Fourier adder: target (already in the Fourier basis, with `layout`) += 2^shift · addend,
 * modulo 2^n(target); with `control`, only when that qubit is 1 (then rotations are ccp).
 */
export interface AddItem extends BodyItemBase {
	type: 'add';
	/** Register added into the target (computational basis, unchanged). */
	addend: string;
	target: string;
	shift?: IntRef;
	control?: QubitRef;
	layout?: FourierLayout; // default 'unswapped'
	ccpLowering?: CcpLowering;
	ancilla?: QubitRef;
}

/** Fourier constant adder: target (Fourier basis) += 2^shift · value mod 2^n; `value` is a decimal integer string (may be negative). */
export interface AddConstItem extends BodyItemBase {
	type: 'add-const';
	target: string;
	value: string;
	shift?: IntRef;
	control?: QubitRef;
	layout?: FourierLayout;
}

/**
 * Multiplier: product += a·b mod 2^n(product), with `product` in the computational basis before
 * and after (the block applies its own QFT (no swaps) and inverse QFT around n(a) controlled
 * shifted adds of b). Every rotation is a ccp(a_i, b_k → product_j), lowered by `ccpLowering`.
 */
export interface MultiplyItem extends BodyItemBase {
	type: 'multiply';
	a: string;
	b: string;
	product: string;
	ccpLowering?: CcpLowering;
	ancilla?: QubitRef;
}

/** Doubly controlled phase diag(1,1,1,1,1,1,1,e^{iθ}) on (c1, c2, target) with a chosen lowering. */
export interface CcpItem extends BodyItemBase {
	type: 'ccp';
	controls: [QubitRef, QubitRef];
	target: QubitRef;
	angle: string;
	lowering?: CcpLowering;
	ancilla?: QubitRef;
}

/** Call of a user-defined block; `args` bind its parameters (register names, integers, angle strings). */
export interface CallItem extends BodyItemBase {
	type: 'call';
	block: string;
	args: Record<string, string | number>;
}

/**
 * Fields shared by the modular parts (Beauregard 2003, quant-ph/0205095). `value` (a) and
 * `modulus` (N) are decimal integer strings; the Fourier register has n+1 qubits with N < 2^n;
 * `ancilla` is the comparison qubit (starts and ends in |0⟩). Doubly controlled rotations use
 * `ccpLowering` (`ccpAncilla`: the spare qubit of the `ancilla` lowering). `approx` = k keeps
 * only QFT rotations R_d with d ≤ k inside the part.
 */
export interface ModularFields {
	value: string;
	modulus: string;
	ancilla: QubitRef;
	ccpLowering?: CcpLowering;
	ccpAncilla?: QubitRef;
	approx?: IntRef;
}

/**
 * Modular adder of a constant (Fig. 5): target (Fourier basis, n+1 qubits, `layout`) ←
 * (target + a) mod N when every control is 1 (0, 1 or 2 controls). Correct for target < N.
 */
export interface ModAddItem extends BodyItemBase, ModularFields {
	type: 'mod-add';
	target: string;
	controls?: QubitRef[];
	layout?: FourierLayout;
}

/**
 * Modular multiplier, out of place (Fig. 6): target (computational, n+1 qubits) ←
 * (target + a·x) mod N when the control is 1. Correct for target < N, any x of n qubits.
 */
export interface ModMulItem extends BodyItemBase, ModularFields {
	type: 'mod-mul';
	x: string;
	target: string;
	control?: QubitRef;
}

/**
 * Modular multiplier in place (Fig. 7): x ← a·x mod N when the control is 1, through `work`
 * (n+1 qubits, starts and ends at 0), a controlled swap and the inverse multiplier by a⁻¹ mod N.
 * Needs gcd(a, N) = 1; correct for x < N.
 */
export interface ModMulInPlaceItem extends BodyItemBase, ModularFields {
	type: 'mod-mul-inplace';
	x: string;
	work: string;
	control?: QubitRef;
}

/**
 * Modular exponentiation: y ← a^e·y mod N, one controlled in-place multiplier by a^(2^i) mod N
 * per bit i of `exponent`; `work` (n+1 qubits) and the ancilla start and end at 0. Correct for y < N.
 */
export interface ModExpItem extends BodyItemBase, ModularFields {
	type: 'mod-exp';
	exponent: string;
	y: string;
	work: string;
}

/** Modular parts, by item type. */
export type ModularItem = ModAddItem | ModMulItem | ModMulInPlaceItem | ModExpItem;

/** One item of a circuit body. */
export type BodyItem = GateItem | QftItem | AddItem | AddConstItem | MultiplyItem | CcpItem | CallItem | ModularItem;

/** Kind of a user-block parameter: a register name, an integer, or an angle string. */
export type BlockParamKind = 'register' | 'int' | 'angle';

/** A parameter of a user-defined block. */
export interface BlockParam {
	name: string;
	kind: BlockParamKind;
}

/** A user-defined block: body items referring to parameters, lowered by substitution. */
export interface UserBlock {
	name: string;
	params: BlockParam[];
	body: BodyItem[];
	description?: string;
}

/** Document-wide defaults. */
export interface CircuitDefaults {
	ccpLowering?: CcpLowering;
	layout?: FourierLayout;
}

/** The versioned circuit document. Qubits are {register, index} with index 0 = LSB; angles are strings (radians or `"… turn"`). */
export interface CircuitDocument {
	format: typeof CIRCUIT_FORMAT;
	version: typeof CIRCUIT_VERSION;
	title: string;
	description?: string;
	registers: RegisterSpec[];
	body: BodyItem[];
	blocks?: UserBlock[];
	defaults?: CircuitDefaults;
	/**
	 * What the circuit must compute, as `OUT = EXPR` over the input registers' start values
	 * (`b = b + c*a mod 16`). Used by checks, and for expected angles in hand-written sections.
	 */
	specs?: string[];
	/**
	 * The domain of the specs: conditions over the input registers' start values that every
	 * checked input satisfies (`b < 13`, `x < N`), as mathjs expressions. Empty or absent: every
	 * basis input. Checks (proof and sweep) cover exactly the inputs that satisfy all of them.
	 */
	assume?: string[];
	/**
	 * How the registers were named over the qubits of an imported file (`qasm/register-map.ts`):
	 * `{ name: 'x', qubits: 'q[15:-1:0]' }` = x's bit 0 is the file's q[15]. The body already
	 * refers to the mapped registers; this is kept for display and re-export.
	 */
	registerMap?: { name: string; qubits: string }[];
}

// ----------------------------------------------------------------------------------------------
// Lowered circuit

/** Gate kinds in a lowered circuit (codes stored in `LoweredCircuit.kinds`). */
export const GATE_KINDS = ['h', 'x', 'cx', 'ccx', 'swap', 'p', 'cp', 'mcp', 'rz', 'u', 'mcx', 'reset'] as const;
/** A lowered gate kind. `mcx` is X with any number of controls; `reset` is the checked claim "this qubit is |0⟩ here". */
export type GateKind = (typeof GATE_KINDS)[number];
/** Numeric code of each gate kind. */
export const GateCode = {
	h: 0,
	x: 1,
	cx: 2,
	ccx: 3,
	swap: 4,
	p: 5,
	cp: 6,
	mcp: 7,
	rz: 8,
	u: 9,
	mcx: 10,
	reset: 11
} as const satisfies Record<GateKind, number>;

/** A register placed in the flat qubit space: flat qubit = offset + index (index 0 = LSB). */
export interface PlacedRegister extends RegisterSpec {
	offset: number;
}

/**
 * Symbolic value an effect writes, evaluated over register values (BigInt) at the block's entry.
 * `bit` reads one qubit of a register (0/1); `bits` is (value >> lo) mod 2^len.
 */
export type ValueExpr =
	| { op: 'reg'; name: string }
	| { op: 'const'; value: string }
	| { op: 'bit'; register: string; index: number }
	| { op: 'bits'; of: ValueExpr; lo: number; len: number }
	| { op: 'add'; terms: ValueExpr[] }
	| { op: 'mul'; factors: ValueExpr[] }
	| { op: 'shl'; of: ValueExpr; by: number }
	| { op: 'mod'; of: ValueExpr; modulus: string }
	| { op: 'powmod'; base: string; exp: ValueExpr; modulus: string };

/** What a register holds after a block: `value` mod 2^size, in the computational or Fourier basis. */
export interface RegisterWrite {
	register: string;
	basis: 'computational' | 'fourier';
	layout?: FourierLayout;
	value: ValueExpr;
}

/** The stated effect of a library block: human text plus machine-evaluable register writes. */
export interface BlockEffect {
	text: string;
	writes: RegisterWrite[];
	/** Registers the block requires in a given basis on entry (for checks and expectations). */
	requires: { register: string; basis: 'computational' | 'fourier'; layout?: FourierLayout }[];
}

/** Kind of a block instance in a lowered circuit. */
export type BlockKind = 'qft' | 'iqft' | 'add' | 'add-const' | 'multiply' | 'ccp' | 'call' | 'mod-add' | 'mod-mul' | 'mod-mul-inplace' | 'mod-exp';

/**
 * Kind-specific parameters of a lowered library block, in flat-qubit and register terms; used by
 * the expectation pass to state partial sums inside the block.
 */
export type BlockSpec =
	| { kind: 'qft' | 'iqft'; register: string; swaps: boolean; approx: number }
	| {
			kind: 'add';
			addend: string;
			target: string;
			shift: number;
			control: number | null;
			layout: FourierLayout;
	  }
	| {
			kind: 'add-const';
			target: string;
			value: string;
			shift: number;
			control: number | null;
			layout: FourierLayout;
			/** Every control when there are two (then `control` is the first). */
			controls?: number[];
			/** Inside a modular adder: what the target holds afterwards, in words ("b + a − N"). */
			holds?: string;
	  }
	| {
			kind: 'mod-add';
			target: string;
			value: string;
			modulus: string;
			controls: number[];
			ancilla: number;
			layout: FourierLayout;
			/** True for the inverse (b ← b − a mod N), used by the in-place multiplier. */
			inverse: boolean;
			/** Gate indices of the CNOT that copies the sign into the ancilla, and of the one that clears it. */
			compareGate: number;
			clearGate: number;
	  }
	| { kind: 'mod-mul'; x: string; target: string; value: string; modulus: string; control: number | null; inverse: boolean }
	| { kind: 'mod-mul-inplace'; x: string; work: string; value: string; inverseValue: string; modulus: string; control: number | null }
	| { kind: 'mod-exp'; exponent: string; y: string; work: string; value: string; modulus: string }
	| { kind: 'multiply'; a: string; b: string; product: string }
	| { kind: 'ccp'; controls: [number, number]; target: number; angle: Angle; lowering: CcpLowering; ancilla: number | null }
	| { kind: 'call'; block: string; args: Record<string, string | number> };

/** One block instance: gates [start, end) of the lowered circuit, nested via `parent`. */
export interface BlockInstance {
	/** Index in `LoweredCircuit.blocks` (pre-order, so parents precede children). */
	index: number;
	parent: number; // −1 for top level
	depth: number;
	/** Body item id that produced it (for nested library blocks, `<parent item id>/<local>`). */
	itemId: string;
	kind: BlockKind;
	label: string;
	start: number;
	end: number;
	/** Names of the loop variables recorded per gate in `LoweredCircuit.loops` (up to 3). */
	loopNames: string[];
	/** Loop indices fixed for the whole instance (e.g. {i} for the i-th add of a multiplier). */
	loopContext?: Record<string, number>;
	effect?: BlockEffect;
	spec: BlockSpec;
	source?: SourcePosition;
}

/** Provenance of one lowered gate, in full (built on demand by `gateProvenance`). */
export interface Provenance {
	/** Innermost block instance index, −1 if the gate is a top-level body gate. */
	block: number;
	blockId: string | null;
	blockKind: BlockKind | null;
	/** Item ids of enclosing blocks, outermost first, then the gate's own item id. */
	path: string[];
	itemId: string;
	loop: Record<string, number>;
	source?: SourcePosition;
}

/**
 * A lowered circuit as plain struct-of-arrays (postMessage-friendly, ~40 bytes per gate).
 * Gate g: kind code `kinds[g]`; qubits `qubitList[qubitStart[g] .. qubitStart[g+1])`, of which the
 * first `controlCounts[g]` are controls and the rest targets; angle `angles[angleIndex[g]]` (turns,
 * −1 = none); matrix `matrices[matrixIndex[g]]` for u; `blockOf[g]` innermost block instance;
 * `loops[3g..3g+2]` loop indices (−1 = unused) named by the block's `loopNames`; `itemOf[g]`
 * index into `itemIds` of the body item that emitted the gate.
 */
export interface LoweredCircuit {
	title: string;
	qubitCount: number;
	registers: PlacedRegister[];
	gateCount: number;
	kinds: Uint8Array;
	controlCounts: Uint8Array;
	qubitStart: Int32Array;
	qubitList: Int32Array;
	angleIndex: Int32Array;
	angles: Angle[];
	matrixIndex: Int32Array;
	matrices: Matrix2[];
	blockOf: Int32Array;
	loops: Int32Array;
	itemOf: Int32Array;
	itemIds: string[];
	itemSources: (SourcePosition | null)[];
	blocks: BlockInstance[];
}

/** A friendly view of one lowered gate (flat qubit indices; angle in turns). */
export interface GateView {
	index: number;
	kind: GateKind;
	controls: number[];
	targets: number[];
	angle: Angle | null;
	matrix: Matrix2 | null;
}

/** Limits applied while lowering. */
export interface LoweringLimits {
	maxQubits: number;
	maxGates: number;
	/** User-block calls expanded (a call whose block makes no gate still counts: issue 10). */
	maxCalls: number;
}

/** Most items a document's body holds (the schema's bound; the importer names the line that crosses it). */
export const MAX_BODY_ITEMS = 100_000;

/** Default limits: 4096 qubits, 8 million lowered gates, 100 000 expanded block calls. */
export const DEFAULT_LIMITS: LoweringLimits = { maxQubits: 4096, maxGates: 8_000_000, maxCalls: 100_000 };

/** Read gate `index` of a lowered circuit as a {@link GateView} (flat qubits, angle in turns). */
export function gateAt(c: LoweredCircuit, index: number): GateView {
	if (index < 0 || index >= c.gateCount) throw new RangeError(`gate ${index} out of range 0..${c.gateCount - 1}`);
	const s = c.qubitStart[index];
	const e = c.qubitStart[index + 1];
	const nc = c.controlCounts[index];
	const controls: number[] = [];
	const targets: number[] = [];
	for (let i = s; i < e; i++) (i - s < nc ? controls : targets).push(c.qubitList[i]);
	const ai = c.angleIndex[index];
	const mi = c.matrixIndex[index];
	return {
		index,
		kind: GATE_KINDS[c.kinds[index]],
		controls,
		targets,
		angle: ai >= 0 ? c.angles[ai] : null,
		matrix: mi >= 0 ? c.matrices[mi] : null
	};
}

/** Full provenance of gate `index`: block path, loop indices, source position. */
export function gateProvenance(c: LoweredCircuit, index: number): Provenance {
	const b = c.blockOf[index];
	const path: string[] = [];
	const loop: Record<string, number> = {};
	let source: SourcePosition | undefined;
	const itemId = c.itemIds[c.itemOf[index]];
	const itemSource = c.itemSources[c.itemOf[index]];
	if (itemSource) source = itemSource;
	for (let k = b; k >= 0; k = c.blocks[k].parent) {
		path.unshift(c.blocks[k].itemId);
		const ctx = c.blocks[k].loopContext;
		if (ctx) for (const key of Object.keys(ctx)) loop[key] = ctx[key];
		if (!source && c.blocks[k].source) source = c.blocks[k].source;
	}
	if (b >= 0) {
		const names = c.blocks[b].loopNames;
		for (let i = 0; i < names.length; i++) {
			const v = c.loops[3 * index + i];
			if (v >= 0) loop[names[i]] = v;
		}
	}
	if (!path.includes(itemId)) path.push(itemId);
	return {
		block: b,
		blockId: b >= 0 ? c.blocks[b].itemId : null,
		blockKind: b >= 0 ? c.blocks[b].kind : null,
		path,
		itemId,
		loop,
		...(source ? { source } : {})
	};
}

/** Flat qubit index of register `name`, bit `index` (index 0 = LSB). */
export function flatQubit(c: { registers: PlacedRegister[] }, name: string, index: number): number {
	const r = c.registers.find((x) => x.name === name);
	if (!r) throw new RangeError(`unknown register "${name}"`);
	if (index < 0 || index >= r.size) throw new RangeError(`qubit ${name}[${index}] out of range (size ${r.size})`);
	return r.offset + index;
}

/**
 * Flat qubit `q` in the user's words, `reg[i]` (register `reg`, index i, index 0 = LSB); `q<n>`
 * for a qubit outside every register. The one label every screen, message and report uses.
 */
/** Every qubit's label, indexed by flat qubit (`reg[i]`; a gap between registers reads `q7`). */
export function qubitLabels(registers: readonly Pick<PlacedRegister, 'name' | 'size' | 'offset'>[]): string[] {
	const out: string[] = [];
	for (const r of registers) for (let i = 0; i < r.size; i++) out[r.offset + i] = `${r.name}[${i}]`;
	for (let q = 0; q < out.length; q++) out[q] ??= `q${q}`;
	return out;
}

export function qubitLabel(registers: readonly PlacedRegister[], q: number): string {
	for (const r of registers) if (q >= r.offset && q < r.offset + r.size) return `${r.name}[${q - r.offset}]`;
	return `q${q}`;
}

/**
 * Fourier level m of qubit `index` of an n-qubit register in `layout` (the qubit holds phase
 * x/2^m turn for value x): swapped → n − index, unswapped → index + 1.
 */
export function fourierLevel(layout: FourierLayout, n: number, index: number): number {
	return layout === 'swapped' ? n - index : index + 1;
}

/**
 * A gate's name in the user's words: the saved format keeps `mcp` and `mcx`, screens say
 * "doubly controlled phase" or "3-controlled phase". Qubit order and angles are not involved.
 */
export function gateDisplayName(kind: string, controls: number): string {
	if (kind === 'mcp') return controls === 2 ? 'doubly controlled phase' : `${controls}-controlled phase`;
	if (kind === 'mcx') return controls === 2 ? 'Toffoli' : `${controls}-controlled X`;
	if (kind === 'reset') return 'reset (must be |0⟩)';
	return kind;
}
