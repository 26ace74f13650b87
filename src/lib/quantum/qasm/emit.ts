/**
 * Semantic ops → document gate items: a gate with any number of controls becomes the document's
 * gates (p, cp, mcp, cx, ccx, u, …), exactly where an exact form exists; each item keeps the
 * position of its top-level call. A broadcast over a whole register is compacted into one call
 * of a shared block.
 *
 * Qubit order: flat qubits (declaration order) are named through `flatToRef` (`reg[i]`, bit i).
 * Angles: ops carry radians (`Num`); items carry turns (`"k/2^m turn"` or `"~t"`).
 */
import type { CallItem, GateItem, Matrix2, QubitRef, SourcePosition, UserBlock, BodyItem } from '../circuit.js';
import type { Angle } from '../angle.js';
import { numToAngle, type Num } from './expr.js';
import { matDagger, matMul, matSqrt, MATRICES, rzMatrix, ryMatrix, zyz } from './matrix.js';
import { half, isExactZero, neg, PI, type Op } from './gates.js';
import type { GateCall } from './expand.js';
import type { GateOrigin, QasmLimits } from './types.js';

/** Document angle string for an angle in turns: exact `"k/2^m turn"`, float `"~t"`. */
export function angleText(a: Angle): string {
	if (!a.exact) return `~${a.turns}`;
	if (a.num === 0n) return '0 turn';
	return `${a.num}/2^${a.exp} turn`;
}

/** What the emitter needs from the reader. */
export interface EmitHost {
	readonly limits: QasmLimits;
	err(at: { line: number; column: number }, msg: string): never;
	/** Whether a block name is taken by a gate definition (broadcast blocks get another). */
	nameTaken(name: string): boolean;
}

/** Collects the document's body items and, per item, its origin. */
export class GateEmitter {
	readonly items: BodyItem[] = [];
	/**
	 * Per item its origin; for a gate the reader's fast path made, only the OpenQASM name (the
	 * origin is that name, the item's `source` as the call, and no definitions; made when read).
	 */
	private readonly originOf: (GateOrigin | string)[] = [];
	private originsMade: GateOrigin[] | null = null;
	/** Gates made so far (a broadcast's gates sit in its block, so this is more than items.length). */
	gatesMade = 0;
	private nextItemId = 1;
	/** Blocks made for broadcasts (`h q;` over a register stays one call item), by content. */
	readonly broadcastBlocks: UserBlock[] = [];
	private readonly broadcastByKey = new Map<string, UserBlock>();
	private readonly angleTexts = new Map<Num, string>();

	/** `flatToRef[q]` names flat qubit q; the reader appends to it as registers are declared. */
	constructor(
		private readonly host: EmitHost,
		private readonly flatToRef: QubitRef[]
	) {}

	push(gate: GateItem['gate'], qubits: number[], o: Op, angle?: Num, matrix?: Matrix2): void {
		if (this.gatesMade >= this.host.limits.maxGates) this.host.err(o.origin.call, `more than ${this.host.limits.maxGates} gates after expanding gate definitions (limit)`);
		const item: GateItem = {
			id: `g${this.nextItemId++}`,
			type: 'gate',
			gate,
			qubits: qubits.map((q) => this.flatToRef[q]),
			source: { line: o.origin.call.line, column: o.origin.call.column }
		};
		if (o.origin.definitions.length) {
			const d = o.origin.definitions;
			item.label = `${o.origin.qasm} → ${d.map((x) => `${x.gate}@${x.line}:${x.column}`).join(' → ')}`.slice(0, 200);
		}
		if (angle !== undefined) item.angle = this.angleTextOf(angle);
		if (matrix) item.matrix = matrix;
		this.items.push(item);
		this.originOf.push(o.origin);
		this.gatesMade++;
	}

	/**
	 * One gate item from the reader's fast path (a standard gate without controls to lower), the
	 * same item {@link push} makes; the origin's call position is the item's `source`.
	 */
	pushPlain(gate: GateItem['gate'], qubits: QubitRef[], qasm: string, source: SourcePosition, angle: Num | undefined): void {
		if (this.gatesMade >= this.host.limits.maxGates) this.host.err(source, `more than ${this.host.limits.maxGates} gates after expanding gate definitions (limit)`);
		const id = `g${this.nextItemId++}`;
		this.items.push(angle === undefined ? { id, type: 'gate', gate, qubits, source } : { id, type: 'gate', gate, qubits, source, angle: this.angleTextOf(angle) });
		this.originOf.push(qasm);
		this.gatesMade++;
	}

	/** The origin of item i (see {@link originOf}). */
	originAt(i: number): GateOrigin {
		const o = this.originOf[i];
		return typeof o === 'string' ? { qasm: o, call: this.items[i].source!, definitions: [] } : o;
	}

	/** Per item its origin, made on first use (a large file's reader makes none for plain gates until asked). */
	get origins(): GateOrigin[] {
		if (this.originsMade === null || this.originsMade.length !== this.items.length) {
			const out: GateOrigin[] = new Array(this.items.length);
			for (let i = 0; i < out.length; i++) out[i] = this.originAt(i);
			this.originsMade = out;
		}
		return this.originsMade;
	}

	/**
	 * The document's qubit list for flat qubits `qs` (one to three), shared by every item on the
	 * same qubits in the same order: a large file has few distinct ones (treat as immutable).
	 */
	qubitList(qs: number[]): QubitRef[] {
		const n = this.flatToRef.length + 1;
		if (n > 100_000) return qs.map((q) => this.flatToRef[q]);
		const key = qs.length === 1 ? qs[0] : qs.length === 2 ? n + qs[0] * n + qs[1] : n + n * n + (qs[0] * n + qs[1]) * n + qs[2];
		let list = this.qubitLists.get(key);
		if (list === undefined) {
			list = qs.map((q) => this.flatToRef[q]);
			if (this.qubitLists.size < 100_000) this.qubitLists.set(key, list);
		}
		return list;
	}
	private readonly qubitLists = new Map<number, QubitRef[]>();

	private angleTextOf(angle: Num): string {
		// Exported files repeat a few angles, and the reader hands out the same Num for each.
		let text = this.angleTexts.get(angle);
		if (text === undefined) {
			text = angleText(numToAngle(angle));
			if (this.angleTexts.size < 10_000) this.angleTexts.set(angle, text);
		}
		return text;
	}

	/**
	 * A broadcast (`h q;` over a register) stays one item: the gates it made (items from `start`)
	 * move into a block (shared by every broadcast that made the same gates) and one call item
	 * takes their place. Without this, `h q;` on 1000 qubits three hundred times stored 300 000 items.
	 */
	compactBroadcast(call: GateCall, start: number, register: string): void {
		const made = this.items.slice(start) as GateItem[];
		if (made.length < 2 || made.length > 10_000) return;
		const key = JSON.stringify(made.map((it) => [it.gate, it.qubits, it.angle, it.matrix, it.label]));
		let block = this.broadcastByKey.get(key);
		if (!block) {
			const base = `each_${call.name}_${register}`.replace(/[^A-Za-z0-9_]/g, '_').slice(0, 60);
			let name = base;
			for (let n = 2; this.broadcastBlocks.some((b) => b.name === name) || this.host.nameTaken(name); n++) name = `${base}_${n}`;
			block = {
				name,
				params: [],
				description: `OpenQASM broadcast: ${call.name} on every qubit of ${register}`,
				body: made.map((it, i) => {
					const inner: GateItem = { ...it, id: `g${i + 1}` };
					delete inner.source;
					return inner;
				})
			};
			this.broadcastBlocks.push(block);
			this.broadcastByKey.set(key, block);
		}
		const origin = this.originAt(start);
		const source = made[0].source;
		this.items.length = start;
		this.originOf.length = start;
		const item: CallItem = { id: `g${this.nextItemId++}`, type: 'call', block: block.name, args: {}, label: `${call.name} ${register} (broadcast over ${made.length} gates)` };
		if (source) item.source = source;
		this.items.push(item);
		this.originOf.push(origin);
	}

	private phaseGate(ctrls: number[], t: number, a: Num, o: Op): void {
		if (ctrls.length === 0) this.push('p', [t], o, a);
		else if (ctrls.length === 1) this.push('cp', [ctrls[0], t], o, a);
		else this.push('mcp', [...ctrls, t], o, a);
	}

	emit(o: Op): void {
		const cs = o.ctrls;
		switch (o.kind) {
			case 'x':
				if (cs.length === 0) this.push('x', [o.t[0]], o);
				else if (cs.length === 1) this.push('cx', [cs[0], o.t[0]], o);
				else if (cs.length === 2) this.push('ccx', [cs[0], cs[1], o.t[0]], o);
				else {
					// C^k X = H · C^k Z · H, and C^k Z is a phase of π with k controls: exact.
					this.push('h', [o.t[0]], o);
					this.phaseGate(cs, o.t[0], PI, o);
					this.push('h', [o.t[0]], o);
				}
				return;
			case 'phase':
				this.phaseGate(cs, o.t[0], o.angle!, o);
				return;
			case 'rz':
				// rz(θ) = e^{−iθ/2}·p(θ): under controls the global phase lands on the last control.
				if (cs.length === 0) this.push('rz', [o.t[0]], o, o.angle!);
				else {
					this.phaseGate(cs.slice(0, -1), cs[cs.length - 1], neg(half(o.angle!)), o);
					this.phaseGate(cs, o.t[0], o.angle!, o);
				}
				return;
			case 'gphase':
				if (cs.length > 0 && !isExactZero(o.angle!)) this.phaseGate(cs.slice(0, -1), cs[cs.length - 1], o.angle!, o);
				return;
			case 'swap':
				if (cs.length === 0) this.push('swap', [o.t[0], o.t[1]], o);
				else {
					const [a, b] = o.t;
					this.push('cx', [b, a], o);
					this.emit({ ...o, kind: 'x', ctrls: [...cs, a], t: [b] });
					this.push('cx', [b, a], o);
				}
				return;
			case 'reset':
				if (cs.length) this.host.err(o.origin.call, 'a reset cannot be controlled');
				this.push('reset', [o.t[0]], o);
				return;
			case 'h':
				if (cs.length === 0) this.push('h', [o.t[0]], o);
				else this.emit({ ...o, kind: 'u', matrix: MATRICES.h });
				return;
			case 'u': {
				const m = o.matrix!;
				if (cs.length === 0) {
					this.push('u', [o.t[0]], o, undefined, m);
					return;
				}
				if (cs.length === 1) {
					// Nielsen and Chuang, Corollary 4.2 and Fig. 4.6: U = e^{iα}·A·X·B·X·C with A·B·C = I.
					const { alpha, beta, gamma, delta } = zyz(m);
					const t = o.t[0];
					const A = matMul(rzMatrix(beta), ryMatrix(gamma / 2));
					const B = matMul(ryMatrix(-gamma / 2), rzMatrix(-(delta + beta) / 2));
					const C = rzMatrix((delta - beta) / 2);
					this.push('u', [t], o, undefined, C);
					this.push('cx', [cs[0], t], o);
					this.push('u', [t], o, undefined, B);
					this.push('cx', [cs[0], t], o);
					this.push('u', [t], o, undefined, A);
					if (Math.abs(alpha) > 1e-15) this.push('p', [cs[0]], o, { exact: false, v: alpha });
					return;
				}
				// Barenco et al. 1995, Lemma 7.5: C^k U from C-V, C^{k−1}X, C-V†, C^{k−1}X, C^{k−1}V with V² = U.
				const v = matSqrt(m);
				const last = cs[cs.length - 1];
				const rest = cs.slice(0, -1);
				this.emit({ ...o, ctrls: [last], matrix: v });
				this.emit({ ...o, kind: 'x', ctrls: rest, t: [last] });
				this.emit({ ...o, ctrls: [last], matrix: matDagger(v) });
				this.emit({ ...o, kind: 'x', ctrls: rest, t: [last] });
				this.emit({ ...o, ctrls: rest, matrix: v });
				return;
			}
		}
	}
}
