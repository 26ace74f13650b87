/**
 * Expected angles inside hand-written Fourier sections, from the circuit's stated intent.
 *
 * A Fourier section is the stretch between a top-level QFT block on register R and the next
 * top-level inverse QFT block on R, filled with phase gates (p, cp, mcp, or doubly controlled
 * phase items) whose controls are classical input bits and whose target is a qubit of R. No
 * library block states what such gates should do, so the intent comes from a spec: R's final
 * value as a function of the input registers (e.g. b = b + c·a mod 2^n).
 *
 * Between the transforms, R's qubit at level m holds phase (v mod 2^m)/2^m turn, so the section
 * must add Δ(x)/2^m with Δ = intent − R's start value. Written as a multilinear polynomial in the
 * control bits, the coefficient every monomial (a product of control bits) needs on a level-m
 * qubit follows by Möbius inversion: coef(M) = Σ_{S⊆M} (−1)^{|M∖S|} φ(S), with φ(S) the required
 * phase when exactly the bits of S are 1. A gate feeds the monomial of its control bits; when a
 * monomial's gates add up to something else, the run is told so at the monomial's last gate for
 * every input that switches the monomial on: that is the rotation at fault. A monomial no gate
 * feeds (a missing rotation) shows at the section's end, where the spec's value is stated whole.
 *
 * Qubit order: flat qubits, register index 0 = LSB. Angle units: turns, exact dyadic only (a
 * section with an inexact angle is skipped with a warning).
 */
import { GateCode, type LoweredCircuit, type PlacedRegister } from './circuit.js';
import { ExpectKind, type ExpectationEvents } from './expect.js';

/** A register's intended final value as a function of the input registers' start values. */
export interface RegisterIntent {
	register: string;
	value: (inputs: ReadonlyMap<string, bigint>) => bigint;
}

/** A found section: QFT block on `register` ends at `start`, inverse QFT begins at `end`. */
export interface FourierSection {
	register: string;
	layout: 'swapped' | 'unswapped' | 'permuted';
	/** Level of each qubit of the register (index 0 = LSB); when absent, from `layout`. */
	levels?: number[];
	start: number;
	end: number;
	/** Step after the inverse QFT (null when it is not known). */
	after: number | null;
}

/** Most distinct monomials handled per section (keeps the work bounded). */
export const MAX_SECTION_MONOMIALS = 20_000;
/** Largest monomial degree handled (2^degree evaluations of the intent per coefficient). */
export const MAX_MONOMIAL_DEGREE = 12;

/** Top-level QFT … inverse QFT pairs on the same register with nothing but gates between them. */
export function findFourierSections(c: LoweredCircuit): FourierSection[] {
	const top = c.blocks.filter((b) => b.parent === -1);
	const out: FourierSection[] = [];
	for (let i = 0; i < top.length; i++) {
		const q = top[i];
		if (q.spec.kind !== 'qft') continue;
		const reg = q.spec.register;
		for (let j = i + 1; j < top.length; j++) {
			const b = top[j];
			if (b.spec.kind === 'iqft' && b.spec.register === reg) {
				out.push({ register: reg, layout: q.spec.swaps ? 'swapped' : 'unswapped', start: q.end, end: b.start, after: b.end });
				break;
			}
			// Only ccp items (a doubly controlled phase, however lowered) may sit inside a section.
			if (b.spec.kind !== 'ccp') break;
		}
	}
	return out;
}

interface Term {
	/** Sorted flat control qubits (the monomial). */
	key: string;
	controls: number[];
	target: number;
	/** Gate index after which the term's contribution is complete. */
	at: number;
	/** num/2^exp turns. */
	num: bigint;
	exp: number;
}

const modPow2 = (v: bigint, m: number): bigint => {
	const p = 1n << BigInt(m);
	const r = v % p;
	return r < 0n ? r + p : r;
};

/** Bring num/2^exp to the denominator 2^to (to ≥ exp). */
const scaleTo = (num: bigint, exp: number, to: number): bigint => num << BigInt(to - exp);

export interface IntentExpectations {
	events: ExpectationEvents;
	sections: FourierSection[];
	warnings: string[];
}

/**
 * Expectation events for every Fourier section whose register has an intent, for one basis
 * input. `inputs` holds every register's start value. Events are sorted by step; merge them
 * after the library blocks' own events with {@link mergeExpectations}.
 */
export function computeIntentExpectations(
	c: LoweredCircuit,
	intents: RegisterIntent[],
	inputs: ReadonlyMap<string, bigint>,
	/** Sections found by other means (e.g. from the raw gates of an imported file). */
	extraSections: FourierSection[] = []
): IntentExpectations {
	const warnings: string[] = [];
	const ev = emptyEvents();
	const own = findFourierSections(c);
	const extra = extraSections.filter((x) => !own.some((o) => o.register === x.register && o.start === x.start));
	const sections = [...own, ...extra].filter((s) => intents.some((i) => i.register === s.register));
	for (const s of sections) {
		const intent = intents.find((i) => i.register === s.register)!;
		const sec = sectionView(c, s, inputs);
		const R = sec.R;
		let finalValue: bigint;
		try {
			finalValue = modPow2(intent.value(inputs), R.size);
		} catch (e) {
			warnings.push(`the spec for ${R.name} could not be evaluated: ${(e as Error).message}`);
			continue;
		}
		const found = sectionTerms(sec);
		const problem = found.problem ?? controlsNotInputs(sec, found.terms, found.touched);
		if (problem) {
			warnings.push(`no spec-based angles inside the Fourier section of ${R.name}: ${problem}`);
			continue;
		}
		const corrections = sectionCorrections(sec, intent, found.terms, warnings);
		walkSection(sec, found.terms, corrections, ev);
		// The section's end: R holds the intended value in the Fourier basis; after the inverse
		// QFT, in the computational basis.
		for (let i = 0; i < R.size; i++) {
			const q = R.offset + i;
			const m = sec.level(q);
			ev.push(s.end, q, ExpectKind.fourier, m, modPow2(finalValue, m), 1);
			if (s.after !== null) ev.push(s.after, q, ExpectKind.classical, Number((finalValue >> BigInt(i)) & 1n), 0n, 1);
		}
	}
	sortEvents(ev);
	return { events: ev, sections, warnings };
}

/** One section seen from its register R: levels, membership, and the input's bits. */
interface SectionView {
	c: LoweredCircuit;
	s: FourierSection;
	R: PlacedRegister;
	inputs: ReadonlyMap<string, bigint>;
	/** R's start value for this input. */
	start: bigint;
	level: (q: number) => number;
	inR: (q: number) => boolean;
	/** Register and bit index of a flat qubit. */
	bitOf: (q: number) => { reg: string; bit: number };
	/** The input's bit on flat qubit q. */
	inputBit: (q: number) => number;
}

function sectionView(c: LoweredCircuit, s: FourierSection, inputs: ReadonlyMap<string, bigint>): SectionView {
	const R = c.registers.find((r) => r.name === s.register)!;
	const bitOf = (q: number): { reg: string; bit: number } => {
		const r = c.registers.find((x) => q >= x.offset && q < x.offset + x.size)!;
		return { reg: r.name, bit: q - r.offset };
	};
	return {
		c,
		s,
		R,
		inputs,
		start: inputs.get(R.name) ?? 0n,
		level: (q) => (s.levels ? s.levels[q - R.offset] : s.layout === 'swapped' ? R.size - (q - R.offset) : q - R.offset + 1),
		inR: (q) => q >= R.offset && q < R.offset + R.size,
		bitOf,
		inputBit: (q) => {
			const { reg, bit } = bitOf(q);
			return Number(((inputs.get(reg) ?? 0n) >> BigInt(bit)) & 1n);
		}
	};
}

/** The section's phase terms (controls outside R, target in R), or the reason it is not of that form; `touched` are qubits non-phase gates act on. */
function sectionTerms(sec: SectionView): { terms: Term[]; problem: string | null; touched: Set<number> } {
	const { c, s, R, inR } = sec;
	const terms: Term[] = [];
	let problem: string | null = null;
	const touched = new Set<number>();
	for (let g = s.start; g < s.end && !problem; g++) {
		const b = c.blockOf[g];
		const kind = c.kinds[g];
		if (b >= 0 && c.blocks[b].spec.kind === 'ccp') {
			const blk = c.blocks[b];
			if (g !== blk.start) continue;
			const spec = blk.spec as Extract<typeof blk.spec, { kind: 'ccp' }>;
			if (!inR(spec.target) || spec.controls.some(inR)) problem = `${blk.label} does not target ${R.name} from outside it`;
			else if (!spec.angle.exact) problem = `${blk.label} has an angle that is not a dyadic fraction of a turn`;
			else terms.push(term([...spec.controls], spec.target, blk.end - 1, spec.angle.num, spec.angle.exp));
			g = blk.end - 1;
			continue;
		}
		const qs = Array.from(c.qubitList.subarray(c.qubitStart[g], c.qubitStart[g + 1]));
		const isPhase = kind === GateCode.p || kind === GateCode.cp || kind === GateCode.mcp;
		if (!isPhase) {
			if (qs.some(inR)) problem = `gate ${g} (${kindName(kind)}) acts on ${R.name} inside its Fourier section`;
			for (const q of qs) touched.add(q);
			continue;
		}
		const a = c.angles[c.angleIndex[g]];
		const inside = qs.filter(inR);
		if (inside.length === 0) continue;
		if (inside.length > 1) {
			problem = `gate ${g} couples two qubits of ${R.name}`;
			continue;
		}
		if (!a.exact) {
			problem = `gate ${g} has an angle that is not a dyadic fraction of a turn`;
			continue;
		}
		terms.push(term(qs.filter((q) => !inR(q)), inside[0], g, a.num, a.exp));
	}
	return { terms, problem, touched };
}

/** Controls must still hold their input bits: nothing before the section (or inside it) may have flipped them. */
function controlsNotInputs(sec: SectionView, terms: Term[], touched: Set<number>): string | null {
	const { c, s, inR } = sec;
	const flipped = new Set<number>(touched);
	for (let g = 0; g < s.start; g++) {
		const k = c.kinds[g];
		if (k === GateCode.p || k === GateCode.cp || k === GateCode.mcp || k === GateCode.rz || k === GateCode.reset) continue;
		const e = c.qubitStart[g + 1];
		for (let i = c.qubitStart[g] + c.controlCounts[g]; i < e; i++) flipped.add(c.qubitList[i]);
	}
	const bad = terms.find((t) => t.controls.some((q) => flipped.has(q) || inR(q)));
	return bad ? `a control of ${termLabel(bad)} does not hold an input bit at that point` : null;
}

type Correction = { at: number; target: number; num: bigint; exp: number };

/**
 * Group terms into monomials per target qubit and compare with the required coefficients (Möbius
 * inversion of the intent over the monomial's controls): required − actual for each monomial this
 * input switches on, applied from the monomial's last gate on.
 */
function sectionCorrections(sec: SectionView, intent: RegisterIntent, terms: Term[], warnings: string[]): Correction[] {
	const { c, R, start } = sec;
	const groups = new Map<string, Term[]>();
	for (const t of terms) {
		const k = `${t.target}|${t.key}`;
		const list = groups.get(k);
		if (list) list.push(t);
		else groups.set(k, [t]);
	}
	if (groups.size > MAX_SECTION_MONOMIALS) {
		warnings.push(`the Fourier section of ${R.name} has more than ${MAX_SECTION_MONOMIALS} terms; only its end is checked`);
		groups.clear();
	}
	const corrections: Correction[] = [];
	const phiCache = new Map<string, bigint>();
	// φ is evaluated with every register but R cleared, then the monomial's bits set.
	const base = new Map<string, bigint>();
	for (const r of c.registers) base.set(r.name, r.name === R.name ? start : 0n);
	for (const list of groups.values()) {
		const t0 = list[0];
		if (t0.controls.length > MAX_MONOMIAL_DEGREE) {
			warnings.push(`a term with ${t0.controls.length} controls on ${R.name} is too large to check`);
			continue;
		}
		// Only monomials this input switches on change anything now.
		if (!t0.controls.every((q) => sec.inputBit(q) === 1)) continue;
		const m = sec.level(t0.target);
		let required = 0n;
		const d = t0.controls.length;
		for (let mask = 0; mask < 1 << d; mask++) {
			const ck = `${m}|${t0.key}|${mask}`;
			let phi = phiCache.get(ck);
			if (phi === undefined) {
				// Δ with exactly the controls in `mask` set; R keeps its actual start value.
				const x = new Map(base);
				for (let i = 0; i < d; i++)
					if (mask & (1 << i)) {
						const { reg, bit } = sec.bitOf(t0.controls[i]);
						x.set(reg, (x.get(reg) ?? 0n) | (1n << BigInt(bit)));
					}
				phi = modPow2(intent.value(x) - start, m);
				phiCache.set(ck, phi);
			}
			const sign = (d - popcount(mask)) % 2 === 0 ? 1n : -1n;
			required += sign * phi;
		}
		required = modPow2(required, m); // over 2^m
		let exp = m;
		for (const t of list) exp = Math.max(exp, t.exp);
		let actual = 0n;
		for (const t of list) actual += scaleTo(t.num, t.exp, exp);
		const diff = modPow2(scaleTo(required, m, exp) - actual, exp);
		if (diff !== 0n) corrections.push({ at: list[list.length - 1].at, target: t0.target, num: diff, exp });
	}
	return corrections;
}

/** Walk the section for this input: after each term's gate, the target's expected angle is the actual sum so far plus the corrections due so far. */
function walkSection(sec: SectionView, terms: Term[], corrections: Correction[], ev: Events): void {
	const { R, start } = sec;
	const qCount = R.size;
	const E = 64; // common denominator exponent for the walk (angles beyond it are refused above)
	let maxExp = R.size;
	for (const t of terms) maxExp = Math.max(maxExp, t.exp);
	for (const k of corrections) maxExp = Math.max(maxExp, k.exp);
	const W = Math.max(E, maxExp);
	const actualNum = new Array<bigint>(qCount);
	const correctionNum = new Array<bigint>(qCount).fill(0n);
	for (let i = 0; i < qCount; i++) {
		const q = R.offset + i;
		actualNum[i] = scaleTo(modPow2(start, sec.level(q)), sec.level(q), W);
	}
	const byGate = new Map<number, Term[]>();
	for (const t of terms) {
		const list = byGate.get(t.at);
		if (list) list.push(t);
		else byGate.set(t.at, [t]);
	}
	const corrAt = new Map<number, Correction[]>();
	for (const k of corrections) {
		const list = corrAt.get(k.at);
		if (list) list.push(k);
		else corrAt.set(k.at, [k]);
	}
	const reduce = (num: bigint): { num: bigint; lvl: number } => {
		let n = modPow2(num, W);
		let l = W;
		while (l > 0 && (n & 1n) === 0n) {
			n >>= 1n;
			l--;
		}
		return { num: n, lvl: l };
	};
	for (const [g, list] of [...byGate].sort((a, b) => a[0] - b[0])) {
		for (const t of list) {
			const i = t.target - R.offset;
			if (t.controls.every((q) => sec.inputBit(q) === 1)) actualNum[i] += scaleTo(t.num, t.exp, W);
		}
		for (const k of corrAt.get(g) ?? []) correctionNum[k.target - R.offset] += scaleTo(k.num, k.exp, W);
		for (const t of list) {
			const i = t.target - R.offset;
			const { num, lvl } = reduce(actualNum[i] + correctionNum[i]);
			// Express over the qubit's own level when it fits, so the dial's ticks stay meaningful.
			const m = sec.level(t.target);
			const at = Math.max(m, lvl);
			ev.push(g + 1, t.target, ExpectKind.fourier, at, lvl === 0 ? 0n : num << BigInt(at - lvl), 0);
		}
	}
}

function term(controls: number[], target: number, at: number, num: bigint, exp: number): Term {
	const cs = [...controls].sort((a, b) => a - b);
	return { key: cs.join(','), controls: cs, target, at, num, exp };
}

function popcount(x: number): number {
	let n = 0;
	for (; x; x &= x - 1) n++;
	return n;
}

function kindName(code: number): string {
	return Object.entries(GateCode).find(([, v]) => v === code)?.[0] ?? String(code);
}

function termLabel(t: Term): string {
	return `the rotation at gate ${t.at}`;
}

class Events implements ExpectationEvents {
	length = 0;
	step = new Int32Array(0);
	qubit = new Int32Array(0);
	kind = new Uint8Array(0);
	level = new Int32Array(0);
	num: bigint[] = [];
	boundary = new Uint8Array(0);
	warnings: { block: number; message: string }[] = [];
	notes?: Map<string, string>;
	private rows: [number, number, number, number, bigint, number][] = [];
	push(step: number, qubit: number, kind: number, level: number, num: bigint, boundary: number) {
		this.rows.push([step, qubit, kind, level, num, boundary]);
	}
	finish(rows = this.rows) {
		this.length = rows.length;
		this.step = Int32Array.from(rows, (r) => r[0]);
		this.qubit = Int32Array.from(rows, (r) => r[1]);
		this.kind = Uint8Array.from(rows, (r) => r[2]);
		this.level = Int32Array.from(rows, (r) => r[3]);
		this.num = rows.map((r) => r[4]);
		this.boundary = Uint8Array.from(rows, (r) => r[5]);
	}
	get pending() {
		return this.rows;
	}
}

function emptyEvents(): Events {
	return new Events();
}

function sortEvents(ev: Events): void {
	ev.finish([...ev.pending].sort((a, b) => a[0] - b[0]));
}

/**
 * Library-block events followed by intent events, stably sorted by step, so at equal steps the
 * intent (stated later) is the one that counts.
 */
export function mergeExpectations(base: ExpectationEvents, extra: ExpectationEvents): ExpectationEvents {
	const rows: [number, number, number, number, bigint, number, number][] = [];
	for (let e = 0; e < base.length; e++) rows.push([base.step[e], base.qubit[e], base.kind[e], base.level[e], base.num[e], base.boundary[e], 0]);
	for (let e = 0; e < extra.length; e++) rows.push([extra.step[e], extra.qubit[e], extra.kind[e], extra.level[e], extra.num[e], extra.boundary[e], 1]);
	rows.sort((a, b) => a[0] - b[0] || a[6] - b[6]);
	const out = new Events();
	out.finish(rows.map((r) => [r[0], r[1], r[2], r[3], r[4], r[5]]));
	out.warnings = [...base.warnings, ...extra.warnings];
	if (base.notes || extra.notes) out.notes = new Map([...(base.notes ?? []), ...(extra.notes ?? [])]);
	return out;
}
