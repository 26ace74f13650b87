/**
 * Specs and domain conditions as word-level BDD arithmetic: every output bit the spec requires,
 * and the domain, become decision diagrams over the input bits (exact two's-complement words,
 * see {@link WordOps}). Supports +, −, ×, integer powers, shifts and floor division/mod by
 * constants, comparisons, `and`/`or`/`not`, bitwise ops, `c ? x : y`, min, max, abs.
 *
 * Qubit order: a register's word is its bits LSB first (index 0 = least significant).
 */
import type { MathNode } from 'mathjs';
import { WordUnsupported, type Word, type WordOps } from './bdd.js';
import type { Spec } from './spec.js';

/** Widest exact power `a^e` with a register exponent the prover builds outside a modulus (bits). */
export const MAX_POWER_BITS = 4096;

/**
 * Compile a spec or condition node to a word over `env` (register name → word of its start value).
 *
 * `ring`: a constant modulus M > 0 that an enclosing `mod M` applies to this node's value through
 * ring operations only (+, −, ×, unary minus, parentheses, the branches of `c ? x : y`). Inside
 * it, a power with a register exponent may be built as a^e mod M, since x ↦ x mod M is a ring
 * homomorphism of the integers: (a^e·y) mod M = ((a^e mod M)·y) mod M for every e and y. The
 * value returned is then only congruent to the node's value mod M, which the enclosing mod makes
 * exact. Without a ring context the power is built exactly (up to {@link MAX_POWER_BITS} bits).
 */
export function compileNode(node: MathNode, env: Map<string, Word>, ops: WordOps, ring?: bigint): Word {
	const bdd = ops.bdd;
	const nd = node as unknown as { type: string; name?: string; fn?: string | { name: string }; value?: unknown; args?: MathNode[]; content?: MathNode; condition?: MathNode; trueExpr?: MathNode; falseExpr?: MathNode };
	const constOf = (w: Word, what: string): bigint => {
		const k = ops.constantValue(w);
		if (k === null) throw new WordUnsupported(`${what} must be a constant for the prover`);
		return k;
	};
	const small = (k: bigint, what: string): number => {
		if (k < 0n || k > 4096n) throw new WordUnsupported(`${what} must be between 0 and 4096`);
		return Number(k);
	};
	switch (nd.type) {
		case 'ConstantNode':
			return ops.constant(typeof nd.value === 'boolean' ? (nd.value ? 1n : 0n) : (nd.value as bigint));
		case 'SymbolNode': {
			const w = env.get(nd.name!);
			if (!w) throw new WordUnsupported(`register ${nd.name} has no value here`);
			return w;
		}
		case 'ParenthesisNode':
			return compileNode(nd.content!, env, ops, ring);
		case 'ConditionalNode': {
			const c = ops.truthy(compileNode(nd.condition!, env, ops));
			return ops.select(c, compileNode(nd.trueExpr!, env, ops, ring), compileNode(nd.falseExpr!, env, ops, ring));
		}
		case 'OperatorNode': {
			const fn = nd.fn as string;
			if (fn === 'mod') return modOf(nd.args!, env, ops);
			if (fn === 'pow') return powerOf(nd.args!, env, ops, ring);
			// ring operations pass the enclosing modulus down; every other operator needs exact values
			const inner = RING_OPS.has(fn) ? ring : undefined;
			const a = nd.args!.map((x) => compileNode(x, env, ops, inner));
			switch (fn) {
				case 'unaryMinus':
					return ops.neg(a[0]);
				case 'unaryPlus':
					return a[0];
				case 'add':
					return ops.add(a[0], a[1]);
				case 'subtract':
					return ops.sub(a[0], a[1]);
				case 'multiply':
					return ops.mul(a[0], a[1]);
				case 'divide':
					return ops.divModConst(a[0], constOf(a[1], 'a divisor')).quo;
				case 'leftShift':
					return ops.shl(a[0], small(constOf(a[1], 'a shift'), 'a shift'));
				case 'rightShift':
				case 'rightArithShift':
					return ops.shr(a[0], small(constOf(a[1], 'a shift'), 'a shift'));
				case 'bitAnd':
				case 'bitOr':
				case 'bitXor': {
					const w = Math.max(a[0].bits.length, a[1].bits.length);
					const x = ops.extend(a[0], w);
					const y = ops.extend(a[1], w);
					const f = nd.fn === 'bitAnd' ? bdd.and.bind(bdd) : nd.fn === 'bitOr' ? bdd.or.bind(bdd) : bdd.xor.bind(bdd);
					const lim = 1n << BigInt(w - 1);
					const nonNeg = a[0].lo >= 0n && a[1].lo >= 0n;
					return { bits: x.map((b, i) => f(b, y[i])), lo: nonNeg ? 0n : -lim, hi: lim - 1n };
				}
				case 'equal':
					return ops.fromBool(ops.eq(a[0], a[1]));
				case 'unequal':
					return ops.fromBool(bdd.not(ops.eq(a[0], a[1])));
				case 'smaller':
					return ops.fromBool(ops.lt(a[0], a[1]));
				case 'smallerEq':
					return ops.fromBool(bdd.not(ops.lt(a[1], a[0])));
				case 'larger':
					return ops.fromBool(ops.lt(a[1], a[0]));
				case 'largerEq':
					return ops.fromBool(bdd.not(ops.lt(a[0], a[1])));
				case 'and':
					return ops.fromBool(bdd.and(ops.truthy(a[0]), ops.truthy(a[1])));
				case 'or':
					return ops.fromBool(bdd.or(ops.truthy(a[0]), ops.truthy(a[1])));
				case 'xor':
					return ops.fromBool(bdd.xor(ops.truthy(a[0]), ops.truthy(a[1])));
				case 'not':
					return ops.fromBool(bdd.not(ops.truthy(a[0])));
			}
			throw new WordUnsupported(`operator ${nd.fn as string} is not supported by the prover`);
		}
		case 'FunctionNode': {
			const name = typeof nd.fn === 'string' ? nd.fn : (nd.fn as { name: string }).name;
			if (name === 'mod') return modOf(nd.args!, env, ops);
			const a = nd.args!.map((x) => compileNode(x, env, ops));
			if (name === 'floor') return a[0];
			if (name === 'abs') return ops.select(ops.lt(a[0], ops.constant(0n)), ops.neg(a[0]), a[0]);
			if (name === 'min') return a.reduce((x, y) => ops.select(ops.lt(y, x), y, x));
			if (name === 'max') return a.reduce((x, y) => ops.select(ops.lt(x, y), y, x));
			throw new WordUnsupported(`function ${name} is not supported by the prover`);
		}
	}
	throw new WordUnsupported(`${nd.type} is not supported by the prover`);
}

const RING_OPS = new Set(['add', 'subtract', 'multiply', 'unaryMinus', 'unaryPlus']);

function constantOf(w: Word, ops: WordOps, what: string): bigint {
	const k = ops.constantValue(w);
	if (k === null) throw new WordUnsupported(`${what} must be a constant for the prover`);
	return k;
}

/** `x mod M` for a constant M > 0; x is compiled in the ring of M (see {@link compileNode}). */
function modOf(args: MathNode[], env: Map<string, Word>, ops: WordOps): Word {
	const m = constantOf(compileNode(args[1], env, ops), ops, 'a modulus');
	if (m <= 0n) throw new WordUnsupported('modulus must be positive');
	return ops.modConst(compileNode(args[0], env, ops, m), m);
}

/**
 * `a^e`. A constant exponent (0…4096) multiplies out. A register exponent needs a constant base
 * a and e ≥ 0 over the domain of words; it is built bit by bit of e, r ← e_i ? r·a^(2^i) : r,
 * exactly, or mod M inside a ring context M (each factor a^(2^i) mod M, each product reduced).
 */
function powerOf(args: MathNode[], env: Map<string, Word>, ops: WordOps, ring?: bigint): Word {
	const e = compileNode(args[1], env, ops);
	const k = ops.constantValue(e);
	if (k !== null) {
		if (k < 0n || k > 4096n) throw new WordUnsupported('an exponent must be between 0 and 4096');
		const base = compileNode(args[0], env, ops, ring);
		let r = ops.constant(1n);
		for (let i = 0; i < Number(k); i++) r = ops.mul(r, base);
		return r;
	}
	const a = ops.constantValue(compileNode(args[0], env, ops));
	if (a === null) throw new WordUnsupported('a power with a register exponent needs a constant base for the prover');
	if (e.lo < 0n) throw new WordUnsupported('a register exponent may be negative here; the prover needs e ≥ 0');
	const bits = e.bits.slice(0, e.bits.length - 1); // e ≥ 0: the sign bit is 0
	if (ring === undefined) {
		const mag = a < 0n ? -a : a;
		const width = Math.ceil(Number(e.hi) * Math.log2(Number(mag)));
		if (mag > 1n && !(width <= MAX_POWER_BITS)) {
			throw new WordUnsupported(`${a}^e with e up to ${e.hi} has about ${width} bits, more than the prover builds exactly (${MAX_POWER_BITS}); put the power under a constant "mod M"`);
		}
	}
	const reduce = (v: bigint): bigint => (ring === undefined ? v : ((v % ring) + ring) % ring);
	let r = ops.constant(reduce(1n));
	let factor = reduce(a);
	for (let i = 0; i < bits.length; i++) {
		if (i > 0) factor = reduce(factor * factor);
		let times = ops.mulConst(r, factor);
		if (ring !== undefined) times = ops.modConst(times, ring);
		r = ops.select(bits[i], times, r);
	}
	return r;
}

/** The bits (LSB first, `spec.outSize` of them) the spec requires of its output register. */
export function specBits(spec: Spec, env: Map<string, Word>, ops: WordOps): number[] {
	let v: Word;
	if (spec.modulus) {
		const m = ops.constantValue(compileNode(spec.modulus, env, ops));
		if (m === null) throw new WordUnsupported(`the modulus of "${spec.text}" must be a constant for the prover`);
		if (m <= 0n) throw new WordUnsupported('modulus must be positive');
		v = ops.modConst(compileNode(spec.expr, env, ops, m), m);
	} else {
		v = compileNode(spec.expr, env, ops);
	}
	return ops.low(v, spec.outSize);
}
