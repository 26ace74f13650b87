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

/** Compile a spec or condition node to a word over `env` (register name → word of its start value). */
export function compileNode(node: MathNode, env: Map<string, Word>, ops: WordOps): Word {
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
			return compileNode(nd.content!, env, ops);
		case 'ConditionalNode': {
			const c = ops.truthy(compileNode(nd.condition!, env, ops));
			return ops.select(c, compileNode(nd.trueExpr!, env, ops), compileNode(nd.falseExpr!, env, ops));
		}
		case 'OperatorNode': {
			const a = nd.args!.map((x) => compileNode(x, env, ops));
			switch (nd.fn as string) {
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
				case 'mod':
					return ops.modConst(a[0], constOf(a[1], 'a modulus'));
				case 'pow': {
					const e = small(constOf(a[1], 'an exponent'), 'an exponent');
					let r = ops.constant(1n);
					for (let i = 0; i < e; i++) r = ops.mul(r, a[0]);
					return r;
				}
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
			const a = nd.args!.map((x) => compileNode(x, env, ops));
			if (name === 'floor') return a[0];
			if (name === 'abs') return ops.select(ops.lt(a[0], ops.constant(0n)), ops.neg(a[0]), a[0]);
			if (name === 'min') return a.reduce((x, y) => ops.select(ops.lt(y, x), y, x));
			if (name === 'max') return a.reduce((x, y) => ops.select(ops.lt(x, y), y, x));
			if (name === 'mod') return ops.modConst(a[0], constOf(a[1], 'a modulus'));
			throw new WordUnsupported(`function ${name} is not supported by the prover`);
		}
	}
	throw new WordUnsupported(`${nd.type} is not supported by the prover`);
}

/** The bits (LSB first, `spec.outSize` of them) the spec requires of its output register. */
export function specBits(spec: Spec, env: Map<string, Word>, ops: WordOps): number[] {
	let v = compileNode(spec.expr, env, ops);
	if (spec.modulus) {
		const m = ops.constantValue(compileNode(spec.modulus, env, ops));
		if (m === null) throw new WordUnsupported(`the modulus of "${spec.text}" must be a constant for the prover`);
		if (m <= 0n) throw new WordUnsupported('modulus must be positive');
		v = ops.modConst(v, m);
	}
	return ops.low(v, spec.outSize);
}
