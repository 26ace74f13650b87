/**
 * Expected values: from each library block's stated effect (and its reference lowering inside
 * the block) derive, for given basis-state inputs, what every qubit should hold at each step.
 *
 * Qubit order: flat qubits. Angle units: an expected Fourier qubit at level m holding value v
 * has phase (v mod 2^m)/2^m turn; stored as numerator `num` over 2^level.
 *
 * Events are stated at block boundaries (every qubit of every register the block writes) and
 * inside blocks after each reference step: QFT/iQFT after every gate, adders after every
 * rotation unit (one (j, k) pair, i.e. one cp or one whole ccp lowering). An expectation stays
 * valid ("fresh") until a gate touches the qubit again.
 */
import { powMod } from './modular.js';
import { GateCode, fourierLevel, type BlockInstance, type FourierLayout, type LoweredCircuit, type PlacedRegister, type ValueExpr } from './circuit.js';

/** Kind codes of expectation events. */
export const ExpectKind = { unknown: 0, classical: 1, fourier: 2 } as const;

/** Expectation events in step order (struct of arrays). Event e: at step `step[e]`, qubit `qubit[e]` should be … */
export interface ExpectationEvents {
	length: number;
	step: Int32Array;
	qubit: Int32Array;
	kind: Uint8Array;
	/** classical: the bit; fourier: the level m */
	level: Int32Array;
	/** fourier: numerator over 2^level (0 ≤ num < 2^level); classical/unknown: 0n */
	num: bigint[];
	/** 1 when stated at a block boundary (effect), 0 for a partial inside a block */
	boundary: Uint8Array;
	/** Problems noticed (block requirements not met, unknown inputs). */
	warnings: { block: number; message: string }[];
	/**
	 * Words beside some expectations, keyed `${step}:${qubit}`: the comparison a modular adder's
	 * ancilla holds ("b + a < N: 2 + 46 < 21 fails"), or a Fourier value read as signed
	 * ("b + a − N = −3").
	 */
	notes?: Map<string, string>;
}

/** Key of {@link ExpectationEvents.notes}. */
export const noteKey = (step: number, qubit: number): string => `${step}:${qubit}`;

/** Semantic state of one register during the expectation pass. */
interface RegState {
	basis: 'computational' | 'fourier';
	layout: FourierLayout;
	value: bigint | null;
}

class EventSink implements ExpectationEvents {
	length = 0;
	step = new Int32Array(1024);
	qubit = new Int32Array(1024);
	kind = new Uint8Array(1024);
	level = new Int32Array(1024);
	num: bigint[] = [];
	boundary = new Uint8Array(1024);
	warnings: { block: number; message: string }[] = [];
	notes = new Map<string, string>();
	push(step: number, qubit: number, kind: number, level: number, num: bigint, boundary: number): void {
		if (this.length === this.step.length) {
			const cap = this.length * 2;
			const grow = <T extends Int32Array | Uint8Array>(a: T, make: (n: number) => T): T => {
				const b = make(cap);
				b.set(a);
				return b;
			};
			this.step = grow(this.step, (n) => new Int32Array(n));
			this.qubit = grow(this.qubit, (n) => new Int32Array(n));
			this.kind = grow(this.kind, (n) => new Uint8Array(n));
			this.level = grow(this.level, (n) => new Int32Array(n));
			this.boundary = grow(this.boundary, (n) => new Uint8Array(n));
		}
		const i = this.length++;
		this.step[i] = step;
		this.qubit[i] = qubit;
		this.kind[i] = kind;
		this.level[i] = level;
		this.num.push(num);
		this.boundary[i] = boundary;
	}
}

const mod2 = (v: bigint, bits: number): bigint => {
	const m = 1n << BigInt(bits);
	const r = v % m;
	return r < 0n ? r + m : r;
};

/** Evaluate a {@link ValueExpr} over register values (null when any input is unknown). */
export function evaluateValue(e: ValueExpr, values: (name: string) => bigint | null): bigint | null {
	switch (e.op) {
		case 'reg':
			return values(e.name);
		case 'const':
			return BigInt(e.value);
		case 'bit': {
			const v = values(e.register);
			return v === null ? null : (v >> BigInt(e.index)) & 1n;
		}
		case 'bits': {
			const v = evaluateValue(e.of, values);
			return v === null ? null : mod2(v >> BigInt(e.lo), e.len);
		}
		case 'shl': {
			const v = evaluateValue(e.of, values);
			return v === null ? null : v << BigInt(e.by);
		}
		case 'add': {
			let t = 0n;
			for (const x of e.terms) {
				const v = evaluateValue(x, values);
				if (v === null) return null;
				t += v;
			}
			return t;
		}
		case 'mul': {
			let t = 1n;
			for (const x of e.factors) {
				const v = evaluateValue(x, values);
				if (v === null) return null;
				t *= v;
			}
			return t;
		}
		case 'mod': {
			const v = evaluateValue(e.of, values);
			const m = BigInt(e.modulus);
			return v === null ? null : ((v % m) + m) % m;
		}
		case 'powmod': {
			const x = evaluateValue(e.exp, values);
			return x === null ? null : powMod(BigInt(e.base), x, BigInt(e.modulus));
		}
	}
}

/**
 * Compute expectation events for a run whose register `r` starts in basis state `inputs[r]`
 * (null = unknown, e.g. a register in superposition). Steps: step s is the state after s gates.
 */
export function computeExpectations(c: LoweredCircuit, inputs: Map<string, bigint | null>): ExpectationEvents {
	const pass = new ExpectationPass(c, inputs);
	for (const r of c.registers) pass.stateRegister(0, r, 1);
	pass.processRange(-1, 0, c.gateCount);
	return pass.ev;
}

/**
 * One walk over the lowered circuit in block order: raw gates are simulated classically while
 * their registers are known; a library block whose requirements hold gets its reference steps
 * stated inside (QFT gates, adder rotation units, a modular adder's comparison ancilla) and its
 * stated effect applied at its end. Qubit order: flat; Fourier values as numerators over 2^level.
 */
class ExpectationPass {
	readonly ev = new EventSink();
	/** What each register holds now (basis, layout, value or null when unknown). */
	private readonly env = new Map<string, RegState>();
	private readonly regOfQubit: Int32Array;
	private readonly regByName: Map<string, PlacedRegister>;
	/** Child blocks by parent index (−1 for the top level), in gate order. */
	private readonly children = new Map<number, BlockInstance[]>();
	/** Gates whose target bit is stated by meaning (a modular adder's comparison ancilla), not by simulation. */
	private readonly overrides = new Map<number, { qubit: number; bit: bigint; note: string }>();

	constructor(
		private readonly c: LoweredCircuit,
		inputs: Map<string, bigint | null>
	) {
		this.regOfQubit = new Int32Array(c.qubitCount);
		c.registers.forEach((r, i) => {
			for (let k = 0; k < r.size; k++) this.regOfQubit[r.offset + k] = i;
			const v = inputs.get(r.name);
			this.env.set(r.name, { basis: 'computational', layout: 'unswapped', value: v === undefined ? 0n : v === null ? null : mod2(v, r.size) });
		});
		this.regByName = new Map(c.registers.map((r) => [r.name, r]));
		for (const b of c.blocks) {
			const list = this.children.get(b.parent) ?? [];
			list.push(b);
			this.children.set(b.parent, list);
		}
	}

	private regOf(q: number): PlacedRegister {
		return this.c.registers[this.regOfQubit[q]];
	}

	/** State what qubit q holds at `step` from its register's current state. */
	private stateFromEnv(step: number, q: number, boundary: number): void {
		const r = this.regOf(q);
		const st = this.env.get(r.name)!;
		if (st.value === null) return this.ev.push(step, q, ExpectKind.unknown, 0, 0n, boundary);
		const i = q - r.offset;
		if (st.basis === 'computational') return this.ev.push(step, q, ExpectKind.classical, Number((st.value >> BigInt(i)) & 1n), 0n, boundary);
		const m = fourierLevel(st.layout, r.size, i);
		this.ev.push(step, q, ExpectKind.fourier, m, mod2(st.value, m), boundary);
	}

	/** State every qubit of r at `step`. */
	stateRegister(step: number, r: PlacedRegister, boundary: number): void {
		for (let i = 0; i < r.size; i++) this.stateFromEnv(step, r.offset + i, boundary);
	}

	/** State what every qubit gate g touches holds at `step` (from the registers' current states). */
	private stateTouched(g: number, step: number): void {
		const c = this.c;
		for (let i = c.qubitStart[g]; i < c.qubitStart[g + 1]; i++) this.stateFromEnv(step, c.qubitList[i], 0);
	}

	/** Qubit q's bit when its register is known and computational, else null. */
	private bitOf(q: number): bigint | null {
		const r = this.regOf(q);
		const st = this.env.get(r.name)!;
		if (st.value === null || st.basis !== 'computational') return null;
		return (st.value >> BigInt(q - r.offset)) & 1n;
	}

	private setBit(q: number, b: bigint): void {
		const r = this.regOf(q);
		const st = this.env.get(r.name)!;
		const m = 1n << BigInt(q - r.offset);
		st.value = b ? st.value! | m : st.value! & ~m;
	}

	/** Walk gates [start, end) of block `parent`: its child blocks as blocks, the rest as raw gates. */
	processRange(parent: number, start: number, end: number): void {
		let g = start;
		for (const b of this.children.get(parent) ?? []) {
			for (; g < b.start; g++) this.rawGate(g);
			this.processBlock(b);
			g = b.end;
		}
		for (; g < end; g++) this.rawGate(g);
	}

	/** A gate outside any library block: classical gates on known computational registers stay known. */
	private rawGate(g: number): void {
		if (this.applyOverride(g)) return;
		const c = this.c;
		const k = c.kinds[g];
		// A reset claims the qubit is |0⟩ there and changes nothing; the engines check the claim.
		if (k === GateCode.reset) return;
		const classical = k === GateCode.x || k === GateCode.cx || k === GateCode.ccx || k === GateCode.mcx || k === GateCode.swap;
		let ok = classical;
		for (let i = c.qubitStart[g]; i < c.qubitStart[g + 1]; i++) if (this.bitOf(c.qubitList[i]) === null) ok = false;
		if (ok) {
			const q0 = c.qubitStart[g];
			const q1 = c.qubitStart[g + 1];
			if (k === GateCode.swap) {
				const a = c.qubitList[q0];
				const b = c.qubitList[q0 + 1];
				const ba = this.bitOf(a)!;
				this.setBit(a, this.bitOf(b)!);
				this.setBit(b, ba);
			} else {
				let all = true;
				for (let i = q0; i < q1 - 1; i++) if (this.bitOf(c.qubitList[i]) === 0n) all = false;
				const t = c.qubitList[q1 - 1];
				if (all) this.setBit(t, this.bitOf(t)! ^ 1n);
			}
		} else {
			for (let i = c.qubitStart[g]; i < c.qubitStart[g + 1]; i++) this.env.get(this.regOf(c.qubitList[i]).name)!.value = null;
		}
		this.stateTouched(g, g + 1);
	}

	/** A gate whose target bit is stated by meaning: set it (when its register is known) with its note; false when g has none. */
	private applyOverride(g: number): boolean {
		const ov = this.overrides.get(g);
		if (!ov) return false;
		this.overrides.delete(g);
		const r = this.regOf(ov.qubit);
		const st = this.env.get(r.name)!;
		if (st.value === null || st.basis !== 'computational') return false;
		const m = 1n << BigInt(ov.qubit - r.offset);
		st.value = ov.bit ? st.value | m : st.value & ~m;
		this.stateTouched(g, g + 1);
		this.ev.notes.set(noteKey(g + 1, ov.qubit), ov.note);
		return true;
	}

	/** A library block: reference steps inside when its requirements hold (else unknown), then its effect at the end. */
	private processBlock(b: BlockInstance): void {
		const spec = b.spec;
		if (spec.kind === 'call' || spec.kind === 'ccp') {
			this.processRange(b.index, b.start, b.end);
			return;
		}
		const entry = new Map<string, bigint | null>();
		for (const [k, v] of this.env) entry.set(k, v.value);
		const ok = this.requirementsMet(b);
		if (ok) {
			if (spec.kind === 'mod-add') this.modAddAncilla(b, entry);
			if (spec.kind === 'multiply' || spec.kind === 'mod-add' || spec.kind === 'mod-mul' || spec.kind === 'mod-mul-inplace' || spec.kind === 'mod-exp') this.processRange(b.index, b.start, b.end);
			else if (spec.kind === 'qft' || spec.kind === 'iqft') this.partialsQft(b, spec.kind, this.regByName.get(spec.register)!, entry.get(spec.register)!, spec.swaps);
			else if (spec.kind === 'add' || spec.kind === 'add-const') this.partialsAdd(b, entry);
		} else {
			for (let g = b.start; g < b.end; g++) for (let i = this.c.qubitStart[g]; i < this.c.qubitStart[g + 1]; i++) this.ev.push(g + 1, this.c.qubitList[i], ExpectKind.unknown, 0, 0n, 0);
		}
		this.applyEffect(b, entry, ok);
	}

	/** Whether every register the block requires is known and in the basis (and layout) it needs; a warning when not. */
	private requirementsMet(b: BlockInstance): boolean {
		for (const req of b.effect?.requires ?? []) {
			const st = this.env.get(req.register)!;
			if (st.value === null) return false;
			if (st.basis !== req.basis || (req.basis === 'fourier' && req.layout && st.layout !== req.layout)) {
				this.ev.warnings.push({
					block: b.index,
					message: `${b.label}: expects ${req.register} in the ${req.basis} basis${req.layout ? ` (${req.layout})` : ''}, but it is ${st.basis}${st.basis === 'fourier' ? ` (${st.layout})` : ''}`
				});
				return false;
			}
		}
		return true;
	}

	/** The block's stated writes, evaluated on the values at its entry (unknown when its requirements failed), stated at its end. */
	private applyEffect(b: BlockInstance, entry: Map<string, bigint | null>, ok: boolean): void {
		for (const w of b.effect?.writes ?? []) {
			const r = this.regByName.get(w.register)!;
			const v = ok ? evaluateValue(w.value, (n) => entry.get(n) ?? null) : null;
			this.env.set(w.register, { basis: w.basis, layout: w.layout ?? 'unswapped', value: v === null ? null : mod2(v, r.size) });
			this.stateRegister(b.end, r, 1);
			if (v !== null && b.spec.kind === 'add-const' && b.spec.holds && w.register === b.spec.target) {
				// Two's complement over the register: the construction's values lie in (−2^(m−1), 2^(m−1)).
				const u = mod2(v, r.size);
				const signed = u >= 1n << BigInt(r.size - 1) ? u - (1n << BigInt(r.size)) : u;
				const note = `${b.spec.holds} = ${signed}`;
				for (let i = 0; i < r.size; i++) this.ev.notes.set(noteKey(b.end, r.offset + i), note);
			}
		}
	}

	/** State the comparison ancilla of a modular adder by meaning: [b + a < N] after the copy, 0 after the clear. */
	private modAddAncilla(b: BlockInstance, entry: Map<string, bigint | null>): void {
		const spec = b.spec;
		if (spec.kind !== 'mod-add') return;
		const bv = entry.get(spec.target);
		if (bv === null || bv === undefined) return;
		let on = true;
		for (const q of spec.controls) {
			const cb = this.bitOf(q);
			if (cb === null) return;
			if (cb === 0n) on = false;
		}
		const a = BigInt(spec.value);
		const N = BigInt(spec.modulus);
		const ca = on ? a : 0n;
		const off = spec.controls.length && !on ? ' (control off, a counts as 0)' : '';
		if (!spec.inverse) {
			const holds = bv + ca < N;
			this.overrides.set(spec.compareGate, { qubit: spec.ancilla, bit: holds ? 1n : 0n, note: `b + a < N${off}: ${bv} + ${ca} < ${N} ${holds ? 'holds' : 'fails'}` });
			this.overrides.set(spec.clearGate, { qubit: spec.ancilla, bit: 0n, note: 'cleared: (b + a) mod N ≥ a' });
		} else {
			const holds = bv >= ca;
			this.overrides.set(spec.clearGate, { qubit: spec.ancilla, bit: holds ? 1n : 0n, note: `b − a ≥ 0${off}: ${bv} − ${ca} ≥ 0 ${holds ? 'holds' : 'fails'}` });
			this.overrides.set(spec.compareGate, { qubit: spec.ancilla, bit: 0n, note: 'cleared' });
		}
	}

	/** Inside a QFT or inverse QFT on r (value x): what each qubit holds after every gate, tracked through swaps. */
	private partialsQft(b: BlockInstance, kind: 'qft' | 'iqft', r: PlacedRegister, x: bigint, swaps: boolean): void {
		const c = this.c;
		// cur: expected content of each qubit of r as (kind, level, num), tracked through swaps.
		const n = r.size;
		const curKind = new Uint8Array(n);
		const curLevel = new Int32Array(n);
		const curNum: bigint[] = new Array(n).fill(0n);
		const xb = (i: number) => Number((x >> BigInt(i)) & 1n);
		for (let i = 0; i < n; i++) {
			if (kind === 'qft') {
				curKind[i] = ExpectKind.classical;
				curLevel[i] = xb(i);
			} else {
				const m = fourierLevel(swaps ? 'swapped' : 'unswapped', n, i);
				curKind[i] = ExpectKind.fourier;
				curLevel[i] = m;
				curNum[i] = mod2(x, m);
			}
		}
		const emit = (step: number, i: number) => this.ev.push(step, r.offset + i, curKind[i], curLevel[i], curNum[i], 0);
		for (let g = b.start; g < b.end; g++) {
			const code = c.kinds[g];
			const j = c.loops[3 * g];
			const k = c.loops[3 * g + 1];
			if (code === GateCode.swap) {
				const a = c.qubitList[c.qubitStart[g]] - r.offset;
				const bq = c.qubitList[c.qubitStart[g] + 1] - r.offset;
				for (const arr of [curKind, curLevel] as (Uint8Array | Int32Array)[]) {
					const t = arr[a];
					arr[a] = arr[bq];
					arr[bq] = t;
				}
				const t = curNum[a];
				curNum[a] = curNum[bq];
				curNum[bq] = t;
				emit(g + 1, a);
				emit(g + 1, bq);
				continue;
			}
			const low = mod2(x, j + 1);
			if (kind === 'qft') {
				const lo = k < 0 ? j : k; // bits j … lo of x are now on qubit j
				curKind[j] = ExpectKind.fourier;
				curLevel[j] = j + 1 - lo;
				curNum[j] = low >> BigInt(lo);
			} else if (code === GateCode.h) {
				curKind[j] = ExpectKind.classical;
				curLevel[j] = xb(j);
				curNum[j] = 0n;
			} else {
				curKind[j] = ExpectKind.fourier;
				curLevel[j] = j - k;
				curNum[j] = low >> BigInt(k + 1);
			}
			emit(g + 1, j);
			if (k >= 0) emit(g + 1, k);
		}
	}

	/** Inside an adder: after each rotation unit (target qubit j, addend bit k), the target qubit's partial sum; other qubits as their registers say. */
	private partialsAdd(b: BlockInstance, entry: Map<string, bigint | null>): void {
		const c = this.c;
		const spec = b.spec;
		if (spec.kind !== 'add' && spec.kind !== 'add-const') return;
		const tgt = this.regByName.get(spec.target)!;
		const base = entry.get(spec.target)!;
		let ctl = 1n;
		for (const q of spec.kind === 'add-const' && spec.controls ? spec.controls : spec.control !== null ? [spec.control] : []) {
			const cb = this.bitOf(q);
			if (cb === null) return;
			ctl *= cb;
		}
		const addend = spec.kind === 'add' ? entry.get(spec.addend)! : BigInt(spec.value);
		let g = b.start;
		while (g < b.end) {
			const j = c.loops[3 * g];
			const k = c.loops[3 * g + 1];
			let e = g + 1;
			while (e < b.end && c.loops[3 * e] === j && c.loops[3 * e + 1] === k) e++;
			// Unit [g, e): rotation(s) for target qubit j from addend bit k (add) or the whole constant (add-const).
			const m = fourierLevel(spec.layout, tgt.size, j);
			const part = spec.kind === 'add' ? mod2(addend, k + 1) : addend;
			const v = mod2(base + ctl * (part << BigInt(spec.shift)), m);
			const seen = new Set<number>();
			for (let h = g; h < e; h++) for (let i = c.qubitStart[h]; i < c.qubitStart[h + 1]; i++) seen.add(c.qubitList[i]);
			for (const q of seen) {
				if (q === tgt.offset + j) this.ev.push(e, q, ExpectKind.fourier, m, v, 0);
				else this.stateFromEnv(e, q, 0);
			}
			g = e;
		}
	}
}
