import { describe, expect, it } from 'vitest';
import { all, create } from 'mathjs';
import { Bdd, BddLimit, FALSE, TRUE, WordOps, type Word } from './bdd.js';
import { compileNode } from './spec-words.js';
import { parseCondition, parseSpec, evaluateSpec } from './spec.js';
import { specBits } from './spec-words.js';

// Independent reference: mathjs's own evaluator with BigInt numbers.
const math = create(all, { number: 'bigint' });
const refValue = (expr: string, scope: Record<string, bigint>): bigint => {
	const v = math.evaluate(expr, { ...scope });
	return typeof v === 'boolean' ? (v ? 1n : 0n) : BigInt(v as bigint);
};

/** Value of a word under an assignment (two's complement). */
function wordValue(bdd: Bdd, w: Word, a: Uint8Array): bigint {
	let v = 0n;
	w.bits.forEach((b, i) => {
		if (bdd.evaluate(b, a)) v += i === w.bits.length - 1 ? -(1n << BigInt(i)) : 1n << BigInt(i);
	});
	return v;
}

describe('BDD core (Bryant 1986)', () => {
	it('is canonical: equal functions are the same node', () => {
		const d = new Bdd(3);
		const [x, y, z] = [0, 1, 2].map((i) => d.variable(i));
		const f = d.or(d.and(x, y), d.and(x, z));
		const g = d.and(x, d.or(y, z));
		expect(f).toBe(g);
		expect(d.xor(f, g)).toBe(FALSE);
		expect(d.or(x, d.not(x))).toBe(TRUE);
	});
	it('counts and samples satisfying assignments exactly', () => {
		const d = new Bdd(4);
		const v = [0, 1, 2, 3].map((i) => d.variable(i));
		const f = d.or(v[0], d.and(v[2], v[3])); // 8 + 2 of 16 (inclusion–exclusion, by hand)
		expect(d.satCount(f)).toBe(10n);
		let s = 1;
		const rand = () => (s = (Math.imul(s, 1103515245) + 12345) >>> 0);
		for (let i = 0; i < 50; i++) expect(d.evaluate(f, d.sampleSat(f, rand)!)).toBe(true);
		expect(d.evaluate(f, d.anySat(f)!)).toBe(true);
		expect(d.anySat(FALSE)).toBeNull();
	});
	it('stops at its node limit with BddLimit', () => {
		const d = new Bdd(40, { maxNodes: 50 });
		expect(() => {
			let f = FALSE;
			for (let i = 0; i < 20; i++) f = d.xor(f, d.and(d.variable(i), d.variable(39 - i)));
		}).toThrow(BddLimit);
	});
});

describe('word arithmetic against mathjs (exhaustive over 4-bit a, b)', () => {
	const exprs = [
		'a + b',
		'a - b',
		'b - a - 7',
		'a * b',
		'-a * 3 + b',
		'(a + b) mod 5',
		'(a - b) mod 7',
		'(a * b) mod 13',
		'(a + b) mod 16',
		'(a + b) >> 2',
		'(a - b) >> 1',
		'a << 3',
		'a < b',
		'a <= b',
		'a == 3',
		'a != b',
		'a > 2 and b < 7',
		'not (a >= b) or a == 0',
		'a == 3 ? (b + 5) mod 13 : b',
		'a & b',
		'a | b',
		'a xor b',
		'a xor (b > 3)',
		'a ^ 2',
		// powers with a register exponent: exact, and reduced inside an enclosing mod (ring context)
		'2 ^ a',
		'3 ^ a - b',
		'2 ^ a mod 21',
		'(7 ^ a) mod 15',
		'(3 ^ a * b) mod 7',
		'(2 ^ a + b - 5) mod 11',
		'(-3) ^ a mod 10',
		'a == 3 ? 7 ^ b mod 15 : b',
		'((2 ^ a > b) * 3) mod 5',
		'(2 ^ a mod 7) < 3',
		'floor(a / 3)',
		'min(a, b)',
		'max(a, b - 4)',
		'abs(a - b)'
	];
	for (const e of exprs)
		it(e, () => {
			const d = new Bdd(8);
			const ops = new WordOps(d);
			// interleaved order: a_i at level 2i, b_i at level 2i+1
			const a = ops.unsigned([0, 1, 2, 3].map((i) => d.variable(2 * i)));
			const b = ops.unsigned([0, 1, 2, 3].map((i) => d.variable(2 * i + 1)));
			const w = compileNode(math.parse(e), new Map([['a', a], ['b', b]]), ops);
			for (let x = 0n; x < 16n; x++)
				for (let y = 0n; y < 16n; y++) {
					const asg = new Uint8Array(8);
					for (let i = 0; i < 4; i++) {
						asg[2 * i] = Number((x >> BigInt(i)) & 1n);
						asg[2 * i + 1] = Number((y >> BigInt(i)) & 1n);
					}
					// mathjs 14 refuses bitAnd/bitOr on BigInt: plain BigInt operators are the reference there
					const want = e === 'a & b' ? x & y : e === 'a | b' ? x | y : refValue(e, { a: x, b: y });
					expect(wordValue(d, w, asg), `${e} at a=${x}, b=${y}`).toBe(want);
					expect(want >= w.lo && want <= w.hi).toBe(true);
				}
		});
});

describe('spec bits and conditions', () => {
	const regs = [
		{ name: 'a', size: 4, offset: 0 },
		{ name: 'b', size: 4, offset: 4 },
		{ name: 'c', size: 2, offset: 8 }
	];
	it('a conditional spec keeps its own mod (no trailing split): b = c == 3 ? (b + 5) mod 13 : b', () => {
		const s = parseSpec('b = c == 3 ? (b + 5) mod 13 : b', regs);
		expect(s.modulus).toBeNull();
		expect(evaluateSpec(s, new Map([['b', 12n], ['c', 3n], ['a', 0n]]))).toBe(4n); // (12+5) mod 13 = 4, by hand
		expect(evaluateSpec(s, new Map([['b', 12n], ['c', 2n], ['a', 0n]]))).toBe(12n);
	});
	it('spec bits agree with evaluateSpec on every input: cout-style shifts and trailing mods', () => {
		for (const text of ['b = (a + b) >> 4', 'b = a + b mod 16', 'b = c == 3 ? (b + 5) mod 13 : b', 'b = (b + 8*c) mod 11', 'b = 2^a * b mod 13', 'b = b + 5^(a + c) mod 9']) {
			const s = parseSpec(text, regs);
			const d = new Bdd(10);
			const ops = new WordOps(d);
			const env = new Map(regs.map((r) => [r.name, ops.unsigned(Array.from({ length: r.size }, (_, i) => d.variable(r.offset + i)))]));
			const bits = specBits(s, env, ops);
			for (let m = 0; m < 1 << 10; m++) {
				const asg = new Uint8Array(10);
				for (let i = 0; i < 10; i++) asg[i] = (m >> i) & 1;
				const values = new Map(regs.map((r) => [r.name, BigInt((m >> r.offset) & ((1 << r.size) - 1))]));
				const want = evaluateSpec(s, values);
				let got = 0n;
				bits.forEach((f, i) => d.evaluate(f, asg) && (got |= 1n << BigInt(i)));
				expect(got, `${text} at ${m}`).toBe(want);
			}
		}
	});
	it('a register exponent outside a modulus is refused with the reason when the exact power is too wide', () => {
		const big = [{ name: 'e', size: 13, offset: 0 }, { name: 'y', size: 4, offset: 13 }];
		const d = new Bdd(17);
		const ops = new WordOps(d);
		const env = new Map(big.map((r) => [r.name, ops.unsigned(Array.from({ length: r.size }, (_, i) => d.variable(r.offset + i)))]));
		expect(() => specBits(parseSpec('y = 2^e * y + 1', big), env, ops)).toThrow(/has about 8191 bits.*mod M/);
		expect(() => specBits(parseSpec('y = y^e mod 5', big), env, ops)).toThrow(/constant base/);
		// the same power under a constant modulus is built mod M: 2^e mod 13 for every 13-bit e
		const bits = specBits(parseSpec('y = 2^e mod 13', big), env, ops);
		for (const e of [0n, 1n, 12n, 100n, 4095n, 8191n]) {
			const asg = new Uint8Array(17);
			for (let i = 0; i < 13; i++) asg[i] = Number((e >> BigInt(i)) & 1n);
			let got = 0n;
			bits.forEach((f, i) => d.evaluate(f, asg) && (got |= 1n << BigInt(i)));
			expect(got, `2^${e} mod 13`).toBe(2n ** e % 13n); // plain BigInt power as the reference
		}
	});
	it('conditions parse and name a bad column', () => {
		expect(parseCondition('b < 13', regs).reads).toEqual(['b']);
		expect(() => parseCondition('q < 13', regs)).toThrow(/column 1: unknown register "q"/);
		expect(() => parseCondition('b < ', regs)).toThrow(/does not parse/);
	});
});

describe('BDD unique table across rehashes', () => {
	it('stays canonical past several table growths (a regression: a rehash once linked the new node to itself)', () => {
		const d = new Bdd(22, { maxNodes: 8_000_000 });
		const v = Array.from({ length: 22 }, (_, i) => d.variable(i));
		// the middle bits of an 11 × 11-bit product have large BDDs: enough nodes to grow the table (first at 2^17)
		const ops = new WordOps(d);
		const a = ops.unsigned(v.slice(0, 11));
		const b = ops.unsigned(v.slice(11));
		const p = ops.mul(a, b);
		expect(d.size).toBeGreaterThan(140_000);
		// rebuilding gives the same nodes (canonical, every lookup terminates)
		const p2 = ops.mul(a, b);
		expect(p2.bits).toEqual(p.bits);
		const x = 0x2c3f1;
		const asg = new Uint8Array(22);
		for (let i = 0; i < 22; i++) asg[i] = (x >> i) & 1;
		let got = 0n;
		p.bits.forEach((f, i) => d.evaluate(f, asg) && i < p.bits.length - 1 && (got |= 1n << BigInt(i)));
		expect(got).toBe(BigInt(x & 0x7ff) * BigInt(x >> 11)); // plain BigInt product as the reference
	});
});

describe('restrict (Coudert and Madre 1990)', () => {
	it('agrees with f on the care set, drops variables the care set fixes, and is no larger here', () => {
		// every pair of functions over 4 variables from a few seeds: checked at all 16 assignments
		const d = new Bdd(4);
		const v = [0, 1, 2, 3].map((i) => d.variable(i));
		const fs = [d.xor(v[0], d.and(v[1], v[3])), d.or(d.and(v[0], v[2]), d.xor(v[1], v[3])), d.and(v[1], d.not(v[2])), v[3], TRUE];
		const cares = [d.and(v[1], v[3]), d.not(v[0]), d.or(v[2], v[0]), d.xor(v[0], v[2]), TRUE, d.and(d.not(v[1]), d.not(v[3]))];
		for (const f of fs)
			for (const c of cares) {
				const r = d.restrict(f, c);
				for (let m = 0; m < 16; m++) {
					const a = [0, 1, 2, 3].map((i) => (m >> i) & 1);
					if (d.evaluate(c, a)) expect(d.evaluate(r, a), `f=${f} care=${c} at ${m}`).toBe(d.evaluate(f, a));
				}
			}
		// a care set that fixes v1 = v3 = 1 removes them from f = v0 ⊕ (v1 ∧ v3): r = ¬v0
		const r = d.restrict(fs[0], cares[0]);
		expect(d.support(r)).toEqual([0]);
		expect(r).toBe(d.not(v[0]));
	});
});
