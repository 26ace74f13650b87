// Browser state of the circuit being edited: the document, undo/redo, selection, and the
// version it was loaded from (a save sends that base so a stale save is refused, not merged).
import type { BodyItem, CircuitDocument, RegisterSpec } from '$lib/quantum/circuit';
import { newItemId } from '$lib/quantum/templates';

const REGISTER_KEYS = new Set(['register', 'addend', 'target', 'a', 'b', 'product']);
const NAME_RE = /^[A-Za-z_][A-Za-z0-9_]*$/;
export const MAX_REGISTER_SIZE = 64;
export const MAX_UNDO = 200;

function clone<T>(v: T): T {
	return JSON.parse(JSON.stringify(v)) as T;
}

/** Rename every reference to register `from` in items (fields naming a register, and qubit refs). */
export function renameRegisterInItems(items: BodyItem[], from: string, to: string): BodyItem[] {
	const visit = (v: unknown): unknown => {
		if (Array.isArray(v)) return v.map(visit);
		if (v && typeof v === 'object') {
			const out: Record<string, unknown> = {};
			for (const [k, x] of Object.entries(v)) out[k] = REGISTER_KEYS.has(k) && x === from ? to : visit(x);
			return out;
		}
		return v;
	};
	return items.map((i) => visit(i) as BodyItem);
}

export class CircuitEditor {
	doc = $state<CircuitDocument>() as CircuitDocument;
	/** Version the document was loaded from or last saved as. */
	baseVersion = $state(0);
	selectedId = $state<string | null>(null);
	dirty = $state(false);
	/** A field holds text not yet in the document (e.g. a spec line that does not parse). */
	draft = $state(false);
	#undo: string[] = [];
	/** Key of the last change when consecutive changes of one field merge into one undo step. */
	#mergeKey: string | null = null;
	#redo: string[] = [];
	undoCount = $state(0);
	redoCount = $state(0);
	readonly readOnly: boolean;

	constructor(doc: CircuitDocument, baseVersion: number, readOnly = false) {
		this.doc = clone(doc);
		this.baseVersion = baseVersion;
		this.readOnly = readOnly;
	}

	get selected(): BodyItem | undefined {
		return this.doc.body.find((b) => b.id === this.selectedId);
	}

	/**
	 * Apply a change as one undo step. Changes with the same `merge` key in a row (typing in one
	 * field) make a single step.
	 */
	change(fn: (doc: CircuitDocument) => void, merge: string | null = null): void {
		if (this.readOnly) return;
		if (merge === null || merge !== this.#mergeKey || !this.#undo.length) {
			this.#undo.push(JSON.stringify($state.snapshot(this.doc)));
			if (this.#undo.length > MAX_UNDO) this.#undo.shift();
		}
		this.#mergeKey = merge;
		this.#redo = [];
		fn(this.doc);
		this.#sync();
		this.dirty = true;
	}

	undo(): void {
		this.#mergeKey = null;
		const prev = this.#undo.pop();
		if (prev === undefined) return;
		this.#redo.push(JSON.stringify($state.snapshot(this.doc)));
		this.doc = JSON.parse(prev);
		this.#sync();
		this.dirty = true;
	}

	redo(): void {
		const next = this.#redo.pop();
		if (next === undefined) return;
		this.#undo.push(JSON.stringify($state.snapshot(this.doc)));
		this.doc = JSON.parse(next);
		this.#sync();
		this.dirty = true;
	}

	#sync() {
		this.undoCount = this.#undo.length;
		this.redoCount = this.#redo.length;
		if (this.selectedId && !this.doc.body.some((b) => b.id === this.selectedId)) this.selectedId = null;
	}

	/** The strip after a drag: same items in a new order, or with a new one dropped in. */
	setBody(items: BodyItem[]): void {
		const before = this.doc.body.map((b) => b.id).join('\n');
		const after = items.map((b) => b.id).join('\n');
		if (before === after) return;
		this.change((d) => {
			d.body = clone(items);
		});
	}

	insertItem(item: BodyItem, at = this.doc.body.length): void {
		this.change((d) => d.body.splice(at, 0, item));
		this.selectedId = item.id;
	}

	updateItem(id: string, patch: (item: BodyItem) => BodyItem): void {
		const i = this.doc.body.findIndex((b) => b.id === id);
		if (i < 0) return;
		this.change((d) => {
			d.body[i] = patch(clone($state.snapshot(d.body[i]) as BodyItem));
		});
	}

	removeItem(id: string): void {
		this.change((d) => {
			d.body = d.body.filter((b) => b.id !== id);
		});
	}

	duplicateItem(id: string): void {
		const i = this.doc.body.findIndex((b) => b.id === id);
		if (i < 0) return;
		const copy = { ...clone($state.snapshot(this.doc.body[i]) as BodyItem), id: newItemId(this.doc, 'copy') };
		this.insertItem(copy, i + 1);
	}

	moveItem(id: string, delta: -1 | 1): void {
		const i = this.doc.body.findIndex((b) => b.id === id);
		const j = i + delta;
		if (i < 0 || j < 0 || j >= this.doc.body.length) return;
		this.change((d) => {
			const [it] = d.body.splice(i, 1);
			d.body.splice(j, 0, it);
		});
	}

	/** Check a register edit; returns a message for the form field, or null when fine. */
	registerProblem(name: string, size: number, except?: string): string | null {
		if (!NAME_RE.test(name)) return 'A name starts with a letter or _, then letters, digits or _.';
		if (name !== except && this.doc.registers.some((r) => r.name === name)) return `There is already a register called ${name}.`;
		if (!Number.isInteger(size) || size < 1) return 'Size is a whole number of qubits, at least 1.';
		if (size > MAX_REGISTER_SIZE) return `At most ${MAX_REGISTER_SIZE} qubits per register here.`;
		return null;
	}

	addRegister(reg: RegisterSpec): void {
		this.change((d) => d.registers.push(reg));
	}

	updateRegister(oldName: string, next: RegisterSpec): void {
		this.change((d) => {
			const i = d.registers.findIndex((r) => r.name === oldName);
			if (i < 0) return;
			d.registers[i] = next;
			if (next.name !== oldName) d.body = renameRegisterInItems(clone($state.snapshot(d.body)) as BodyItem[], oldName, next.name);
		});
	}

	removeRegister(name: string): void {
		this.change((d) => {
			d.registers = d.registers.filter((r) => r.name !== name);
		});
	}

	/**
	 * Turn body items [from, to] into a named block of this circuit, called in their place. Every
	 * register the items use becomes a register parameter of the same name, so the call passes
	 * the registers it had and can be pointed at others. Returns a message when it cannot.
	 */
	makeBlock(name: string, from: number, to: number, description?: string): string | null {
		if (!NAME_RE.test(name)) return 'A block name starts with a letter or _, then letters, digits or _.';
		if ((this.doc.blocks ?? []).some((b) => b.name === name)) return `There is already a block called ${name}.`;
		const n = this.doc.body.length;
		if (!Number.isInteger(from) || !Number.isInteger(to) || from < 0 || to >= n || from > to) return `Pick items between 1 and ${n}, first not after last.`;
		const items = clone($state.snapshot(this.doc.body.slice(from, to + 1)) as BodyItem[]);
		if (items.some((i) => i.type === 'call' && i.block === name)) return 'A block cannot call itself.';
		const used: string[] = [];
		const visit = (v: unknown): void => {
			if (Array.isArray(v)) return v.forEach(visit);
			if (v && typeof v === 'object')
				for (const [k, x] of Object.entries(v)) {
					if (REGISTER_KEYS.has(k) && typeof x === 'string' && !used.includes(x)) used.push(x);
					else visit(x);
				}
		};
		visit(items);
		const regs = this.doc.registers.map((r) => r.name).filter((r) => used.includes(r));
		this.change((d) => {
			d.blocks = [...(d.blocks ?? []), { name, ...(description ? { description } : {}), params: regs.map((r) => ({ name: r, kind: 'register' as const })), body: items }];
			const call: BodyItem = { id: newItemId(d, `call-${name}`), type: 'call', block: name, args: Object.fromEntries(regs.map((r) => [r, r])) };
			d.body.splice(from, to - from + 1, call);
			this.selectedId = call.id;
		});
		return null;
	}

	setTitle(title: string): void {
		this.change((d) => {
			d.title = title;
		});
	}

	/** Plain JSON copy of the document for saving or for the worker. */
	snapshot(): CircuitDocument {
		return $state.snapshot(this.doc) as CircuitDocument;
	}

	markSaved(version: number): void {
		this.baseVersion = version;
		this.dirty = false;
		this.#mergeKey = null;
	}

	/** Forget that there are unsaved edits (they were saved elsewhere, e.g. as a copy). */
	markClean(): void {
		this.dirty = false;
		this.draft = false;
	}
}
