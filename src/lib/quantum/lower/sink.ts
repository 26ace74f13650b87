/**
 * The gate sink of lowering: gates accumulate as struct-of-arrays (typed arrays that grow by
 * doubling), each tagged with the current block, item and loop indices. Qubits are flat indices
 * (register offset + index, index 0 = LSB); angles are ids into the sink's angle table (turns).
 */
import { angleKey } from '../angle.js';
import type { Angle } from '../angle.js';
import type { BlockEffect, BlockInstance, BlockKind, BlockSpec, Matrix2, SourcePosition } from '../circuit.js';

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

/** A typed array that grows by doubling; `finish` cuts it to length. */
class Growable<T extends Int32Array | Uint8Array> {
	data: T;
	length = 0;
	constructor(
		private readonly make: (size: number) => T,
		cap = 1024
	) {
		this.data = make(cap);
	}
	push(v: number): void {
		if (this.length === this.data.length) {
			const d = this.make(this.data.length * 2);
			d.set(this.data);
			this.data = d;
		}
		this.data[this.length++] = v;
	}
	finish(): T {
		return this.data.slice(0, this.length) as T;
	}
}
const int32 = () => new Growable((n) => new Int32Array(n));
const uint8 = () => new Growable((n) => new Uint8Array(n));

/** Accumulates gates as struct-of-arrays, tagging each with the current block, item and loop indices. */
export class GateSink {
	kinds = uint8();
	controlCounts = uint8();
	qubitStart = int32();
	qubitList = int32();
	angleIndex = int32();
	matrixIndex = int32();
	blockOf = int32();
	loops = int32();
	itemOf = int32();
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
