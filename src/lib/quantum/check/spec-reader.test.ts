// The spec reader against mathjs's parser (the reference, the same configuration as spec.ts): for
// every text the reader accepts, both trees must be equal node for node; where mathjs refuses a
// text, the reader must refuse it too. Texts: the specs the project ships and tests, then
// generated expressions over a wider alphabet than the reader's (so refusals are exercised).
import { describe, expect, it } from 'vitest';
import { create, parseDependencies } from 'mathjs';
import { readSpecExpression } from './spec-reader';
import { evaluateSpec, parseSpec, SpecError } from './spec';
import { makeTemplate, TEMPLATE_NAMES } from '../templates';

const math = create({ parseDependencies }, { number: 'bigint' });

/** A tree as plain data, from either parser (mathjs's FunctionNode keeps its name in fn.name). */
function plain(n: unknown): unknown {
	const x = n as Record<string, unknown>;
	const out: Record<string, unknown> = { type: x.type };
	if (x.type === 'OperatorNode') Object.assign(out, { op: x.op, fn: x.fn, implicit: x.implicit, isPercentage: x.isPercentage });
	if (x.type === 'ConstantNode') out.value = typeof x.value === 'bigint' ? `${x.value}n` : x.value;
	if (x.type === 'SymbolNode') out.name = x.name;
	if (x.type === 'FunctionNode') out.fn = (x.fn as { name: string }).name;
	if ('args' in x && Array.isArray(x.args)) out.args = x.args.map(plain);
	if ('content' in x && x.content) out.content = plain(x.content);
	for (const k of ['condition', 'trueExpr', 'falseExpr']) if (k in x) out[k] = plain(x[k]);
	return out;
}

/** mathjs's tree, or null when it refuses the text. */
function reference(src: string): unknown {
	try {
		return plain(math.parse(src));
	} catch {
		return null;
	}
}

function agree(src: string): boolean {
	const mine = readSpecExpression(src);
	const ref = reference(src);
	if (mine === null) return false;
	expect(ref, `mathjs refuses "${src}" but the reader read it`).not.toBeNull();
	expect(plain(mine), `tree of "${src}"`).toEqual(ref);
	return true;
}

// Right sides as written in the templates, seeds and tests (trailing `mod` split off as parseSpec does).
const SHIPPED = [
	'a + b', 'p + a*b', 'b + 9', 'b + c*2*x', 'y + c*x', 'x + y', '(b + 8*a + 8*c)', '2^a * b', 'a + b + (b^a - b^a)',
	'b + 5^(a + c)', 'b + a*c', 'b + c*100*x', 'b + c*a', 'a*b + 3', 'a*b', 'a*c', 'p + 3*a', 'p + 5*a', '21*x', 'x + c*(5*x mod 21 - x)',
	'7^e * y', '2^e * y + 1', '2^e * y', '2^e', 'y^e', 'b', 'a + z', '2^8', '2^32', '4294967296', '2^64'
];
// Forms the reader must leave to mathjs.
const REFUSED = [
	'(a + b) >> 4', 'c == 3 ? (b + 5) mod 13 : b', 'sqrt(a)', 'floor(a/2)', '2a', 'a b', '(a)(b)', '2(a + b)', '1.5*a', '0x1F', '1e3*a',
	'a!', "a'", 'a % 3', 'a .* b', 'a; b', 'a\nb', 'not a', 'true', 'NaN', 'a mod', 'mod a', 'a[1]', 'a.b', '"a"', '', '   ', '(a', 'a)', 'a +', '* a'
];

describe('readSpecExpression (spec-reader.ts) against mathjs 15 parse', () => {
	it('reads every shipped spec form, to the tree mathjs builds', () => {
		for (const s of SHIPPED) expect(agree(s), s).toBe(true);
		// the templates' specs, through parseSpec's own split of the trailing mod
		for (const name of TEMPLATE_NAMES) {
			for (const bits of [2, 4, 16]) {
				const doc = makeTemplate(name, '', bits);
				for (const text of doc.specs ?? []) {
					const rhs = text.slice(text.indexOf('=') + 1);
					const parts = rhs.split(/\bmod\b/);
					for (const p of parts) if (p.trim()) expect(agree(p), `${name} ${bits}: ${p}`).toBe(true);
				}
			}
		}
	});

	it('refuses other forms (mathjs reads them, or refuses them itself)', () => {
		for (const s of REFUSED) expect(readSpecExpression(s), s).toBeNull();
	});

	it('agrees with mathjs on 20,000 generated expressions (seeded)', () => {
		let seed = 12345;
		const rnd = (n: number) => {
			seed = (seed * 1103515245 + 12345) & 0x7fffffff;
			return seed % n;
		};
		const atoms = ['a', 'b', 'p', 'x1', '_y', '0', '7', '16', '007', '123456789012345678901234567890', 'mod', 'in', 'e', 'pi'];
		const ops = [' + ', ' - ', '*', '/', '^', ' mod ', '-', '+', ' ', '(', ')', '**', '.', '%', '!', '<', ','];
		const gen = (d: number): string => {
			const k = rnd(10);
			if (d > 4 || k < 3) return atoms[rnd(atoms.length)];
			if (k < 4) return `(${gen(d + 1)})`;
			if (k < 5) return `${rnd(2) ? '-' : '+'}${gen(d + 1)}`;
			if (k < 9) return `${gen(d + 1)}${ops[rnd(6)]}${gen(d + 1)}`;
			return `${gen(d + 1)}${ops[rnd(ops.length)]}${gen(d + 1)}`;
		};
		let read = 0;
		for (let i = 0; i < 20_000; i++) {
			const s = gen(0);
			const mine = readSpecExpression(s);
			if (mine === null) continue;
			read++;
			expect(plain(mine), s).toEqual(reference(s));
		}
		// most generated texts are of the reader's form: the comparison is not vacuous
		expect(read).toBeGreaterThan(10_000);
	});

	it('parseSpec gives the same values and the same errors with the reader as with mathjs alone', () => {
		const regs = [
			{ name: 'a', size: 4 },
			{ name: 'b', size: 4 },
			{ name: 'p', size: 8 }
		];
		// p = p + a*b mod 256 at a few inputs, against BigInt arithmetic written out
		const spec = parseSpec('p = p + a*b mod 256', regs);
		for (const [a, b, p] of [[3n, 5n, 7n], [15n, 15n, 255n], [0n, 9n, 1n]]) expect(evaluateSpec(spec, new Map([['a', a], ['b', b], ['p', p]]))).toBe((p + a * b) % 256n);
		// an unknown register is named with its column, as before
		expect(() => parseSpec('p = a*q', regs)).toThrow(SpecError);
		expect(() => parseSpec('p = a*q', regs)).toThrow('spec "p = a*q", column 7: unknown register "q" on the right side');
		expect(() => parseSpec('p = a*', regs)).toThrow(/column \d+: expression does not parse/);
	});
	it('a very long chain of ^ is refused by the reader (left to mathjs, which words the error), never a stack overflow', () => {
		const chain = 'a' + '^a'.repeat(10_000);
		expect(readSpecExpression(chain)).toBeNull();
		expect(() => parseSpec(`p = ${chain}`, [{ name: 'a', size: 4 }, { name: 'p', size: 8 }])).toThrow(SpecError);
	});
});
