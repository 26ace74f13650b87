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
				emitAddConst(id, label, tgt, BigInt(item.value), shift, control, item.layout ?? defaultLayout, item.source);
				return;
			}
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
		control: number | null,
		layout: FourierLayout,
		source: SourcePosition | undefined
	): void => {
		const ctlName = control !== null ? qubitName(control) : null;
		const added: ValueExpr = { op: 'const', value: String(value << BigInt(shift)) };
		const effect: BlockEffect = {
			text: `${tgt.name} ← ${tgt.name} + ${ctlName ? `${ctlName}·` : ''}${value}${shift ? `·2^${shift}` : ''} mod 2^${tgt.size} (Fourier basis, ${layout})`,
			writes: [
				{
					register: tgt.name,
					basis: 'fourier',
					layout,
					value: { op: 'add', terms: [reg(tgt.name), control !== null ? { op: 'mul', factors: [bitExpr(control), added] } : added] }
				}
			],
			requires: [{ register: tgt.name, basis: 'fourier', layout }]
		};
		const b = sink.open(
			'add-const',
			id,
			label ?? `${tgt.name} += ${ctlName ? `${ctlName}·` : ''}${value}${shift ? `·2^${shift}` : ''}`,
			{ kind: 'add-const', target: tgt.name, value: String(value), shift, control, layout },
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
			if (control === null) sink.g1(GateCode.p, tgt.offset + j, sink.angleId(ang));
			else sink.g2(GateCode.cp, 1, control, tgt.offset + j, sink.angleId(ang));
		}
		sink.close(b);
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
