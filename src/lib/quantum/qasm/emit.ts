/**
 * Semantic ops → document gate items: a gate with any number of controls becomes the document's
 * gates (p, cp, mcp, cx, ccx, u, …), exactly where an exact form exists; each item keeps the
 * position of its top-level call. A broadcast over a whole register is compacted into one call
 * of a shared block.
 *
 * Qubit order: flat qubits (declaration order) are named through `flatToRef` (`reg[i]`, bit i).
 * Angles: ops carry radians (`Num`); items carry turns (`"k/2^m turn"` or `"~t"`).
 */
import type { BodyItem, CallItem, CircuitDocument, GateItem, Matrix2, QubitRef, UserBlock } from '../circuit.js';
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

/**
 * A document whose `body` is made on first read (then kept; assigning replaces it). The keys
 * come in the document's usual order, so JSON and spreads read the same as a plain document.
 */
export function documentWithBody(head: Omit<CircuitDocument, 'body' | 'blocks'>, blocks: UserBlock[] | undefined, make: () => BodyItem[]): CircuitDocument {
	let body: BodyItem[] | undefined;
	// Dropped once used: until then the document keeps what makes its body (the reader) alive.
	let maker: (() => BodyItem[]) | null = make;
	const doc = { ...head } as CircuitDocument;
	Object.defineProperty(doc, 'body', {
		enumerable: true,
		configurable: true,
		get: () => {
			if (body === undefined) {
				body = maker!();
				maker = null;
			}
			return body;
		},
		set: (v: BodyItem[]) => {
			body = v;
			maker = null;
		}
	});
	if (blocks !== undefined) doc.blocks = blocks;
	return doc;
}

/** The definitions of a fast-path gate's origin: none (one frozen list shared by all). */
const NO_DEFINITIONS: GateOrigin['definitions'] = Object.freeze([]) as unknown as GateOrigin['definitions'];

/**
 * Ints kept per entry, in one array: for a fast-path gate the reader's code for its call (which
 * names the document gate and the OpenQASM name), qubit list, angle (−1 none), line, column and
 * id number; `OBJ` is −1 for such a gate, else the entry's index in `objects` (an item made from
 * the start).
 */
const STRIDE = 7;
const OBJ = 6;

/**
 * Collects the document's body entries and, per entry, its origin.
 *
 * A gate from the reader's fast path (most of a large file) is kept as seven ints (see `STRIDE`)
 * and its item is made only when the body is read: making one object per gate and keeping it
 * alive was most of a large import's time (allocation and the collector), and readers such as
 * the upload form's register preview and the decomposition search need no items. Every other
 * gate or call is an item from the start. {@link items} makes the same items the fast path made
 * before (same keys in the same order), once; {@link itemAt} makes one that is not made yet.
 */
export class GateEmitter {
	/** Entries so far. */
	private count = 0;
	private cols: Int32Array<ArrayBuffer>;
	/** Items made from the start (and their origins), in order. */
	private readonly objects: BodyItem[] = [];
	private readonly objectOrigins: GateOrigin[] = [];
	/** The body's items once made (a prefix of the entries; see {@link items}). */
	private made: BodyItem[] = [];
	/** By the reader's call code: the document gate and the OpenQASM name (a fast-path gate's origin is the name, the item's source, no definitions). */
	private readonly gateNames: GateItem['gate'][] = [];
	private readonly qasmNames: string[] = [];
	/** Qubit lists of fast-path gates, shared by every gate on the same qubits in the same order (treat as immutable). */
	private readonly lists: QubitRef[][] = [];
	private readonly listIds = new Map<number, number>();
	/** Angle texts by number, and the number of each angle value met (exported files repeat a few, and the reader hands out the same Num for each). */
	private readonly angleList: string[] = [];
	private readonly angleIds = new Map<Num, number>();
	private originsMade: GateOrigin[] | null = null;
	/** Gates made so far (a broadcast's gates sit in its block, so this is more than the entry count). */
	gatesMade = 0;
	private nextItemId = 1;
	/** Blocks made for broadcasts (`h q;` over a register stays one call item), by content. */
	readonly broadcastBlocks: UserBlock[] = [];
	private readonly broadcastByKey = new Map<string, UserBlock>();

	/**
	 * `flatToRef[q]` names flat qubit q; the reader appends to it as registers are declared.
	 * `expected`: entries to make room for at first (a guess from the file's size; it grows).
	 */
	constructor(
		private readonly host: EmitHost,
		private readonly flatToRef: QubitRef[],
		expected = 1024
	) {
		this.cols = new Int32Array(Math.max(1024, Math.min(expected, 1 << 22)) * STRIDE);
	}

	/** Body entries so far. */
	get length(): number {
		return this.count;
	}

	/** The body's items, all made (each once). The same array on every read while nothing is added. */
	get items(): BodyItem[] {
		const made = this.made;
		if (made.length > this.count) made.length = this.count;
		for (let i = made.length; i < this.count; i++) made.push(this.itemAt(i));
		return made;
	}

	/** Item i of the body: the one made, or for a fast-path gate not made yet, a new one (equal to the one {@link items} makes). */
	itemAt(i: number): BodyItem {
		if (i < this.made.length) return this.made[i];
		const o = this.cols[i * STRIDE + OBJ];
		return o >= 0 ? this.objects[o] : this.makeFast(i);
	}

	/**
	 * Entry i's gate name, qubit list and angle text without making its item: what the
	 * decomposition search reads of every gate. Null for an entry that is not a gate item.
	 */
	gateAt(i: number): GateItem['gate'] | null {
		const o = this.cols[i * STRIDE + OBJ];
		if (o < 0) return this.gateNames[this.cols[i * STRIDE]];
		const e = this.objects[o];
		return e.type === 'gate' ? e.gate : null;
	}
	qubitsAt(i: number): QubitRef[] {
		const o = this.cols[i * STRIDE + OBJ];
		return o < 0 ? this.lists[this.cols[i * STRIDE + 1]] : (this.objects[o] as GateItem).qubits;
	}
	angleAt(i: number): string | undefined {
		const o = this.cols[i * STRIDE + OBJ];
		if (o >= 0) return (this.objects[o] as GateItem).angle;
		const a = this.cols[i * STRIDE + 2];
		return a < 0 ? undefined : this.angleList[a];
	}

	private makeFast(i: number): GateItem {
		const c = this.cols;
		const k = i * STRIDE;
		const id = `g${c[k + 5]}`;
		const gate = this.gateNames[c[k]];
		const qubits = this.lists[c[k + 1]];
		const source = this.sourceAt(i);
		const a = c[k + 2];
		return a < 0 ? { id, type: 'gate', gate, qubits, source } : { id, type: 'gate', gate, qubits, source, angle: this.angleList[a] };
	}

	/** Room for one more entry. */
	private grow(): void {
		const cols = new Int32Array(this.cols.length * 2);
		cols.set(this.cols);
		this.cols = cols;
	}

	/** Add an item made from the start, with its origin. */
	private addObject(item: BodyItem, origin: GateOrigin): void {
		if (this.count * STRIDE === this.cols.length) this.grow();
		this.cols[this.count++ * STRIDE + OBJ] = this.objects.length;
		this.objects.push(item);
		this.objectOrigins.push(origin);
	}

	/** Drop the entries from `start` on (a broadcast's gates). */
	private truncate(start: number): void {
		let first = this.objects.length;
		for (let i = start; i < this.count; i++)
			if (this.cols[i * STRIDE + OBJ] >= 0) {
				first = this.cols[i * STRIDE + OBJ];
				break;
			}
		this.objects.length = first;
		this.objectOrigins.length = first;
		if (this.made.length > start) this.made.length = start;
		this.count = start;
	}

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
		this.addObject(item, o.origin);
		this.gatesMade++;
	}

	/**
	 * One gate from the reader's fast path (a standard gate without controls to lower): the call
	 * `qasm` (the reader's `code` for it, always the same document `gate`) on the first `nq` (one to
	 * three) of flat qubits `qs` at line:column, with `angle`, which is the value of the reader's
	 * remembered parameter `param` when there is one (it keeps the angle's number here). Kept as
	 * ints, its item (the one {@link push} would make) made when read.
	 */
	pushFast(code: number, gate: GateItem['gate'], qasm: string, qs: number[], nq: number, line: number, column: number, angle: Num | undefined, param: { angleId: number } | null): void {
		if (this.gatesMade >= this.host.limits.maxGates) this.host.err({ line, column }, `more than ${this.host.limits.maxGates} gates after expanding gate definitions (limit)`);
		const i = this.count;
		if (i * STRIDE === this.cols.length) this.grow();
		if (this.gateNames[code] === undefined) {
			this.gateNames[code] = gate;
			this.qasmNames[code] = qasm;
		}
		let a = -1;
		if (param !== null && param.angleId >= 0) a = param.angleId;
		else if (angle !== undefined) {
			a = this.angleId(angle);
			if (param !== null) param.angleId = a;
		}
		const c = this.cols;
		const k = i * STRIDE;
		c[k] = code;
		c[k + 1] = this.listId(qs, nq);
		c[k + 2] = a;
		c[k + 3] = line;
		c[k + 4] = column;
		c[k + 5] = this.nextItemId++;
		c[k + OBJ] = -1;
		this.count = i + 1;
		this.gatesMade++;
	}

	/** The origin of entry i: the call's for an item made from the start; for a fast-path gate its OpenQASM name, the item's source and no definitions. */
	originAt(i: number): GateOrigin {
		const o = this.cols[i * STRIDE + OBJ];
		return o >= 0 ? this.objectOrigins[o] : { qasm: this.qasmNames[this.cols[i * STRIDE]], call: i < this.made.length ? this.made[i].source! : this.sourceAt(i), definitions: NO_DEFINITIONS };
	}

	/** A fast-path gate's source position. */
	private sourceAt(i: number): { line: number; column: number } {
		return { line: this.cols[i * STRIDE + 3], column: this.cols[i * STRIDE + 4] };
	}

	/** Per entry its origin, made on first use (a large file's reader makes none for plain gates until asked). */
	get origins(): GateOrigin[] {
		if (this.originsMade === null || this.originsMade.length !== this.count) {
			const out: GateOrigin[] = new Array(this.count);
			for (let i = 0; i < out.length; i++) out[i] = this.originAt(i);
			this.originsMade = out;
		}
		return this.originsMade;
	}

	/**
	 * The id of the shared qubit list for the first `nq` (one to three) flat qubits of `qs`: a
	 * large file has few distinct ones. Past 100 000 qubits or lists, each gate gets its own list.
	 */
	private listId(qs: number[], nq: number): number {
		const n = this.flatToRef.length + 1;
		if (n > 100_000) return this.newList(qs, nq);
		const key = nq === 1 ? qs[0] : nq === 2 ? n + qs[0] * n + qs[1] : n + n * n + (qs[0] * n + qs[1]) * n + qs[2];
		let id = this.listIds.get(key);
		if (id === undefined) {
			id = this.newList(qs, nq);
			if (this.listIds.size < 100_000) this.listIds.set(key, id);
		}
		return id;
	}
	private newList(qs: number[], nq: number): number {
		const list: QubitRef[] = new Array(nq);
		for (let k = 0; k < nq; k++) list[k] = this.flatToRef[qs[k]];
		this.lists.push(list);
		return this.lists.length - 1;
	}

	/** The number of an angle's text in `angleList` (made on first meeting the value). */
	private angleId(angle: Num): number {
		let a = this.angleIds.get(angle);
		if (a === undefined) {
			a = this.angleList.length;
			this.angleList.push(angleText(numToAngle(angle)));
			if (this.angleIds.size < 10_000) this.angleIds.set(angle, a);
		}
		return a;
	}
	private angleTextOf(angle: Num): string {
		return this.angleList[this.angleId(angle)];
	}

	/**
	 * A broadcast (`h q;` over a register) stays one item: the gates it made (items from `start`)
	 * move into a block (shared by every broadcast that made the same gates) and one call item
	 * takes their place. Without this, `h q;` on 1000 qubits three hundred times stored 300 000 items.
	 */
	compactBroadcast(call: GateCall, start: number, register: string): void {
		const made: GateItem[] = [];
		for (let i = start; i < this.count; i++) made.push(this.itemAt(i) as GateItem);
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
		this.truncate(start);
		const item: CallItem = { id: `g${this.nextItemId++}`, type: 'call', block: block.name, args: {}, label: `${call.name} ${register} (broadcast over ${made.length} gates)` };
		if (source) item.source = source;
		this.addObject(item, origin);
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
