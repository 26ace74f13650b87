/**
 * Recognise decomposed gates in an imported gate list, so the engines and the prover see the
 * gate the engineer meant. Three exact rules, each applied only where the result is the same
 * unitary up to a global constant phase:
 *
 * 1. CNOT regions (a phase polynomial): a run of CNOTs and diagonal gates (p, cp, mcp, rz) whose
 *    CNOTs compose to the identity is diagonal. Each diagonal gate acting on qubits that hold
 *    parities f_q of the run's start values applies θ·∏f_q, and with
 *    f = x₁⊕…⊕x_r = Σ_{∅≠T} (−2)^{|T|−1} ∏_T x it becomes a sum of monomial phases: one p, cp
 *    or mcp per monomial, at the same place, pointing at the same source line; the CNOTs go.
 *    Covers the controlled phase written with p/u1 or rz and two CNOTs (either orientation) and
 *    the doubly controlled phase written with controlled phases and CNOTs (no ancilla).
 *    rz(θ) = e^{−iθ/2}·p(θ): an uncontrolled rz read as p changes only the global phase.
 * 2. The Toffoli as the 6-CNOT, 7-T network of Nielsen & Chuang Fig. 4.9 (the body of `ccx` in
 *    qelib1.inc), matched gate for gate on its three qubits (other qubits' gates may interleave).
 * 3. Cancellation: two diagonal gates on the same qubit set whose exact angles sum to 0 turn, one
 *    of them made by rule 1, with nothing between them on those qubits but diagonal gates made by
 *    rule 1 (which commute with both), are both removed. Gates the file wrote outside a
 *    recognised decomposition are never removed, and a leftover stays beside its own line.
 *
 * Only top-level gate items of a document with literal indices take part; any other item is a
 * barrier. Qubit order: {register, index}, index 0 = LSB. Angles: turns (document strings).
 * Work: bounded by `maxWork` gate visits (a region is tried from each CNOT, at most
 * `maxRegion` gates long).
 *
 * Speed (a large file is hundreds of thousands of gates): the gates live in parallel arrays (kind,
 * qubits, angle; rewritten gates are appended), each pass is a list of indices into them, a region
 * is first only checked (CNOT parities) and rewritten once it is known to close, and a gate is
 * tried for cancellation only when a rewritten gate lies within its window. `testing/peephole-reference.ts`
 * is the plain version the tests compare this one against.
 */
import { addAngles, dyadic, parseAngle, scaleAngle, type Angle } from '../angle.js';
import type { BodyItem, CircuitDocument, GateItem, QubitRef } from '../circuit.js';

/** What {@link recogniseDecompositions} changed. */
export interface PeepholeReport {
	/** CNOT regions rewritten as diagonal gates. */
	regions: number;
	/** Toffoli networks replaced by ccx. */
	toffolis: number;
	/** Toffoli pairs around phases on their target (ccx · cp · ccx) read as doubly controlled phases. */
	toffoliPhases: number;
	/** Pairs of diagonal gates that cancelled exactly. */
	cancelledPairs: number;
	/** rz gates read as p (each changes only the global phase). */
	rzAsPhase: number;
	/** True when the work bound stopped the search early (the rest is left as written). */
	stoppedAtLimit: boolean;
}

/** Options of {@link recogniseDecompositions}. */
export interface PeepholeOptions {
	/** Longest CNOT region tried (gates). Default 512. */
	maxRegion?: number;
	/** Total gate visits before the search stops. Default 40 · gates + 100 000. */
	maxWork?: number;
}

/** Result: the new body, and per new item the index of the old item it came from. */
export interface PeepholeResult {
	body: BodyItem[];
	from: number[];
	report: PeepholeReport;
}

/** Result read in place: the new body's length, its items (made when asked; unchanged items are the view's) and per item the index of the old one it came from. */
export interface PeepholeView {
	length: number;
	/** Every item of the new body, in order. */
	items(): BodyItem[];
	from: Int32Array;
	report: PeepholeReport;
}

// Gate kinds.
const DIAG = 0;
const CX = 1;
const H = 2;
const OTHER = 3;
const BARRIER = 4;

export const EIGHTH = dyadic(1n, 3);
export const MINUS_EIGHTH = dyadic(-1n, 3);

/** Document angle string → angle; fast path for the importer's own `"k/2^m turn"` form. */
export function readAngle(text: string): Angle {
	const cached = angleCache.get(text);
	if (cached) return cached;
	const m = /^(\d+)\/2\^(\d+) turn$/.exec(text);
	const a = m ? dyadic(BigInt(m[1]), Number(m[2])) : text === '0 turn' ? dyadic(0n, 0) : parseAngle(text);
	if (angleCache.size < 10_000) angleCache.set(text, a);
	return a;
}
/** Parsed angle strings (angles are immutable values; files repeat a few of them). */
const angleCache = new Map<string, Angle>();

/** Document angle string for an angle in turns (same form as the importer writes). */
export function angleString(a: Angle): string {
	if (!a.exact) return `~${a.turns}`;
	return a.num === 0n ? '0 turn' : `${a.num}/2^${a.exp} turn`;
}

export const isZero = (a: Angle) => a.exact && a.num === 0n;

/**
 * A body read in place: its length, each entry's gate name, qubit list and angle text (without
 * making the item: the importer keeps most gates in columns), and the item itself when asked.
 * A qubit list may be shared by entries on the same qubits (it is read once per list).
 */
export interface BodyView {
	readonly length: number;
	/** Gate name of entry i, or null when it is not a gate item. */
	gateAt(i: number): string | null;
	qubitsAt(i: number): QubitRef[];
	angleAt(i: number): string | undefined;
	itemAt(i: number): BodyItem;
}

/** A body array as a {@link BodyView}. */
export function viewOf(body: BodyItem[]): BodyView {
	return {
		length: body.length,
		gateAt: (i) => (body[i].type === 'gate' ? (body[i] as GateItem).gate : null),
		qubitsAt: (i) => (body[i] as GateItem).qubits,
		angleAt: (i) => (body[i] as GateItem).angle,
		itemAt: (i) => body[i]
	};
}

/**
 * The gates: entries 0 … n−1 are the body's entries in order (read in place), rewritten gates
 * are appended. `qs` arrays are shared between entries with the same qubits (never changed).
 */
class Gates {
	readonly qs: number[][];
	readonly angle: (Angle | undefined)[];
	kind: Uint8Array;
	made: Uint8Array;
	private readonly extra: BodyItem[] = [];
	length: number;
	constructor(private readonly body: BodyView) {
		const n = body.length;
		this.qs = new Array(n);
		this.angle = new Array(n);
		this.kind = new Uint8Array(n + 64);
		this.made = new Uint8Array(n + 64);
		this.length = n;
	}
	/** Set base entry g (a body entry). */
	set(g: number, kind: number, qs: number[], angle: Angle | undefined): void {
		this.kind[g] = kind;
		this.qs[g] = qs;
		this.angle[g] = angle;
	}
	/** Append a rewritten gate; returns its entry. */
	add(item: BodyItem, kind: number, qs: number[], angle: Angle | undefined, made: boolean): number {
		const g = this.length++;
		if (g === this.kind.length) {
			const k = new Uint8Array(g * 2);
			k.set(this.kind);
			this.kind = k;
			const m = new Uint8Array(g * 2);
			m.set(this.made);
			this.made = m;
		}
		this.kind[g] = kind;
		this.made[g] = made ? 1 : 0;
		this.qs[g] = qs;
		this.angle[g] = angle;
		this.extra.push(item);
		return g;
	}
	item(g: number): BodyItem {
		return g < this.body.length ? this.body.itemAt(g) : this.extra[g - this.body.length];
	}
	gate(g: number): string {
		return g < this.body.length ? this.body.gateAt(g)! : (this.extra[g - this.body.length] as GateItem).gate;
	}
}

const NO_QUBITS: number[] = [];

/**
 * Rewrite decomposed controlled phases, doubly controlled phases and Toffolis in `doc.body` to
 * their native gates (exact up to a global phase). Pure; the document is not changed.
 */
export function recogniseDecompositions(doc: CircuitDocument, options: PeepholeOptions = {}): PeepholeResult {
	const v = recogniseIn(viewOf(doc.body), doc.registers, options);
	return { body: v.items(), from: Array.from(v.from), report: v.report };
}

/** {@link recogniseDecompositions} on a body read in place (see {@link BodyView}); the new body is made only when read. */
export function recogniseIn(view: BodyView, registers: CircuitDocument['registers'], options: PeepholeOptions = {}): PeepholeView {
	const maxRegion = options.maxRegion ?? 512;
	const report: PeepholeReport = { regions: 0, toffolis: 0, toffoliPhases: 0, cancelledPairs: 0, rzAsPhase: 0, stoppedAtLimit: false };
	// Qubit ids are flat positions (register offset + index), so sorting them sorts by register, then index.
	const offsets = new Map<string, number>();
	const sizes = new Map(registers.map((r) => [r.name, r.size]));
	let total = 0;
	for (const r of registers) {
		offsets.set(r.name, total);
		total += r.size;
	}
	const refs: QubitRef[] = [];
	for (const r of registers) for (let i = 0; i < r.size; i++) refs.push({ register: r.name, index: i });
	const G = classifyAll(view, offsets, sizes);
	const n = view.length;
	let work = 0;
	const maxWork = options.maxWork ?? 40 * n + 100_000;

	// 2. Toffolis first: a CNOT region would otherwise take their middle apart. `at[k]` is the gate at position k.
	const at = new Int32Array(n);
	for (let k = 0; k < n; k++) at[k] = k;
	const removed = new Uint8Array(n);
	let toffoliMatched = false;
	for (let i = 0; i < n && !report.stoppedAtLimit; i++) {
		if (G.kind[at[i]] !== H || removed[i]) continue;
		const m = matchToffoli(G, at, removed, i);
		work += m ? m.visited : 8;
		if (work > maxWork) report.stoppedAtLimit = true;
		if (!m) continue;
		const [a, b, c] = m.roles;
		const first = G.item(at[m.matched[0]]);
		const lines = m.matched.map((k) => G.item(at[k]).source?.line).filter((x): x is number => x !== undefined);
		const ccx: GateItem = {
			id: `${first.id}t`,
			type: 'gate',
			gate: 'ccx',
			qubits: [refs[a], refs[b], refs[c]].map((r) => ({ ...r })),
			...(first.source ? { source: first.source } : {}),
			label: lines.length ? `Toffoli written out (lines ${Math.min(...lines)}–${Math.max(...lines)})` : 'Toffoli written out'
		};
		for (const k of m.matched.slice(1)) removed[k] = 1;
		at[m.matched[0]] = G.add(ccx, OTHER, [a, b, c], undefined, false);
		report.toffolis++;
		toffoliMatched = true;
	}

	// 4. Toffoli pairs around phases on their target: ccx(a,b,n) · D · ccx(a,b,n).
	const pairs = toffoliPhases(G, at, removed, refs, maxRegion, report);
	work += pairs.visited;
	if (work > maxWork) report.stoppedAtLimit = true;
	// The list after rules 2 and 4: gate and source position per entry.
	let list1 = at;
	let orig1: Int32Array | null = null; // null: position k came from item k
	if (toffoliMatched || pairs.rewrite.size) {
		let len = 0;
		for (let i = 0; i < n; i++) if (!removed[i]) len += pairs.rewrite.get(i)?.length ?? 1;
		list1 = new Int32Array(len);
		orig1 = new Int32Array(len);
		let o = 0;
		for (let i = 0; i < n; i++) {
			if (removed[i]) continue;
			const rep = pairs.rewrite.get(i);
			if (rep === undefined) {
				list1[o] = at[i];
				orig1[o++] = i;
			} else
				for (const g of rep) {
					list1[o] = g;
					orig1[o++] = i;
				}
		}
	}
	const len1 = list1.length;

	// 1. CNOT regions, rewritten into a second list (gate and source position per entry).
	let out = new Int32Array(len1 + 16);
	let outFrom = new Int32Array(len1 + 16);
	let len = 0;
	const put = (g: number, from: number) => {
		if (len === out.length) {
			const grown = new Int32Array(out.length * 2);
			grown.set(out);
			out = grown;
			const grownFrom = new Int32Array(out.length);
			grownFrom.set(outFrom);
			outFrom = grownFrom;
		}
		out[len] = g;
		outFrom[len++] = from;
	};
	const region = new RegionWalk(G, list1, maxRegion);
	for (let i = 0; i < len1; ) {
		if (G.kind[list1[i]] === CX && !report.stoppedAtLimit) {
			const ok = region.check(i);
			const end = region.end;
			work += region.visited;
			if (work > maxWork) report.stoppedAtLimit = true;
			if (ok) {
				report.regions++;
				const rewrite = region.rewrite(i, end, refs);
				report.rzAsPhase += rewrite.rz;
				for (let k = i; k <= end; k++) {
					const from = orig1 ? orig1[k] : k;
					const rep = rewrite.made.get(k);
					if (rep === undefined) put(list1[k], from);
					else for (const g of rep) put(g, from);
				}
				i = end + 1;
				continue;
			}
		}
		put(list1[i], orig1 ? orig1[i] : i);
		i++;
	}

	// 3. Cancel exact pairs: a gate and the next gate touching its qubits (skipping only gates made
	// from the same source item as either), so a leftover stays next to the line that caused it.
	// Repeated (a few passes) so that a pair whose neighbours cancel later in the list still meets.
	// A pair needs a made gate (rule 1 or 4): a gate that is not made is tried only when a made
	// gate lies within the positions its scan of at most 256 remaining gates can reach.
	const gone = new Uint8Array(len);
	const nextMade = new Int32Array(len + 1);
	nextMade[len] = 0x7fffffff;
	for (let k = len - 1; k >= 0; k--) nextMade[k] = G.made[out[k]] ? k : nextMade[k + 1];
	let goneCount = 0;
	for (let pass = 0, changed = true; changed && pass < 6; pass++) {
		changed = false;
		for (let i = 0; i < len; i++) {
			const gi = out[i];
			if (gone[i] || G.kind[gi] !== DIAG || !G.angle[gi]!.exact) continue;
			if (!G.made[gi] && nextMade[i + 1] > i + 256 + goneCount) continue;
			const set = G.qs[gi];
			for (let j = i + 1, seen = 0; j < len && seen < 256; j++) {
				if (gone[j]) continue;
				const gj = out[j];
				seen++;
				const kj = G.kind[gj];
				if (kj === BARRIER) break;
				if (!overlaps(G.qs[gj], set)) continue;
				if (kj === DIAG && (G.made[gi] || G.made[gj]) && G.angle[gj]!.exact && sameSet(G.qs[gj], set) && isZero(addAngles(G.angle[gi]!, G.angle[gj]!))) {
					gone[i] = gone[j] = 1;
					goneCount += 2;
					changed = true;
					report.cancelledPairs++;
					if (G.gate(gi) === 'rz') report.rzAsPhase++;
					if (G.gate(gj) === 'rz') report.rzAsPhase++;
					break;
				}
				// Siblings (diagonal, made from one source gate) commute with gi and may be stepped over.
				if (kj === DIAG && G.made[gj] && (outFrom[j] === outFrom[i] || (j + 1 < len && outFrom[j + 1] === outFrom[j]) || (j > 0 && outFrom[j - 1] === outFrom[j]))) continue;
				break;
			}
		}
	}
	const order = new Int32Array(len - goneCount);
	const from = new Int32Array(len - goneCount);
	for (let k = 0, o = 0; k < len; k++) {
		if (gone[k]) continue;
		order[o] = out[k];
		from[o++] = outFrom[k];
	}
	return { length: order.length, items: () => Array.from(order, (g) => G.item(g)), from, report };
}

/** Whether two short qubit lists share a qubit (plain loops: this runs for every pair tried). */
function overlaps(a: number[], b: number[]): boolean {
	for (let i = 0; i < a.length; i++) for (let j = 0; j < b.length; j++) if (a[i] === b[j]) return true;
	return false;
}

export function sameSet(a: number[], b: number[]): boolean {
	if (a.length !== b.length) return false;
	for (const x of a) if (!b.includes(x)) return false;
	return true;
}

/** The body's gates into a {@link Gates} table (a qubit list shared by items is read once). */
function classifyAll(body: BodyView, offsets: Map<string, number>, sizes: Map<string, number>): Gates {
	const G = new Gates(body);
	const lists = new Map<QubitRef[], number[] | null>();
	for (let g = 0; g < body.length; g++) {
		const gate = body.gateAt(g);
		if (gate === null) {
			G.set(g, BARRIER, NO_QUBITS, undefined);
			continue;
		}
		const qubits = body.qubitsAt(g);
		let qs = lists.get(qubits);
		if (qs === undefined) {
			qs = [];
			for (const r of qubits) {
				const size = sizes.get(r.register);
				if (size === undefined || typeof r.index !== 'number' || !(r.index >= 0 && r.index < size)) {
					qs = null;
					break;
				}
				qs.push((offsets.get(r.register) ?? 0) + r.index);
			}
			if (lists.size < 100_000) lists.set(qubits, qs);
		}
		if (qs === null) {
			G.set(g, BARRIER, NO_QUBITS, undefined);
			continue;
		}
		switch (gate) {
			case 'p':
			case 'cp':
			case 'mcp':
			case 'rz':
				G.set(g, DIAG, qs, readAngle(body.angleAt(g) ?? '0 turn'));
				break;
			case 'cx':
				G.set(g, CX, qs, undefined);
				break;
			case 'h':
				G.set(g, H, qs, undefined);
				break;
			default:
				G.set(g, OTHER, qs, undefined);
		}
	}
	return G;
}

// ----------------------------------------------------------------------------------------------
// Rule 1: CNOT regions

const MAX_PARITY = 8;
const MAX_TERMS = 256;

/** Symmetric difference of two sorted arrays. */
export function xorSorted(a: number[], b: number[]): number[] {
	const out: number[] = [];
	let i = 0;
	let j = 0;
	while (i < a.length || j < b.length) {
		if (j >= b.length || (i < a.length && a[i] < b[j])) out.push(a[i++]);
		else if (i >= a.length || b[j] < a[i]) out.push(b[j++]);
		else {
			i++;
			j++;
		}
	}
	return out;
}

/**
 * A CNOT region from a CNOT at position `start` of `list`: {@link check} walks the CNOT parities
 * only (no gate is made) to find whether and where the region closes; {@link rewrite} then makes
 * the monomial phases of its diagonal gates. Together they give what the reference's `tryRegion` gives.
 */
class RegionWalk {
	/** Parities of the qubits changed so far (absent = the qubit holds its own start value). */
	private readonly parity = new Map<number, number[]>();
	constructor(
		private readonly G: Gates,
		private readonly list: Int32Array,
		private readonly maxRegion: number
	) {}

	/** Whether qubit q is changed or feeds a changed qubit. */
	private inDirty(q: number): boolean {
		if (this.parity.has(q)) return true;
		for (const p of this.parity.values()) if (p.includes(q)) return true;
		return false;
	}

	/** Apply the CNOT at list position k to the parities; false when a parity grows too long. */
	private cnot(k: number): boolean {
		const qs = this.G.qs[this.list[k]];
		const c = qs[0];
		const t = qs[1];
		const parity = this.parity;
		const nt = xorSorted(parity.get(t) ?? [t], parity.get(c) ?? [c]);
		if (nt.length > MAX_PARITY) return false;
		if (nt.length === 1 && nt[0] === t) parity.delete(t);
		else parity.set(t, nt);
		return true;
	}

	private touchesChanged(qs: number[]): boolean {
		for (let i = 0; i < qs.length; i++) if (this.parity.has(qs[i])) return true;
		return false;
	}

	/** Set by {@link check}: gates visited (work) and, when the region closes, its last position. */
	visited = 0;
	end = 0;

	/** Whether the region from `start` closes (then at {@link end}); {@link visited} counts the work. */
	check(start: number): boolean {
		const { G, list, parity } = this;
		parity.clear();
		let visited = 0;
		this.end = start;
		const stop = Math.min(list.length, start + this.maxRegion);
		for (let k = start; k < stop; k++) {
			visited++;
			const g = list[k];
			const kind = G.kind[g];
			if (kind === CX) {
				if (!this.cnot(k)) return this.done(visited, false);
				if (parity.size === 0) {
					this.end = k;
					return this.done(visited, true);
				}
				continue;
			}
			if (kind === DIAG) {
				const qs = G.qs[g];
				if (!this.touchesChanged(qs)) continue;
				// Too many monomials fails the region; at most ∏(2^|parity| − 1) of them.
				let bound = 1;
				for (const q of qs) bound *= (1 << (parity.get(q)?.length ?? 1)) - 1;
				if (bound > MAX_TERMS && expandProduct(qs.map((q) => parity.get(q) ?? [q])) === null) return this.done(visited, false);
				continue;
			}
			// Any other gate may stay inside the region only if it touches no changed qubit and no
			// qubit a changed one depends on: then it acts on the same values with or without the CNOTs.
			if (kind === BARRIER) return this.done(visited, false);
			const qs = G.qs[g];
			for (let i = 0; i < qs.length; i++) if (this.inDirty(qs[i])) return this.done(visited, false);
		}
		return this.done(visited, false);
	}
	private done(visited: number, ok: boolean): boolean {
		this.visited = visited;
		return ok;
	}

	/** The gates made for a region known to close at `end`: per list position, its replacement (CNOTs: none). */
	rewrite(start: number, end: number, refs: QubitRef[]): { made: Map<number, number[]>; rz: number } {
		const { G, list, parity } = this;
		parity.clear();
		const made = new Map<number, number[]>();
		let rz = 0;
		for (let k = start; k <= end; k++) {
			const g = list[k];
			const kind = G.kind[g];
			if (kind === CX) {
				this.cnot(k);
				made.set(k, []);
				continue;
			}
			if (kind !== DIAG || !this.touchesChanged(G.qs[g])) continue;
			const item = G.item(g) as GateItem;
			const gqs = G.qs[g];
			const terms = expandProduct(gqs.map((q) => parity.get(q) ?? [q]))!;
			const target = gqs[gqs.length - 1];
			const rep: number[] = [];
			let m = 0;
			for (const [mono, coef] of terms) {
				const a = scaleAngle(G.angle[g]!, coef);
				if (isZero(a)) continue;
				rep.push(madePhase(G, refs, item, mono, target, a, `${item.id}r${++m}`, 'between CNOTs'));
			}
			if (item.gate === 'rz') rz++;
			made.set(k, rep);
		}
		return { made, rz };
	}
}

/** A phase on the qubits `set` (`target` last) made from `item`: appended to G as a made diagonal gate. */
function madePhase(G: Gates, refs: QubitRef[], item: GateItem, set: number[], target: number, angle: Angle, id: string, why: string): number {
	const qs = [...set].sort((x, y) => (x === target ? 1 : y === target ? -1 : x - y));
	const gate = qs.length === 1 ? 'p' : qs.length === 2 ? 'cp' : 'mcp';
	const it: GateItem = {
		id,
		type: 'gate',
		gate,
		qubits: qs.map((q) => ({ ...refs[q] })),
		angle: angleString(angle),
		...(item.source ? { source: item.source } : {}),
		label: `${gate} from a ${item.gate} ${why}`
	};
	return G.add(it, DIAG, qs, angle, true);
}

/**
 * θ·∏_q f_q with each f_q the XOR of the variables in `parities[q]`, as a sum over monomials:
 * monomial (sorted variable list) → integer coefficient. Null when it has too many terms.
 */
export function expandProduct(parities: number[][]): Map<number[], bigint> | null {
	// Each parity expands to Σ_{∅≠T⊆vars} (−2)^{|T|−1}·∏T (for XOR of 0/1 values; exact).
	let acc = new Map<string, { mono: number[]; c: bigint }>([['', { mono: [], c: 1n }]]);
	for (const p of parities) {
		const sub: { mono: number[]; c: bigint }[] = [];
		const r = p.length;
		if (r === 0) return new Map();
		if ((1 << r) - 1 > MAX_TERMS) return null;
		for (let mask = 1; mask < 1 << r; mask++) {
			const mono: number[] = [];
			for (let b = 0; b < r; b++) if (mask & (1 << b)) mono.push(p[b]);
			sub.push({ mono, c: (-2n) ** BigInt(mono.length - 1) });
		}
		const next = new Map<string, { mono: number[]; c: bigint }>();
		for (const x of acc.values())
			for (const y of sub) {
				const mono = [...new Set([...x.mono, ...y.mono])].sort((u, v) => u - v);
				const key = mono.join(',');
				const e = next.get(key);
				if (e) e.c += x.c * y.c;
				else next.set(key, { mono, c: x.c * y.c });
			}
		if (next.size > MAX_TERMS) return null;
		acc = next;
	}
	const out = new Map<number[], bigint>();
	for (const x of acc.values()) if (x.c !== 0n && x.mono.length) out.set(x.mono, x.c);
	return out;
}

// ----------------------------------------------------------------------------------------------
// Rule 4: a Toffoli pair around phases on its target

/**
 * ccx(a,b,n) · D · ccx(a,b,n), where every gate between the two Toffolis that touches a, b or n is
 * a diagonal gate on a set S ∋ n without a or b, is diagonal: n holds n ⊕ ab in between, and
 * θ·∏(S∖n)·(n ⊕ ab) = θ·∏S + θ·∏(S∖n)·ab − 2θ·∏S·ab (exact for 0/1 values). Each such gate
 * becomes those three monomial phases at its own place; the Toffolis go. With n at 0 the first
 * and last vanish and what is left is the doubly controlled phase on (a, b, S∖n); with n at 1 the
 * circuit really does something else, and the kept terms say so to the engines and the prover.
 */
function toffoliPhases(G: Gates, at: Int32Array, removed: Uint8Array, refs: QubitRef[], maxRegion: number, report: PeepholeReport): { rewrite: Map<number, number[]>; visited: number } {
	const rewrite = new Map<number, number[]>();
	let visited = 0;
	const isCcx = (g: number) => G.kind[g] === OTHER && G.gate(g) === 'ccx';
	const n = at.length;
	for (let i = 0; i < n; i++) {
		if (removed[i] || rewrite.has(i) || !isCcx(at[i])) continue;
		const [a, b, t] = G.qs[at[i]];
		const inside: number[] = [];
		let end = -1;
		for (let k = i + 1; k < n && k <= i + maxRegion; k++) {
			if (removed[k]) continue;
			visited++;
			const g = at[k];
			if (G.kind[g] === BARRIER) break;
			const qs = G.qs[g];
			if (!qs.includes(a) && !qs.includes(b) && !qs.includes(t)) continue;
			if (isCcx(g) && qs[2] === t && sameSet(qs.slice(0, 2), [a, b])) {
				end = k;
				break;
			}
			if (G.kind[g] === DIAG && qs.includes(t) && !qs.includes(a) && !qs.includes(b) && !rewrite.has(k)) {
				inside.push(k);
				continue;
			}
			break;
		}
		if (end < 0 || inside.length === 0) continue;
		for (const k of inside) {
			const g = at[k];
			const item = G.item(g) as GateItem;
			const gqs = G.qs[g];
			const angle0 = G.angle[g]!;
			const rest = gqs.filter((q) => q !== t);
			const target = rest.length ? rest[rest.length - 1] : t;
			const terms: [number[], Angle][] = [
				[gqs, angle0],
				[[...rest, a, b], angle0],
				[[...gqs, a, b], scaleAngle(angle0, -2n)]
			];
			const made: number[] = [];
			let m = 0;
			for (const [set, angle] of terms) {
				if (isZero(angle)) continue;
				made.push(madePhase(G, refs, item, set, target, angle, `${item.id}a${++m}`, `between Toffolis onto ${refs[t].register}[${refs[t].index}]`));
			}
			if (item.gate === 'rz') report.rzAsPhase++;
			rewrite.set(k, made);
		}
		rewrite.set(i, []);
		rewrite.set(end, []);
		report.toffoliPhases++;
	}
	return { rewrite, visited };
}

// ----------------------------------------------------------------------------------------------
// Rule 2: the Toffoli network of Nielsen & Chuang Fig. 4.9 / qelib1.inc `ccx`

type Role = 0 | 1 | 2; // a, b, c (controls a, b; target c)
export type ToffoliStep = { kind: 'h' | 'cx' | 't' | 'tdg'; q: Role[] };
/** Groups of steps that may come in any order among themselves (they commute). */
export const TOFFOLI: ToffoliStep[][] = [
	[{ kind: 'h', q: [2] }],
	[{ kind: 'cx', q: [1, 2] }],
	[{ kind: 'tdg', q: [2] }],
	[{ kind: 'cx', q: [0, 2] }],
	[{ kind: 't', q: [2] }],
	[{ kind: 'cx', q: [1, 2] }],
	[{ kind: 'tdg', q: [2] }],
	[{ kind: 'cx', q: [0, 2] }],
	[
		{ kind: 't', q: [1] },
		{ kind: 't', q: [2] }
	],
	[{ kind: 'h', q: [2] }],
	[{ kind: 'cx', q: [0, 1] }],
	[
		{ kind: 't', q: [0] },
		{ kind: 'tdg', q: [1] }
	],
	[{ kind: 'cx', q: [0, 1] }]
];

function stepMatches(G: Gates, g: number, s: ToffoliStep, roles: (number | undefined)[]): (number | undefined)[] | null {
	const kind = G.kind[g];
	const qs = G.qs[g];
	if (s.kind === 'h' || s.kind === 'cx') {
		if (kind !== (s.kind === 'h' ? H : CX)) return null;
	} else {
		if (kind !== DIAG || qs.length !== 1) return null;
		const gate = G.gate(g);
		if (gate !== 'p' && gate !== 'rz') return null;
		const want = s.kind === 't' ? EIGHTH : MINUS_EIGHTH;
		const angle = G.angle[g]!;
		if (!angle.exact || angle.num !== want.num || angle.exp !== want.exp) return null;
	}
	const next = [...roles];
	for (let k = 0; k < s.q.length; k++) {
		const role = s.q[k];
		const q = qs[k];
		if (next[role] === undefined) {
			if (next.includes(q)) return null;
			next[role] = q;
		} else if (next[role] !== q) return null;
	}
	return next;
}

function matchToffoli(G: Gates, at: Int32Array, removed: Uint8Array, start: number): { roles: [number, number, number]; matched: number[]; visited: number } | null {
	let roles: (number | undefined)[] = [undefined, undefined, G.qs[at[start]][0]];
	const matched: number[] = [start];
	const n = at.length;
	let k = start + 1;
	let visited = 1;
	for (let gi = 1; gi < TOFFOLI.length; gi++) {
		const pending = [...TOFFOLI[gi]];
		while (pending.length) {
			// The next gate touching a bound qubit must be one of the group's steps.
			let found = -1;
			const r0 = roles[0] ?? -1;
			const r1 = roles[1] ?? -1;
			const r2 = roles[2] ?? -1;
			for (; k < n && visited < 4096; k++) {
				if (removed[k]) continue;
				visited++;
				const g = at[k];
				if (G.kind[g] === BARRIER) return null;
				const qs = G.qs[g];
				let touches = false;
				for (let j = 0; j < qs.length; j++) if (qs[j] === r0 || qs[j] === r1 || qs[j] === r2) touches = true;
				if (touches) {
					found = k;
					break;
				}
			}
			if (found < 0) return null;
			let ok = false;
			for (let s = 0; s < pending.length; s++) {
				const r = stepMatches(G, at[found], pending[s], roles);
				if (r) {
					roles = r;
					pending.splice(s, 1);
					ok = true;
					break;
				}
			}
			if (!ok) return null;
			matched.push(found);
			k = found + 1;
		}
	}
	const bound = roles as [number, number, number];
	// Gates between the first and last matched that were skipped must not touch the three qubits.
	const set = new Set(matched);
	for (let j = start; j <= matched[matched.length - 1]; j++) {
		if (removed[j] || set.has(j)) continue;
		if (G.qs[at[j]].some((q) => bound.includes(q))) return null;
	}
	return { roles: bound, matched, visited };
}
