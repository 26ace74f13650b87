/**
 * Lowering: circuit document → {@link LoweredCircuit} (flat qubits, gates with provenance, block
 * instances with their stated effects).
 *
 * Conventions (qubit order: index 0 = LSB; flat qubit = register offset + index; angles in turns):
 * - QFT (no swaps), time order: for i = n−1 … 0: H(q_i), then for k = i−1 … 0: cp(q_k → q_i,
 *   1/2^(i−k+1) turn). Afterwards qubit i holds x/2^(i+1) turn (layout `unswapped`, level i+1).
 *   With swaps, swap(q_l, q_(n−1−l)) for l < ⌊n/2⌋ follows and qubit i holds x/2^(n−i) turn
 *   (layout `swapped`, level n−i); the whole circuit is then exactly the DFT
 *   F|x⟩ = Σ_k ω^(xk)|k⟩/√N with k read little-endian.
 * - Inverse QFT is the exact reverse with negated angles.
 * - Fourier add b += 2^t·a: for each target qubit j (level m) and each source bit k with
 *   k + t < m, a rotation by 1/2^(m−k−t) turn controlled by a_k (and by the add's control, which
 *   makes it a doubly controlled phase lowered by `ccpLowering`).
 */
import { dyadic, halveAngle, negateAngle, parseAngle, angleKey, ZERO_ANGLE } from './angle.js';
import type { Angle, AngleScope } from './angle.js';
import {
	DEFAULT_LIMITS,
	GateCode,
	fourierLevel,
	type BlockEffect,
	type BlockInstance,
	type BlockKind,
	type BlockSpec,
	type BodyItem,
	type CcpLowering,
	type CircuitDocument,
	type FourierLayout,
	type IntRef,
	type LoweredCircuit,
	type LoweringLimits,
	type Matrix2,
	type PlacedRegister,
	type QubitRef,
	type SourcePosition,
	type UserBlock,
	type ValueExpr
} from './circuit.js';
import { readCircuitDocument } from './schema.js';
import { checkModularParameters, modInverse, multiplierConstants, powMod } from './modular.js';
import type { ModularItem } from './circuit.js';

/** Options of {@link lowerCircuit}. */
export interface LoweringOptions {
	limits?: Partial<LoweringLimits>;
	/** Overrides the document's default ccp lowering for items that do not set one. */
	ccpLowering?: CcpLowering;
	/** Skip schema validation (the caller already validated). */
	trusted?: boolean;
}

/** Error thrown by lowering; `path` is the JSON path of the item at fault. */
export class LoweringError extends Error {
	constructor(
		message: string,
		readonly path: string
	) {
		super(`${path}: ${message}`);
		this.name = 'LoweringError';
	}
}

class Int32Grow {
	data: Int32Array;
	length = 0;
	constructor(cap = 1024) {
		this.data = new Int32Array(cap);
	}
	push(v: number): void {
		if (this.length === this.data.length) {
			const d = new Int32Array(this.data.length * 2);
			d.set(this.data);
			this.data = d;
		}
		this.data[this.length++] = v;
	}
	finish(): Int32Array {
		return this.data.slice(0, this.length);
	}
}
class Uint8Grow {
	data: Uint8Array;
	length = 0;
	constructor(cap = 1024) {
		this.data = new Uint8Array(cap);
	}
	push(v: number): void {
		if (this.length === this.data.length) {
			const d = new Uint8Array(this.data.length * 2);
			d.set(this.data);
			this.data = d;
		}
		this.data[this.length++] = v;
	}
	finish(): Uint8Array {
		return this.data.slice(0, this.length);
	}
}

/** Accumulates gates as struct-of-arrays, tagging each with the current block, item and loop indices. */
class GateSink {
	kinds = new Uint8Grow();
	controlCounts = new Uint8Grow();
	qubitStart = new Int32Grow();
	qubitList = new Int32Grow();
	angleIndex = new Int32Grow();
	matrixIndex = new Int32Grow();
	blockOf = new Int32Grow();
	loops = new Int32Grow();
	itemOf = new Int32Grow();
	angles: Angle[] = [];
	angleTable = new Map<string, number>();
	matrices: Matrix2[] = [];
	itemIds: string[] = [];
	itemSources: (SourcePosition | null)[] = [];
	blocks: BlockInstance[] = [];
	count = 0;
	block = -1;
	item = -1;
	l0 = -1;
	l1 = -1;
	l2 = -1;
	path = 'body';
	constructor(readonly maxGates: number) {
		this.qubitStart.push(0);
	}
	angleId(a: Angle): number {
		const key = angleKey(a);
		let id = this.angleTable.get(key);
		if (id === undefined) {
			id = this.angles.length;
			this.angles.push(a);
			this.angleTable.set(key, id);
		}
		return id;
	}
	private head(kind: number, controls: number, angle: number, matrix: number): void {
		if (this.count >= this.maxGates)
			throw new LoweringError(`lowered circuit exceeds the limit of ${this.maxGates} gates`, this.path);
		this.kinds.push(kind);
		this.controlCounts.push(controls);
		this.angleIndex.push(angle);
		this.matrixIndex.push(matrix);
		this.blockOf.push(this.block);
		this.itemOf.push(this.item);
		this.loops.push(this.l0);
		this.loops.push(this.l1);
		this.loops.push(this.l2);
		this.count++;
	}
	g1(kind: number, q: number, angle = -1, matrix = -1): void {
		this.head(kind, 0, angle, matrix);
		this.qubitList.push(q);
		this.qubitStart.push(this.qubitList.length);
	}
	g2(kind: number, controls: number, a: number, b: number, angle = -1): void {
		if (a === b) throw new LoweringError(`gate uses qubit ${a} twice`, this.path);
		this.head(kind, controls, angle, -1);
		this.qubitList.push(a);
		this.qubitList.push(b);
		this.qubitStart.push(this.qubitList.length);
	}
	g3(kind: number, a: number, b: number, c: number, angle = -1): void {
		if (a === b || a === c || b === c) throw new LoweringError(`gate uses a qubit twice (${a}, ${b}, ${c})`, this.path);
		this.head(kind, 2, angle, -1);
		this.qubitList.push(a);
		this.qubitList.push(b);
		this.qubitList.push(c);
		this.qubitStart.push(this.qubitList.length);
	}
	gN(kind: number, controls: number[], target: number, angle = -1): void {
		if (new Set([...controls, target]).size !== controls.length + 1) throw new LoweringError('gate uses a qubit twice', this.path);
		if (controls.length > 255) throw new LoweringError('at most 255 controls per gate', this.path);
		this.head(kind, controls.length, angle, -1);
		for (const c of controls) this.qubitList.push(c);
		this.qubitList.push(target);
		this.qubitStart.push(this.qubitList.length);
	}
	open(kind: BlockKind, itemId: string, label: string, spec: BlockSpec, effect: BlockEffect | undefined, loopNames: string[], source?: SourcePosition): number {
		const index = this.blocks.length;
		const parent = this.block;
		this.blocks.push({
			index,
			parent,
			depth: parent >= 0 ? this.blocks[parent].depth + 1 : 0,
			itemId,
			kind,
			label,
			start: this.count,
			end: this.count,
			loopNames,
			...(effect ? { effect } : {}),
			spec,
			...(source ? { source } : {})
		});
		this.block = index;
		return index;
	}
	close(index: number): void {
		this.blocks[index].end = this.count;
		this.block = this.blocks[index].parent;
		this.l0 = this.l1 = this.l2 = -1;
	}
}

interface Env {
	/** parameter → actual register name */
	regs: Map<string, string>;
	ints: Map<string, number>;
	angles: Map<string, Angle>;
	prefix: string;
	depth: number;
}

const reg = (name: string): ValueExpr => ({ op: 'reg', name });

/**
 * Lower a circuit document (validated first unless `trusted`) to a flat {@link LoweredCircuit}.
 * Qubit order: flat = register offset + index (index 0 = LSB); gate angles in turns.
 */
export function lowerCircuit(input: CircuitDocument | unknown, options: LoweringOptions = {}): LoweredCircuit {
	const doc = options.trusted ? (input as CircuitDocument) : readCircuitDocument(input);
	const limits = { ...DEFAULT_LIMITS, ...options.limits };
	const registers: PlacedRegister[] = [];
	let offset = 0;
	for (const r of doc.registers) {
		registers.push({ ...r, offset });
		offset += r.size;
	}
	if (offset > limits.maxQubits) throw new LoweringError(`${offset} qubits exceeds the limit of ${limits.maxQubits}`, 'registers');
	const regByName = new Map(registers.map((r) => [r.name, r]));
	const userBlocks = new Map((doc.blocks ?? []).map((b) => [b.name, b]));
	const defaultCcp: CcpLowering = options.ccpLowering ?? doc.defaults?.ccpLowering ?? 'native';
	const defaultLayout: FourierLayout = doc.defaults?.layout ?? 'unswapped';
	const ancillaReg = registers.find((r) => r.role === 'ancilla');
	const sink = new GateSink(limits.maxGates);
	let calls = 0;

	const regOf = (name: string, env: Env, path: string): PlacedRegister => {
		const actual = env.regs.get(name) ?? name;
		const r = regByName.get(actual);
		if (!r) throw new LoweringError(`unknown register "${name}"`, path);
		return r;
	};
	const intOf = (v: IntRef | undefined, dflt: number, env: Env, path: string): number => {
		if (v === undefined) return dflt;
		if (typeof v === 'number') return v;
		const x = env.ints.get(v);
		if (x === undefined) throw new LoweringError(`"${v}" is not an int parameter here`, path);
		return x;
	};
	const qubitOf = (q: QubitRef, env: Env, path: string): number => {
		const r = regOf(q.register, env, `${path}.register`);
		const i = intOf(q.index, 0, env, `${path}.index`);
		if (i < 0 || i >= r.size) throw new LoweringError(`index ${i} out of range for register "${r.name}" of size ${r.size}`, `${path}.index`);
		return r.offset + i;
	};
	const scopeOf = (env: Env): AngleScope => {
		const s: AngleScope = {};
		for (const [k, v] of env.ints) s[k] = { int: BigInt(v) };
		for (const [k, v] of env.angles) s[k] = { angle: v };
		return s;
	};
	const angleOf = (text: string, env: Env, path: string): Angle => {
		try {
			return parseAngle(text, scopeOf(env));
		} catch (e) {
			throw new LoweringError((e as Error).message, path);
		}
	};
	const ancillaOf = (q: QubitRef | undefined, lowering: CcpLowering, env: Env, path: string): number | null => {
		if (lowering !== 'ancilla') return null;
		if (q) return qubitOf(q, env, `${path}.ancilla`);
		if (!ancillaReg) throw new LoweringError('ccp lowering "ancilla" needs an ancilla qubit: set `ancilla` or add a register with role "ancilla"', path);
		return ancillaReg.offset;
	};
	const registerItem = (id: string, source: SourcePosition | undefined): void => {
		sink.item = sink.itemIds.length;
		sink.itemIds.push(id);
		sink.itemSources.push(source ?? null);
	};

	const lowerBody = (body: BodyItem[], env: Env, at: string): void => {
		body.forEach((item, i) => {
			const path = `${at}[${i}]`;
			sink.path = path;
			lowerItem(item, env, path);
		});
	};

	const lowerItem = (item: BodyItem, env: Env, path: string): void => {
		const id = env.prefix + item.id;
		registerItem(id, item.source);
		const label = item.label;
		switch (item.type) {
			case 'gate': {
				const qs = item.qubits.map((q, j) => qubitOf(q, env, `${path}.qubits[${j}]`));
				const ang = item.angle !== undefined ? sink.angleId(angleOf(item.angle, env, `${path}.angle`)) : -1;
				switch (item.gate) {
					case 'h':
						return sink.g1(GateCode.h, qs[0]);
					case 'x':
						return sink.g1(GateCode.x, qs[0]);
					case 'p':
						return sink.g1(GateCode.p, qs[0], ang);
					case 'rz':
						return sink.g1(GateCode.rz, qs[0], ang);
					case 'u': {
						const mi = sink.matrices.length;
						sink.matrices.push(item.matrix!);
						return sink.g1(GateCode.u, qs[0], -1, mi);
					}
					case 'cx':
						return sink.g2(GateCode.cx, 1, qs[0], qs[1]);
					case 'cp':
						return sink.g2(GateCode.cp, 1, qs[0], qs[1], ang);
					case 'swap':
						return sink.g2(GateCode.swap, 0, qs[0], qs[1]);
					case 'ccx':
						return sink.g3(GateCode.ccx, qs[0], qs[1], qs[2]);
					case 'mcp':
						return sink.gN(GateCode.mcp, qs.slice(0, -1), qs[qs.length - 1], ang);
				}
				return;
			}
			case 'qft':
			case 'iqft': {
				const r = regOf(item.register, env, `${path}.register`);
				const swaps = item.swaps ?? true;
				const approx = intOf(item.approx, r.size, env, `${path}.approx`);
				if (approx < 1) throw new LoweringError('approx must be at least 1', `${path}.approx`);
				emitQft(item.type, id, label, r, swaps, approx, item.source);
				return;
			}
			case 'add': {
				const src = regOf(item.addend, env, `${path}.addend`);
				const tgt = regOf(item.target, env, `${path}.target`);
				if (src === tgt) throw new LoweringError('addend and target must differ', `${path}.target`);
				const shift = intOf(item.shift, 0, env, `${path}.shift`);
				const control = item.control ? qubitOf(item.control, env, `${path}.control`) : null;
				if (control !== null && (inReg(control, src) || inReg(control, tgt)))
					throw new LoweringError('control must not be a qubit of addend or target', `${path}.control`);
				const lowering = item.ccpLowering ?? defaultCcp;
				const anc = control !== null ? ancillaOf(item.ancilla, lowering, env, path) : null;
				if (anc !== null && (inReg(anc, src) || inReg(anc, tgt) || anc === control))
					throw new LoweringError('ancilla must be distinct from the adder qubits', `${path}.ancilla`);
				emitAdd(id, label, src, tgt, shift, control, item.layout ?? defaultLayout, lowering, anc, item.source);
				return;
			}
			case 'add-const': {
				const tgt = regOf(item.target, env, `${path}.target`);
				const shift = intOf(item.shift, 0, env, `${path}.shift`);
				const control = item.control ? qubitOf(item.control, env, `${path}.control`) : null;
				if (control !== null && inReg(control, tgt)) throw new LoweringError('control must not be a qubit of the target', `${path}.control`);
				emitAddConst(id, label, tgt, BigInt(item.value), shift, control !== null ? [control] : [], item.layout ?? defaultLayout, defaultCcp, null, item.source);
				return;
			}
			case 'mod-add':
			case 'mod-mul':
			case 'mod-mul-inplace':
			case 'mod-exp':
				lowerModular(item, id, env, path);
				return;
			case 'multiply': {
				const a = regOf(item.a, env, `${path}.a`);
				const b = regOf(item.b, env, `${path}.b`);
				const p = regOf(item.product, env, `${path}.product`);
				if (new Set([a, b, p]).size !== 3) throw new LoweringError('a, b and product must be distinct registers', `${path}.product`);
				const lowering = item.ccpLowering ?? defaultCcp;
				const anc = ancillaOf(item.ancilla, lowering, env, path);
				if (anc !== null && (inReg(anc, a) || inReg(anc, b) || inReg(anc, p)))
					throw new LoweringError('ancilla must be distinct from the multiplier qubits', `${path}.ancilla`);
				emitMultiply(id, label, a, b, p, lowering, anc, item.source);
				return;
			}
			case 'ccp': {
				const c1 = qubitOf(item.controls[0], env, `${path}.controls[0]`);
				const c2 = qubitOf(item.controls[1], env, `${path}.controls[1]`);
				const t = qubitOf(item.target, env, `${path}.target`);
				const theta = angleOf(item.angle, env, `${path}.angle`);
				const lowering = item.lowering ?? defaultCcp;
				const anc = ancillaOf(item.ancilla, lowering, env, path);
				if (new Set([c1, c2, t, ...(anc !== null ? [anc] : [])]).size !== (anc !== null ? 4 : 3))
					throw new LoweringError('ccp qubits (controls, target, ancilla) must be distinct', path);
				const b = sink.open(
					'ccp',
					id,
					label ?? `ccp(${item.angle})`,
					{ kind: 'ccp', controls: [c1, c2], target: t, angle: theta, lowering, ancilla: anc },
					{ text: `phase e^{iθ} on |111⟩ of (q${c1}, q${c2}, q${t}), θ = ${item.angle}; lowering ${lowering}`, writes: [], requires: [] },
					[],
					item.source
				);
				emitCcp(c1, c2, t, theta, lowering, anc);
				sink.close(b);
				return;
			}
			case 'call': {
				const ub = userBlocks.get(item.block);
				if (!ub) throw new LoweringError(`unknown block "${item.block}"`, `${path}.block`);
				if (env.depth >= 32) throw new LoweringError('user blocks nested deeper than 32 (recursive call?)', path);
				// Count calls as work: blocks that call each other without making gates multiply without bound.
				if (++calls > limits.maxCalls) throw new LoweringError(`more than ${limits.maxCalls} block calls after expansion (limit); block "${ub.name}" is called too often`, path);
				const inner = bindCall(ub, item.args, env, path, id);
				const b = sink.open('call', id, label ?? ub.name, { kind: 'call', block: ub.name, args: item.args }, undefined, [], item.source);
				lowerBody(ub.body, inner, `${path}→${ub.name}.body`);
				sink.close(b);
				return;
			}
		}
	};

	const bindCall = (ub: UserBlock, args: Record<string, string | number>, env: Env, path: string, callId: string): Env => {
		const inner: Env = { regs: new Map(), ints: new Map(), angles: new Map(), prefix: `${callId}/`, depth: env.depth + 1 };
		for (const p of ub.params) {
			const v = args[p.name];
			const ap = `${path}.args.${p.name}`;
			if (v === undefined) throw new LoweringError(`missing argument for parameter "${p.name}"`, ap);
			if (p.kind === 'register') {
				if (typeof v !== 'string') throw new LoweringError('expected a register name', ap);
				inner.regs.set(p.name, regOf(v, env, ap).name);
			} else if (p.kind === 'int') {
				inner.ints.set(p.name, intOf(v as IntRef, 0, env, ap));
			} else {
				if (typeof v !== 'string') throw new LoweringError('expected an angle string', ap);
				inner.angles.set(p.name, angleOf(v, env, ap));
			}
		}
		return inner;
	};

	const inReg = (q: number, r: PlacedRegister) => q >= r.offset && q < r.offset + r.size;

	const emitQft = (kind: 'qft' | 'iqft', id: string, label: string | undefined, r: PlacedRegister, swaps: boolean, approx: number, source?: SourcePosition): void => {
		const n = r.size;
		const layout: FourierLayout = swaps ? 'swapped' : 'unswapped';
		const levelText = swaps ? `qubit i at level ${n}−i` : 'qubit i at level i+1';
		const effect: BlockEffect =
			kind === 'qft'
				? {
						text: `${r.name}: |x⟩ → Fourier basis holding x (${layout}: ${levelText})${approx < n ? `, approximate: rotations R_d with d > ${approx} omitted` : ''}`,
						writes: [{ register: r.name, basis: 'fourier', layout, value: reg(r.name) }],
						requires: [{ register: r.name, basis: 'computational' }]
					}
				: {
						text: `${r.name}: Fourier basis holding x (${layout}) → |x⟩${approx < n ? `, approximate: rotations R_d with d > ${approx} omitted` : ''}`,
						writes: [{ register: r.name, basis: 'computational', value: reg(r.name) }],
						requires: [{ register: r.name, basis: 'fourier', layout }]
					};
		const b = sink.open(kind, id, label ?? `${kind}(${r.name})`, { kind, register: r.name, swaps, approx }, effect, ['j', 'k'], source);
		const q = (i: number) => r.offset + i;
		const emitSwaps = () => {
			for (let l = 0; l < n >> 1; l++) {
				sink.l0 = l;
				sink.l1 = -1;
				sink.g2(GateCode.swap, 0, q(l), q(n - 1 - l));
			}
		};
		if (kind === 'qft') {
			for (let i = n - 1; i >= 0; i--) {
				sink.l0 = i;
				sink.l1 = -1;
				sink.g1(GateCode.h, q(i));
				for (let k = i - 1; k >= 0; k--) {
					const d = i - k + 1;
					if (d > approx) continue;
					sink.l1 = k;
					sink.g2(GateCode.cp, 1, q(k), q(i), sink.angleId(dyadic(1n, d)));
				}
			}
			if (swaps) emitSwaps();
		} else {
			if (swaps) emitSwaps();
			for (let i = 0; i < n; i++) {
				sink.l0 = i;
				for (let k = 0; k < i; k++) {
					const d = i - k + 1;
					if (d > approx) continue;
					sink.l1 = k;
					sink.g2(GateCode.cp, 1, q(k), q(i), sink.angleId(dyadic(-1n, d)));
				}
				sink.l1 = -1;
				sink.g1(GateCode.h, q(i));
			}
		}
		sink.close(b);
	};

	// Angle-table ids of θ, θ/2, −θ/2, θ/4, −θ/4 per θ: the multiplier emits ~n³ ccp with few distinct angles.
	const ccpAngles = new Map<string, number[]>();
	const ccpIds = (theta: Angle): number[] => {
		const key = angleKey(theta);
		let ids = ccpAngles.get(key);
		if (!ids) {
			const h = halveAngle(theta);
			const q = halveAngle(theta, 2);
			ids = [sink.angleId(theta), sink.angleId(h), sink.angleId(negateAngle(h)), sink.angleId(q), sink.angleId(negateAngle(q))];
			ccpAngles.set(key, ids);
		}
		return ids;
	};
	const unitAngles: Angle[] = [];
	const unitAngle = (e: number): Angle => (unitAngles[e] ??= dyadic(1n, e));

	/** Doubly controlled phase θ (turns) on (c1, c2, t); see the CcpLowering docs in circuit.ts. */
	const emitCcp = (c1: number, c2: number, t: number, theta: Angle, lowering: CcpLowering, anc: number | null): void => {
		const [full, half, mhalf, q, mq] = ccpIds(theta);
		switch (lowering) {
			case 'native':
				sink.g3(GateCode.mcp, c1, c2, t, full);
				return;
			case 'ancilla': {
				const a = anc!;
				sink.g3(GateCode.ccx, c1, c2, a);
				sink.g2(GateCode.cp, 1, a, t, full);
				sink.g3(GateCode.ccx, c1, c2, a);
				return;
			}
			case 'no-ancilla': {
				// V = p(θ/2): phase θ/2·(c2 − (c1⊕c2) + c1)·t = θ·c1·c2·t.
				sink.g2(GateCode.cp, 1, c2, t, half);
				sink.g2(GateCode.cx, 1, c1, c2);
				sink.g2(GateCode.cp, 1, c2, t, mhalf);
				sink.g2(GateCode.cx, 1, c1, c2);
				sink.g2(GateCode.cp, 1, c1, t, half);
				return;
			}
			case 'quarter': {
				// 4·x1x2x3 = x1 + x2 + x3 − x1⊕x3 + x1⊕x2⊕x3 − x2⊕x3 − x1⊕x2: parities built with
				// CNOTs whose controls are c1/c2, so classical controls keep the ledger exact.
				sink.g1(GateCode.p, c1, q);
				sink.g1(GateCode.p, c2, q);
				sink.g1(GateCode.p, t, q);
				sink.g2(GateCode.cx, 1, c1, t);
				sink.g1(GateCode.p, t, mq);
				sink.g2(GateCode.cx, 1, c2, t);
				sink.g1(GateCode.p, t, q);
				sink.g2(GateCode.cx, 1, c1, t);
				sink.g1(GateCode.p, t, mq);
				sink.g2(GateCode.cx, 1, c2, t);
				sink.g2(GateCode.cx, 1, c1, c2);
				sink.g1(GateCode.p, c2, mq);
				sink.g2(GateCode.cx, 1, c1, c2);
				return;
			}
		}
	};

	const emitAdd = (
		id: string,
		label: string | undefined,
		src: PlacedRegister,
		tgt: PlacedRegister,
		shift: number,
		control: number | null,
		layout: FourierLayout,
		lowering: CcpLowering,
		anc: number | null,
		source: SourcePosition | undefined
	): void => {
		const added: ValueExpr = shift ? { op: 'shl', of: reg(src.name), by: shift } : reg(src.name);
		const ctlName = control !== null ? qubitName(control) : null;
		const term: ValueExpr = control !== null ? { op: 'mul', factors: [bitExpr(control), added] } : added;
		const effect: BlockEffect = {
			text: `${tgt.name} ← ${tgt.name} + ${ctlName ? `${ctlName}·` : ''}${shift ? `2^${shift}·` : ''}${src.name} mod 2^${tgt.size} (Fourier basis, ${layout})`,
			writes: [{ register: tgt.name, basis: 'fourier', layout, value: { op: 'add', terms: [reg(tgt.name), term] } }],
			requires: [
				{ register: tgt.name, basis: 'fourier', layout },
				{ register: src.name, basis: 'computational' }
			]
		};
		const b = sink.open(
			'add',
			id,
			label ?? `${tgt.name} += ${ctlName ? `${ctlName}·` : ''}${shift ? `2^${shift}·` : ''}${src.name}`,
			{ kind: 'add', addend: src.name, target: tgt.name, shift, control, layout },
			effect,
			['j', 'k'],
			source
		);
		for (let j = 0; j < tgt.size; j++) {
			const m = fourierLevel(layout, tgt.size, j);
			sink.l0 = j;
			for (let k = 0; k < src.size; k++) {
				const e = m - k - shift;
				if (e <= 0) break;
				sink.l1 = k;
				const ang = unitAngle(e);
				if (control === null) sink.g2(GateCode.cp, 1, src.offset + k, tgt.offset + j, sink.angleId(ang));
				else emitCcp(control, src.offset + k, tgt.offset + j, ang, lowering, anc);
			}
		}
		sink.close(b);
	};

	const emitAddConst = (
		id: string,
		label: string | undefined,
		tgt: PlacedRegister,
		value: bigint,
		shift: number,
		controls: number[],
		layout: FourierLayout,
		lowering: CcpLowering,
		anc: number | null,
		source: SourcePosition | undefined,
		holds?: string
	): void => {
		const ctlText = controls.map((q) => `${qubitName(q)}·`).join('');
		const added: ValueExpr = { op: 'const', value: String(value << BigInt(shift)) };
		const term: ValueExpr = controls.length ? { op: 'mul', factors: [...controls.map(bitExpr), added] } : added;
		const effect: BlockEffect = {
			text: `${tgt.name} ← ${tgt.name} + ${ctlText}${value}${shift ? `·2^${shift}` : ''} mod 2^${tgt.size} (Fourier basis, ${layout})`,
			writes: [{ register: tgt.name, basis: 'fourier', layout, value: { op: 'add', terms: [reg(tgt.name), term] } }],
			requires: [{ register: tgt.name, basis: 'fourier', layout }]
		};
		const control = controls.length ? controls[0] : null;
		const b = sink.open(
			'add-const',
			id,
			label ?? `${tgt.name} += ${controls.length === 1 ? `${qubitName(controls[0])}·` : controls.length ? `${ctlText}` : ''}${value}${shift ? `·2^${shift}` : ''}`,
			{ kind: 'add-const', target: tgt.name, value: String(value), shift, control, layout, ...(controls.length > 1 ? { controls } : {}), ...(holds ? { holds } : {}) },
			effect,
			['j'],
			source
		);
		const c = value << BigInt(shift);
		for (let j = 0; j < tgt.size; j++) {
			const m = fourierLevel(layout, tgt.size, j);
			const ang = dyadic(c, m);
			if (ang === ZERO_ANGLE || (ang.exact && ang.num === 0n)) continue;
			sink.l0 = j;
			if (controls.length === 0) sink.g1(GateCode.p, tgt.offset + j, sink.angleId(ang));
			else if (controls.length === 1) sink.g2(GateCode.cp, 1, controls[0], tgt.offset + j, sink.angleId(ang));
			else emitCcp(controls[0], controls[1], tgt.offset + j, ang, lowering, anc);
		}
		sink.close(b);
	};

	// ------------------------------------------------------------------------------------------
	// Modular parts (Beauregard 2003, quant-ph/0205095, Figs. 5–7)

	const lowerModular = (item: ModularItem, id: string, env: Env, path: string): void => {
		const regField = (field: string): PlacedRegister => regOf((item as unknown as Record<string, string>)[field], env, `${path}.${field}`);
		const sizeOf = (name: string): number | undefined => {
			const actual = env.regs.get(name) ?? name;
			return regByName.get(actual)?.size;
		};
		for (const issue of checkModularParameters(item, sizeOf)) if (issue.blocking) throw new LoweringError(issue.message, `${path}.${issue.field}`);
		const a = BigInt(item.value);
		const N = BigInt(item.modulus);
		const anc = qubitOf(item.ancilla, env, `${path}.ancilla`);
		const lowering = item.ccpLowering ?? defaultCcp;
		const fourier = regField(item.type === 'mod-add' || item.type === 'mod-mul' ? 'target' : 'work');
		const approx = intOf(item.approx, fourier.size, env, `${path}.approx`);
		if (approx < 1) throw new LoweringError('approx must be at least 1', `${path}.approx`);
		const used: PlacedRegister[] = [fourier];
		const controls: number[] = [];
		if (item.type === 'mod-add') (item.controls ?? []).forEach((q, j) => controls.push(qubitOf(q, env, `${path}.controls[${j}]`)));
		else if (item.type !== 'mod-exp' && item.control) controls.push(qubitOf(item.control, env, `${path}.control`));
		if (item.type === 'mod-mul' || item.type === 'mod-mul-inplace') used.push(regField('x'));
		if (item.type === 'mod-exp') used.push(regField('y'), regField('exponent'));
		if (new Set(used).size !== used.length) throw new LoweringError('the part needs distinct registers', path);
		if (used.some((r) => inReg(anc, r))) throw new LoweringError('the ancilla must not be a qubit of the part’s registers', `${path}.ancilla`);
		controls.forEach((c, j) => {
			const field = item.type === 'mod-add' ? `controls[${j}]` : 'control';
			if (c === anc || used.some((r) => inReg(c, r))) throw new LoweringError('a control must be distinct from the part’s registers and its ancilla', `${path}.${field}`);
		});
		if (new Set(controls).size !== controls.length) throw new LoweringError('the two controls must differ', `${path}.controls`);
		// Doubly controlled rotations appear whenever an adder has two controls.
		const needsCcp = item.type === 'mod-exp' || (item.type === 'mod-add' ? controls.length === 2 : controls.length === 1);
		let spare: number | null = null;
		if (needsCcp && lowering === 'ancilla') {
			if (item.ccpAncilla) spare = qubitOf(item.ccpAncilla, env, `${path}.ccpAncilla`);
			else {
				for (const r of registers) {
					if (r.role !== 'ancilla') continue;
					for (let i = 0; i < r.size && spare === null; i++) if (r.offset + i !== anc && !controls.includes(r.offset + i)) spare = r.offset + i;
				}
				if (spare === null) throw new LoweringError('ccp lowering "ancilla" needs a second ancilla qubit besides the comparison ancilla: set ccpAncilla', `${path}.ccpAncilla`);
			}
			if (spare === anc || controls.includes(spare) || used.some((r) => inReg(spare!, r))) throw new LoweringError('ccpAncilla must be distinct from the part’s registers, controls and ancilla', `${path}.ccpAncilla`);
		}
		const opts: ModOpts = { lowering, spare, approx, source: item.source };
		switch (item.type) {
			case 'mod-add':
				emitModAdd(id, item.label, fourier, a, N, controls, anc, item.layout ?? defaultLayout, false, opts);
				return;
			case 'mod-mul':
				emitModMul(id, item.label, regField('x'), fourier, a, N, controls[0] ?? null, anc, false, opts);
				return;
			case 'mod-mul-inplace':
				emitModMulInPlace(id, item.label, regField('x'), fourier, a, N, controls[0] ?? null, anc, opts);
				return;
			case 'mod-exp':
				emitModExp(id, item.label, regField('exponent'), regField('y'), fourier, a, N, anc, opts);
				return;
		}
	};

	interface ModOpts {
		lowering: CcpLowering;
		spare: number | null;
		approx: number;
		source: SourcePosition | undefined;
	}

	const ctlFactors = (controls: number[]): ValueExpr[] => controls.map(bitExpr);
	const modOf = (of: ValueExpr, N: bigint): ValueExpr => ({ op: 'mod', of, modulus: String(N) });

	/**
	 * Fig. 5: φ(b) → φ((b + a) mod N) when every control is 1 (time order): add a, subtract N,
	 * inverse QFT, CNOT(top → ancilla), QFT, add N controlled by the ancilla, subtract a, inverse QFT,
	 * X·CNOT·X (top → ancilla) clearing it, QFT, add a. `inverse`: the exact reverse (b − a mod N).
	 */
	const emitModAdd = (id: string, label: string | undefined, b: PlacedRegister, a: bigint, N: bigint, controls: number[], anc: number, layout: FourierLayout, inverse: boolean, o: ModOpts): number => {
		const ctl = controls.map((q) => `${qubitName(q)}·`).join('');
		const sign = inverse ? '−' : '+';
		const change: ValueExpr = { op: 'mul', factors: [{ op: 'const', value: String(inverse ? -a : a) }, ...ctlFactors(controls)] };
		const effect: BlockEffect = {
			text: `${b.name} ← (${b.name} ${sign} ${ctl}${a}) mod ${N} (Fourier basis, ${layout}; needs ${b.name} < ${N}; ancilla ${qubitName(anc)} back to 0)`,
			writes: [{ register: b.name, basis: 'fourier', layout, value: modOf({ op: 'add', terms: [reg(b.name), change] }, N) }],
			requires: [{ register: b.name, basis: 'fourier', layout }]
		};
		const spec: BlockSpec = { kind: 'mod-add', target: b.name, value: String(a), modulus: String(N), controls, ancilla: anc, layout, inverse, compareGate: -1, clearGate: -1 };
		const blk = sink.open('mod-add', id, label ?? `${b.name} ← ${b.name} ${sign} ${ctl}${a} mod ${N}`, spec, effect, [], o.source);
		const top = b.offset + b.size - 1;
		const swaps = layout === 'swapped';
		type Step = { k: 'add'; v: bigint; ctl: number[]; name: string; holds: string } | { k: 'qft' | 'iqft' } | { k: 'copy' } | { k: 'clear' };
		// Words for what b holds after each add, with ctl-a written "a" (0 when a control is off).
		const steps: Step[] = [
			{ k: 'add', v: a, ctl: controls, name: 'add a', holds: 'b + a' },
			{ k: 'add', v: -N, ctl: [], name: 'subtract N', holds: 'b + a − N' },
			{ k: 'iqft' },
			{ k: 'copy' },
			{ k: 'qft' },
			{ k: 'add', v: N, ctl: [anc], name: 'add N back if b + a < N', holds: '(b + a) mod N' },
			{ k: 'add', v: -a, ctl: controls, name: 'subtract a', holds: '(b + a) mod N − a' },
			{ k: 'iqft' },
			{ k: 'clear' },
			{ k: 'qft' },
			{ k: 'add', v: a, ctl: controls, name: 'add a', holds: '(b + a) mod N' }
		];
		const run: Step[] = inverse
			? steps
					.slice()
					.reverse()
					.map((s) => (s.k === 'add' ? { ...s, v: -s.v, name: s.name.startsWith('add') ? s.name.replace(/^add/, 'subtract') : s.name.replace(/^subtract/, 'add') } : s.k === 'qft' ? { k: 'iqft' } : s.k === 'iqft' ? { k: 'qft' } : s))
			: steps;
		let n = 0;
		for (const s of run) {
			const local = `${id}/${n++}`;
			if (s.k === 'add') {
				emitAddConst(local, s.name, b, s.v, 0, s.ctl, layout, o.lowering, s.ctl.length > 1 ? o.spare : null, o.source, inverse ? undefined : s.holds);
			} else if (s.k === 'qft' || s.k === 'iqft') {
				emitQft(s.k, local, s.k === 'qft' ? `QFT(${b.name})` : `inverse QFT(${b.name})`, b, swaps, o.approx, o.source);
			} else if (s.k === 'copy') {
				spec.compareGate = sink.count;
				sink.g2(GateCode.cx, 1, top, anc);
			} else {
				sink.g1(GateCode.x, top);
				spec.clearGate = sink.count;
				sink.g2(GateCode.cx, 1, top, anc);
				sink.g1(GateCode.x, top);
			}
		}
		sink.close(blk);
		return blk;
	};

	/** Fig. 6: b ← (b + c·a·x) mod N, b computational (QFT without swaps inside), adds of 2^j·a mod N controlled by (c, x_j). */
	const emitModMul = (id: string, label: string | undefined, x: PlacedRegister, b: PlacedRegister, a: bigint, N: bigint, control: number | null, anc: number, inverse: boolean, o: ModOpts): void => {
		const ctl = control !== null ? [bitExpr(control)] : [];
		const sign = inverse ? '−' : '+';
		const effect: BlockEffect = {
			text: `${b.name} ← (${b.name} ${sign} ${control !== null ? `${qubitName(control)}·` : ''}${a}·${x.name}) mod ${N} (computational basis before and after; needs ${b.name} < ${N})`,
			writes: [{ register: b.name, basis: 'computational', value: modOf({ op: 'add', terms: [reg(b.name), { op: 'mul', factors: [{ op: 'const', value: String(inverse ? -a : a) }, ...ctl, reg(x.name)] }] }, N) }],
			requires: [
				{ register: b.name, basis: 'computational' },
				{ register: x.name, basis: 'computational' }
			]
		};
		const blk = sink.open('mod-mul', id, label ?? `${b.name} ← ${b.name} ${sign} ${a}·${x.name} mod ${N}`, { kind: 'mod-mul', x: x.name, target: b.name, value: String(a), modulus: String(N), control, inverse }, effect, [], o.source);
		const consts = multiplierConstants(a, N, x.size);
		emitQft('qft', `${id}/qft`, `QFT(${b.name})`, b, false, o.approx, o.source);
		const order = inverse ? consts.map((_, j) => x.size - 1 - j) : consts.map((_, j) => j);
		for (const j of order) {
			const ctls = control !== null ? [control, x.offset + j] : [x.offset + j];
			const bi = emitModAdd(`${id}/add[${j}]`, `${inverse ? '−' : '+'}${consts[j]} mod ${N} if ${ctls.map(qubitName).join('·')}`, b, consts[j], N, ctls, anc, 'unswapped', inverse, o);
			sink.blocks[bi].loopContext = { j };
		}
		emitQft('iqft', `${id}/iqft`, `inverse QFT(${b.name})`, b, false, o.approx, o.source);
		sink.close(blk);
	};

	/** Fig. 7: x ← a·x mod N when c: multiply into work, swap x with work's low n qubits (controlled), un-multiply by a⁻¹. */
	const emitModMulInPlace = (id: string, label: string | undefined, x: PlacedRegister, w: PlacedRegister, a: bigint, N: bigint, control: number | null, anc: number, o: ModOpts): number => {
		const inv = modInverse(a % N, N)!;
		const prod: ValueExpr = modOf({ op: 'mul', factors: [{ op: 'const', value: String(a) }, reg(x.name)] }, N);
		const value: ValueExpr =
			control === null ? prod : { op: 'add', terms: [reg(x.name), { op: 'mul', factors: [bitExpr(control), { op: 'add', terms: [prod, { op: 'mul', factors: [{ op: 'const', value: '-1' }, reg(x.name)] }] }] }] };
		const effect: BlockEffect = {
			text: `${x.name} ← ${a}·${x.name} mod ${N}${control !== null ? ` if ${qubitName(control)}` : ''} (needs ${x.name} < ${N}; ${w.name} and the ancilla back to 0; a⁻¹ = ${inv})`,
			writes: [
				{ register: x.name, basis: 'computational', value },
				{ register: w.name, basis: 'computational', value: { op: 'const', value: '0' } }
			],
			requires: [
				{ register: x.name, basis: 'computational' },
				{ register: w.name, basis: 'computational' }
			]
		};
		const blk = sink.open(
			'mod-mul-inplace',
			id,
			label ?? `${x.name} ← ${a}·${x.name} mod ${N}${control !== null ? ` if ${qubitName(control)}` : ''}`,
			{ kind: 'mod-mul-inplace', x: x.name, work: w.name, value: String(a), inverseValue: String(inv), modulus: String(N), control },
			effect,
			['j'],
			o.source
		);
		emitModMul(`${id}/mul`, undefined, x, w, a, N, control, anc, false, o);
		for (let j = 0; j < x.size; j++) {
			sink.l0 = j;
			const p = x.offset + j;
			const q = w.offset + j;
			if (control === null) sink.g2(GateCode.swap, 0, p, q);
			else {
				sink.g2(GateCode.cx, 1, q, p);
				sink.g3(GateCode.ccx, control, p, q);
				sink.g2(GateCode.cx, 1, q, p);
			}
		}
		sink.l0 = -1;
		emitModMul(`${id}/unmul`, undefined, x, w, inv, N, control, anc, true, o);
		sink.close(blk);
		return blk;
	};

	/** y ← a^e·y mod N: controlled in-place multipliers by a^(2^i) mod N for each exponent bit e_i. */
	const emitModExp = (id: string, label: string | undefined, e: PlacedRegister, y: PlacedRegister, w: PlacedRegister, a: bigint, N: bigint, anc: number, o: ModOpts): void => {
		const effect: BlockEffect = {
			text: `${y.name} ← ${a}^${e.name}·${y.name} mod ${N} (needs ${y.name} < ${N}; ${w.name} and the ancilla back to 0)`,
			writes: [
				{ register: y.name, basis: 'computational', value: modOf({ op: 'mul', factors: [{ op: 'powmod', base: String(a), exp: reg(e.name), modulus: String(N) }, reg(y.name)] }, N) },
				{ register: w.name, basis: 'computational', value: { op: 'const', value: '0' } }
			],
			requires: [
				{ register: y.name, basis: 'computational' },
				{ register: w.name, basis: 'computational' },
				{ register: e.name, basis: 'computational' }
			]
		};
		const blk = sink.open('mod-exp', id, label ?? `${y.name} ← ${a}^${e.name}·${y.name} mod ${N}`, { kind: 'mod-exp', exponent: e.name, y: y.name, work: w.name, value: String(a), modulus: String(N) }, effect, [], o.source);
		for (let i = 0; i < e.size; i++) {
			const ai = powMod(a, 1n << BigInt(i), N);
			const bi = emitModMulInPlace(`${id}/pow[${i}]`, `${y.name} ← ${ai}·${y.name} mod ${N} if ${e.name}[${i}]`, y, w, ai, N, e.offset + i, anc, o);
			sink.blocks[bi].loopContext = { i };
		}
		sink.close(blk);
	};

	const emitMultiply = (
		id: string,
		label: string | undefined,
		a: PlacedRegister,
		bReg: PlacedRegister,
		p: PlacedRegister,
		lowering: CcpLowering,
		anc: number | null,
		source: SourcePosition | undefined
	): void => {
		const effect: BlockEffect = {
			text: `${p.name} ← ${p.name} + ${a.name}·${bReg.name} mod 2^${p.size} (computational basis before and after; QFT without swaps inside)`,
			writes: [{ register: p.name, basis: 'computational', value: { op: 'add', terms: [reg(p.name), { op: 'mul', factors: [reg(a.name), reg(bReg.name)] }] } }],
			requires: [
				{ register: p.name, basis: 'computational' },
				{ register: a.name, basis: 'computational' },
				{ register: bReg.name, basis: 'computational' }
			]
		};
		const blk = sink.open('multiply', id, label ?? `${p.name} += ${a.name}·${bReg.name}`, { kind: 'multiply', a: a.name, b: bReg.name, product: p.name }, effect, [], source);
		emitQft('qft', `${id}/qft`, undefined, p, false, p.size, source);
		for (let i = 0; i < a.size; i++) {
			emitAdd(`${id}/add[${i}]`, undefined, bReg, p, i, a.offset + i, 'unswapped', lowering, anc, source);
			sink.blocks[sink.blocks.length - 1].loopContext = { i };
		}
		emitQft('iqft', `${id}/iqft`, undefined, p, false, p.size, source);
		sink.close(blk);
	};

	const qubitName = (q: number): string => {
		for (const r of registers) if (q >= r.offset && q < r.offset + r.size) return `${r.name}[${q - r.offset}]`;
		return `q${q}`;
	};
	const bitExpr = (q: number): ValueExpr => {
		for (const r of registers) if (q >= r.offset && q < r.offset + r.size) return { op: 'bit', register: r.name, index: q - r.offset };
		throw new Error(`qubit ${q} outside every register`);
	};

	lowerBody(doc.body, { regs: new Map(), ints: new Map(), angles: new Map(), prefix: '', depth: 0 }, 'body');

	return {
		title: doc.title,
		qubitCount: offset,
		registers,
		gateCount: sink.count,
		kinds: sink.kinds.finish(),
		controlCounts: sink.controlCounts.finish(),
		qubitStart: sink.qubitStart.finish(),
		qubitList: sink.qubitList.finish(),
		angleIndex: sink.angleIndex.finish(),
		angles: sink.angles,
		matrixIndex: sink.matrixIndex.finish(),
		matrices: sink.matrices,
		blockOf: sink.blockOf.finish(),
		loops: sink.loops.finish(),
		itemOf: sink.itemOf.finish(),
		itemIds: sink.itemIds,
		itemSources: sink.itemSources,
		blocks: sink.blocks
	};
}
