/**
 * Reduced ordered binary decision diagrams (Bryant 1986, "Graph-based algorithms for Boolean
 * function manipulation", IEEE Trans. Computers C-35(8)) and word-level arithmetic on vectors of
 * them. The prover holds every classical bit of a circuit as one BDD over the input bits, so a
 * carry chain or a comparison stays linear in size under an interleaved variable order instead of
 * expanding into exponentially many monomials.
 *
 * Nodes live in typed arrays (no objects per node); node 0 is false, node 1 is true; a variable is
 * its level in the order (level 0 is tested first). Unique table: open hashing with chains; the
 * ITE cache is lossy (direct-mapped), which only costs recomputation, never correctness.
 * Every operation is bounded: {@link BddLimit} is thrown once the node count passes `maxNodes` or
 * the clock passes `deadline`, so a proof stops with a partial result instead of hanging.
 *
 * Words ({@link Word}) are two's-complement bit vectors, bit 0 least significant, with an exact
 * value interval [lo, hi] that fixes how many bits every result needs (no silent overflow).
 */

/** Thrown when a BDD computation passes its node or time limit. */
export class BddLimit extends Error {
	constructor(
		readonly limit: 'nodes' | 'time',
		message: string
	) {
		super(message);
		this.name = 'BddLimit';
	}
}

/** A well-mixed 32-bit hash of three integers (the low bits depend on every input bit, so masks spread). */
function hash3(a: number, b: number, c: number): number {
	let h = Math.imul(a, 0x9e3779b1) ^ Math.imul(b + 0x7f4a7c15, 0x85ebca6b) ^ Math.imul(c + 0x165667b1, 0xc2b2ae35);
	h ^= h >>> 16;
	h = Math.imul(h, 0x7feb352d);
	h ^= h >>> 15;
	h = Math.imul(h, 0x846ca68b);
	return h ^ (h >>> 16);
}

export const FALSE = 0;
export const TRUE = 1;
const TERMINAL_LEVEL = 0x7fffffff;

/** Limits of one BDD manager. */
export interface BddLimits {
	maxNodes: number;
	/** Absolute time (ms, `performance.now()` or `Date.now()` scale of `clock`) after which work stops. */
	deadline: number;
	clock: () => number;
}

/** A BDD manager: owns every node; node ids are plain numbers. */
export class Bdd {
	level: Int32Array;
	lo: Int32Array;
	hi: Int32Array;
	next: Int32Array;
	size = 2;
	private buckets: Int32Array;
	private bucketMask: number;
	private cacheF: Int32Array;
	private cacheG: Int32Array;
	private cacheH: Int32Array;
	private cacheR: Int32Array;
	private cacheMask: number;
	private ticks = 0;
	/** ITE calls that missed the cache (work done). */
	calls = 0;
	readonly limits: BddLimits;
	/** Number of variables (levels 0 .. varCount−1). */
	readonly varCount: number;

	constructor(varCount: number, limits: Partial<BddLimits> = {}) {
		this.varCount = varCount;
		this.limits = { maxNodes: limits.maxNodes ?? 2_000_000, deadline: limits.deadline ?? Infinity, clock: limits.clock ?? (() => Date.now()) };
		const cap = 1 << 16;
		this.level = new Int32Array(cap);
		this.lo = new Int32Array(cap);
		this.hi = new Int32Array(cap);
		this.next = new Int32Array(cap);
		this.level[0] = this.level[1] = TERMINAL_LEVEL;
		this.buckets = new Int32Array(1 << 16).fill(-1);
		this.bucketMask = (1 << 16) - 1;
		const cs = 1 << 18;
		this.cacheF = new Int32Array(cs).fill(-1);
		this.cacheG = new Int32Array(cs);
		this.cacheH = new Int32Array(cs);
		this.cacheR = new Int32Array(cs);
		this.cacheMask = cs - 1;
	}

	/** The function "variable at `level`". */
	variable(level: number): number {
		if (level < 0 || level >= this.varCount) throw new RangeError(`BDD variable ${level} out of range 0..${this.varCount - 1}`);
		return this.mk(level, FALSE, TRUE);
	}

	/** The unique node (level, lo, hi), reduced. */
	mk(level: number, lo: number, hi: number): number {
		if (lo === hi) return lo;
		const h = hash3(level, lo, hi) & this.bucketMask;
		for (let n = this.buckets[h]; n >= 0; n = this.next[n]) if (this.level[n] === level && this.lo[n] === lo && this.hi[n] === hi) return n;
		if (this.size >= this.limits.maxNodes) throw new BddLimit('nodes', `the decision diagrams passed the limit of ${this.limits.maxNodes} nodes`);
		if (this.size === this.level.length) this.grow();
		const n = this.size++;
		this.level[n] = level;
		this.lo[n] = lo;
		this.hi[n] = hi;
		if (this.size > this.buckets.length * 2) this.rehash(); // re-inserts every node, n included
		else {
			this.next[n] = this.buckets[h];
			this.buckets[h] = n;
		}
		if ((++this.ticks & 0xfff) === 0 && this.limits.clock() > this.limits.deadline) throw new BddLimit('time', 'the proof passed its time limit');
		return n;
	}

	private grow(): void {
		const cap = this.level.length * 2;
		const g = (a: Int32Array) => {
			const b = new Int32Array(cap);
			b.set(a);
			return b;
		};
		this.level = g(this.level);
		this.lo = g(this.lo);
		this.hi = g(this.hi);
		this.next = g(this.next);
	}

	private rehash(): void {
		const nb = this.buckets.length * 4;
		this.buckets = new Int32Array(nb).fill(-1);
		this.bucketMask = nb - 1;
		for (let n = 2; n < this.size; n++) {
			const h = hash3(this.level[n], this.lo[n], this.hi[n]) & this.bucketMask;
			this.next[n] = this.buckets[h];
			this.buckets[h] = n;
		}
		if (this.cacheF.length < nb) {
			const cs = Math.min(nb, 1 << 22);
			this.cacheF = new Int32Array(cs).fill(-1);
			this.cacheG = new Int32Array(cs);
			this.cacheH = new Int32Array(cs);
			this.cacheR = new Int32Array(cs);
			this.cacheMask = cs - 1;
		}
	}

	/** if f then g else h. */
	ite(f: number, g: number, h: number): number {
		if (f === TRUE) return g;
		if (f === FALSE) return h;
		if (g === h) return g;
		if (g === TRUE && h === FALSE) return f;
		if (g === f) g = TRUE;
		if (h === f) h = FALSE;
		if (g === h) return g;
		const k = hash3(f, g, h) & this.cacheMask;
		if (this.cacheF[k] === f && this.cacheG[k] === g && this.cacheH[k] === h) return this.cacheR[k];
		if ((++this.calls & 0xffff) === 0 && this.limits.clock() > this.limits.deadline) throw new BddLimit('time', 'the proof passed its time limit');
		const lf = this.level[f];
		const lg = this.level[g];
		const lh = this.level[h];
		let v = lf < lg ? lf : lg;
		if (lh < v) v = lh;
		const f0 = lf === v ? this.lo[f] : f;
		const f1 = lf === v ? this.hi[f] : f;
		const g0 = lg === v ? this.lo[g] : g;
		const g1 = lg === v ? this.hi[g] : g;
		const h0 = lh === v ? this.lo[h] : h;
		const h1 = lh === v ? this.hi[h] : h;
		const r0 = this.ite(f0, g0, h0);
		const r1 = this.ite(f1, g1, h1);
		const r = this.mk(v, r0, r1);
		this.cacheF[k] = f;
		this.cacheG[k] = g;
		this.cacheH[k] = h;
		this.cacheR[k] = r;
		return r;
	}

	not(f: number): number {
		return this.ite(f, FALSE, TRUE);
	}
	and(f: number, g: number): number {
		if (f === FALSE || g === FALSE) return FALSE;
		if (f === TRUE) return g;
		if (g === TRUE) return f;
		return f < g ? this.ite(f, g, FALSE) : this.ite(g, f, FALSE);
	}
	or(f: number, g: number): number {
		if (f === TRUE || g === TRUE) return TRUE;
		if (f === FALSE) return g;
		if (g === FALSE) return f;
		return f < g ? this.ite(f, TRUE, g) : this.ite(g, TRUE, f);
	}
	xor(f: number, g: number): number {
		if (f === FALSE) return g;
		if (g === FALSE) return f;
		if (f === g) return FALSE;
		if (f > g) [f, g] = [g, f];
		return this.ite(f, this.not(g), g);
	}
	andAll(fs: number[]): number {
		let r = TRUE;
		for (const f of fs) {
			r = this.and(r, f);
			if (r === FALSE) break;
		}
		return r;
	}

	/**
	 * f simplified on a care set (Coudert and Madre 1990, "restrict"): a function that equals f
	 * wherever `care` holds and is usually smaller, since it may take any value elsewhere. Used to
	 * describe a wrong bit over the domain only (a register the domain fixes drops out).
	 */
	restrict(f: number, care: number, memo = new Map<string, number>()): number {
		if (care === FALSE) return FALSE;
		if (care === TRUE || f <= 1) return f;
		if (f === care) return TRUE;
		const key = `${f},${care}`;
		const hit = memo.get(key);
		if (hit !== undefined) return hit;
		const lf = this.level[f];
		const lc = this.level[care];
		let r: number;
		if (lc < lf) r = this.restrict(f, this.or(this.lo[care], this.hi[care]), memo);
		else {
			const f0 = this.lo[f];
			const f1 = this.hi[f];
			const c0 = lc === lf ? this.lo[care] : care;
			const c1 = lc === lf ? this.hi[care] : care;
			if (c0 === FALSE) r = this.restrict(f1, c1, memo);
			else if (c1 === FALSE) r = this.restrict(f0, c0, memo);
			else r = this.mk(lf, this.restrict(f0, c0, memo), this.restrict(f1, c1, memo));
		}
		memo.set(key, r);
		return r;
	}

	/** Value of f under an assignment (bit per level). */
	evaluate(f: number, assignment: ArrayLike<number>): boolean {
		while (f > 1) f = assignment[this.level[f]] ? this.hi[f] : this.lo[f];
		return f === TRUE;
	}

	/** One satisfying assignment (bit per level; levels f does not test are 0), or null when f is false. */
	anySat(f: number): Uint8Array | null {
		if (f === FALSE) return null;
		const a = new Uint8Array(this.varCount);
		while (f > 1) {
			if (this.lo[f] !== FALSE) f = this.lo[f];
			else {
				a[this.level[f]] = 1;
				f = this.hi[f];
			}
		}
		return a;
	}

	/** Number of satisfying assignments over all `varCount` variables (exact). */
	satCount(f: number, memo = new Map<number, bigint>()): bigint {
		const count = (n: number): bigint => {
			// assignments of levels level(n)..varCount−1
			if (n === FALSE) return 0n;
			if (n === TRUE) return 1n;
			const m = memo.get(n);
			if (m !== undefined) return m;
			const l = this.level[n];
			const lo = this.lo[n];
			const hi = this.hi[n];
			const ll = lo > 1 ? this.level[lo] : this.varCount;
			const lh = hi > 1 ? this.level[hi] : this.varCount;
			const r = (count(lo) << BigInt(ll - l - 1)) + (count(hi) << BigInt(lh - l - 1));
			memo.set(n, r);
			return r;
		};
		if (f === FALSE) return 0n;
		const top = f > 1 ? this.level[f] : this.varCount;
		return count(f) << BigInt(top);
	}

	/**
	 * A uniformly random satisfying assignment, drawing bits with `random()` (a float in [0, 1)
	 * is not enough for large counts, so it takes 32-bit integers). Null when f is false.
	 */
	sampleSat(f: number, rand32: () => number, memo = new Map<number, bigint>()): Uint8Array | null {
		if (f === FALSE) return null;
		this.satCount(f, memo);
		const count = (n: number): bigint => (n === FALSE ? 0n : n === TRUE ? 1n : memo.get(n)!);
		const levelOf = (n: number) => (n > 1 ? this.level[n] : this.varCount);
		const a = new Uint8Array(this.varCount);
		const randBelow = (m: bigint): bigint => {
			const bits = m.toString(2).length + 32;
			let v = 0n;
			for (let i = 0; i < bits; i += 32) v = (v << 32n) | BigInt(rand32() >>> 0);
			return v % m;
		};
		let n = f;
		let l = 0;
		while (true) {
			const nl = levelOf(n);
			for (; l < nl; l++) a[l] = rand32() & 1; // free levels above n
			if (n <= 1) break;
			const c0 = count(this.lo[n]) << BigInt(levelOf(this.lo[n]) - nl - 1);
			const c1 = count(this.hi[n]) << BigInt(levelOf(this.hi[n]) - nl - 1);
			const pick = randBelow(c0 + c1);
			if (pick < c0) {
				a[nl] = 0;
				n = this.lo[n];
			} else {
				a[nl] = 1;
				n = this.hi[n];
			}
			l = nl + 1;
		}
		return a;
	}

	/** Levels f depends on, ascending. */
	support(f: number): number[] {
		const seen = new Set<number>();
		const levels = new Set<number>();
		const stack = [f];
		while (stack.length) {
			const n = stack.pop()!;
			if (n <= 1 || seen.has(n)) continue;
			seen.add(n);
			levels.add(this.level[n]);
			stack.push(this.lo[n], this.hi[n]);
		}
		return [...levels].sort((a, b) => a - b);
	}

	/** Number of nodes reachable from f (terminals excluded). */
	nodeCount(f: number): number {
		const seen = new Set<number>();
		const stack = [f];
		while (stack.length) {
			const n = stack.pop()!;
			if (n <= 1 || seen.has(n)) continue;
			seen.add(n);
			stack.push(this.lo[n], this.hi[n]);
		}
		return seen.size;
	}

	/** f is a conjunction of literals: [level, positive] pairs; null otherwise (true → []). */
	cube(f: number): [number, boolean][] | null {
		if (f === FALSE) return null;
		const out: [number, boolean][] = [];
		while (f > 1) {
			if (this.lo[f] === FALSE) {
				out.push([this.level[f], true]);
				f = this.hi[f];
			} else if (this.hi[f] === FALSE) {
				out.push([this.level[f], false]);
				f = this.lo[f];
			} else return null;
		}
		return out;
	}
}

// ---------------------------------------------------------------------------------------------
// Words: two's-complement vectors of BDDs with an exact value interval

/** A two's-complement word: `bits[0]` least significant, the last bit is the sign; every value lies in [lo, hi]. */
export interface Word {
	bits: number[];
	lo: bigint;
	hi: bigint;
}

/** Thrown for a spec or condition the word arithmetic cannot express (with a reason). */
export class WordUnsupported extends Error {}

/** Bits a two's-complement word needs to hold every value of [lo, hi]. */
export function widthFor(lo: bigint, hi: bigint): number {
	let w = 1;
	while (lo < -(1n << BigInt(w - 1)) || hi >= 1n << BigInt(w - 1)) w++;
	return w;
}

/** Word arithmetic over one manager. Widths follow the intervals, so results are exact. */
export class WordOps {
	constructor(readonly bdd: Bdd) {}

	constant(v: bigint): Word {
		const w = widthFor(v, v);
		const bits: number[] = [];
		for (let i = 0; i < w; i++) bits.push(((v >> BigInt(i)) & 1n) === 1n ? TRUE : FALSE);
		return { bits, lo: v, hi: v };
	}

	/** An unsigned value from bits (LSB first), e.g. a register's input variables. */
	unsigned(bits: number[]): Word {
		return { bits: [...bits, FALSE], lo: 0n, hi: (1n << BigInt(bits.length)) - 1n };
	}

	/** A 0/1 word from a Boolean. */
	fromBool(f: number): Word {
		return f === FALSE ? this.constant(0n) : f === TRUE ? this.constant(1n) : { bits: [f, FALSE], lo: 0n, hi: 1n };
	}

	/** The constant value when every bit is a terminal, else null. */
	constantValue(a: Word): bigint | null {
		let v = 0n;
		for (let i = 0; i < a.bits.length; i++) {
			const b = a.bits[i];
			if (b > 1) return null;
			if (b === TRUE) v += i === a.bits.length - 1 ? -(1n << BigInt(i)) : 1n << BigInt(i);
		}
		return v;
	}

	extend(a: Word, w: number): number[] {
		if (a.bits.length >= w) return a.bits.slice(0, w);
		const s = a.bits[a.bits.length - 1];
		const out = a.bits.slice();
		while (out.length < w) out.push(s);
		return out;
	}

	/** Narrow to the width the interval needs (drops redundant sign copies). */
	private fit(bits: number[], lo: bigint, hi: bigint): Word {
		const w = widthFor(lo, hi);
		return { bits: bits.length > w ? bits.slice(0, w) : bits.length < w ? this.extend({ bits, lo, hi }, w) : bits, lo, hi };
	}

	add(a: Word, b: Word): Word {
		const lo = a.lo + b.lo;
		const hi = a.hi + b.hi;
		const w = widthFor(lo, hi);
		const x = this.extend(a, w);
		const y = this.extend(b, w);
		const d = this.bdd;
		const out: number[] = [];
		let carry = FALSE;
		for (let i = 0; i < w; i++) {
			const xy = d.xor(x[i], y[i]);
			out.push(d.xor(xy, carry));
			if (i < w - 1) carry = d.or(d.and(x[i], y[i]), d.and(carry, xy));
		}
		return { bits: out, lo, hi };
	}

	neg(a: Word): Word {
		const lo = -a.hi;
		const hi = -a.lo;
		const w = widthFor(lo, hi);
		// −a = ~a + 1 modulo 2^w; exact because −a fits in w bits
		const x = this.extend(a, w).map((b) => this.bdd.not(b));
		return { bits: this.addRaw(x, w), lo, hi };
	}
	/** x + 1 mod 2^w on raw bits. */
	private addRaw(x: number[], w: number): number[] {
		const d = this.bdd;
		const out: number[] = [];
		let carry = TRUE;
		for (let i = 0; i < w; i++) {
			out.push(d.xor(x[i], carry));
			carry = d.and(x[i], carry);
		}
		return out;
	}

	sub(a: Word, b: Word): Word {
		return this.add(a, this.neg(b));
	}

	shl(a: Word, s: number): Word {
		const z = new Array<number>(s).fill(FALSE);
		return { bits: [...z, ...a.bits], lo: a.lo << BigInt(s), hi: a.hi << BigInt(s) };
	}

	/** Arithmetic right shift (floor division by 2^s). */
	shr(a: Word, s: number): Word {
		const lo = a.lo >> BigInt(s);
		const hi = a.hi >> BigInt(s);
		const bits = a.bits.slice(Math.min(s, a.bits.length - 1));
		return this.fit(bits.length ? bits : [a.bits[a.bits.length - 1]], lo, hi);
	}

	/** Bitwise if-then-else on a Boolean condition. */
	select(c: number, a: Word, b: Word): Word {
		if (c === TRUE) return a;
		if (c === FALSE) return b;
		const lo = a.lo < b.lo ? a.lo : b.lo;
		const hi = a.hi > b.hi ? a.hi : b.hi;
		const w = widthFor(lo, hi);
		const x = this.extend(a, w);
		const y = this.extend(b, w);
		return { bits: x.map((xi, i) => this.bdd.ite(c, xi, y[i])), lo, hi };
	}

	mul(a: Word, b: Word): Word {
		const ka = this.constantValue(a);
		const kb = this.constantValue(b);
		if (kb !== null) return this.mulConst(a, kb);
		if (ka !== null) return this.mulConst(b, ka);
		// shift-and-add over b's bits; the sign bit weighs −2^(w−1)
		const corners = [a.lo * b.lo, a.lo * b.hi, a.hi * b.lo, a.hi * b.hi];
		const lo = corners.reduce((x, y) => (y < x ? y : x));
		const hi = corners.reduce((x, y) => (y > x ? y : x));
		let acc = this.constant(0n);
		const zero = this.constant(0n);
		const n = b.bits.length;
		for (let i = 0; i < n; i++) {
			const term = this.select(b.bits[i], this.shl(a, i), zero);
			acc = i === n - 1 ? this.sub(acc, term) : this.add(acc, term);
		}
		return this.fit(this.extend(acc, widthFor(lo, hi)), lo, hi);
	}

	mulConst(a: Word, k: bigint): Word {
		if (k === 0n) return this.constant(0n);
		const neg = k < 0n;
		let m = neg ? -k : k;
		let acc: Word | null = null;
		for (let i = 0; m > 0n; i++, m >>= 1n) if (m & 1n) acc = acc ? this.add(acc, this.shl(a, i)) : this.shl(a, i);
		return neg ? this.neg(acc!) : acc!;
	}

	/** a < b as a Boolean. */
	lt(a: Word, b: Word): number {
		if (a.hi < b.lo) return TRUE;
		if (a.lo >= b.hi) return FALSE;
		const d = this.sub(a, b);
		return d.bits[d.bits.length - 1];
	}
	eq(a: Word, b: Word): number {
		if (a.hi < b.lo || b.hi < a.lo) return FALSE;
		const w = Math.max(a.bits.length, b.bits.length);
		const x = this.extend(a, w);
		const y = this.extend(b, w);
		let r = TRUE;
		for (let i = 0; i < w && r !== FALSE; i++) r = this.bdd.and(r, this.bdd.not(this.bdd.xor(x[i], y[i])));
		return r;
	}
	/** a ≠ 0 as a Boolean. */
	truthy(a: Word): number {
		let r = FALSE;
		for (const b of a.bits) r = this.bdd.or(r, b);
		return r;
	}

	/** Floor a mod m for a constant m > 0, by restoring reduction (exact for every value of the interval). */
	modConst(a: Word, m: bigint): Word {
		if (m <= 0n) throw new WordUnsupported('modulus must be positive');
		if (a.lo >= 0n && a.hi < m) return a;
		if ((m & (m - 1n)) === 0n) {
			const k = m.toString(2).length - 1;
			return { bits: [...this.extend(a, Math.max(k, 1)).slice(0, k), FALSE], lo: 0n, hi: m - 1n };
		}
		return this.divModConst(a, m).rem;
	}

	/** Floor division and remainder by a constant m > 0. */
	divModConst(a: Word, m: bigint): { quo: Word; rem: Word } {
		if (m <= 0n) throw new WordUnsupported('division by a non-positive constant');
		let x = a;
		let quo = this.constant(0n);
		if (x.lo < 0n) {
			const t = (-x.lo + m - 1n) / m;
			x = this.add(x, this.constant(t * m));
			quo = this.constant(-t);
		}
		let k = 0;
		while (m << BigInt(k + 1) <= x.hi) k++;
		for (; k >= 0; k--) {
			const step = m << BigInt(k);
			if (step > x.hi) continue;
			const ge = this.bdd.not(this.lt(x, this.constant(step)));
			const reduced = this.sub(x, this.constant(step));
			const cap = step - 1n; // after this step x < step
			x = this.select(ge, { ...reduced, lo: 0n }, x);
			x = this.fit(this.extend(x, widthFor(0n, cap < x.hi ? cap : x.hi)), 0n, cap < x.hi ? cap : x.hi);
			quo = this.add(quo, this.shl(this.fromBool(ge), k));
		}
		return { quo, rem: x };
	}

	/** The low `k` bits as an unsigned word (value mod 2^k). */
	low(a: Word, k: number): number[] {
		return this.extend(a, Math.max(k, a.bits.length)).slice(0, k);
	}
}
