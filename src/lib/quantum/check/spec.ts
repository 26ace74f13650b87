/**
 * Specs: `OUT = EXPR` over the starting values of registers, evaluated exactly with BigInt
 * (parsed by mathjs, walked by us). A trailing top-level `mod M` applies to the whole right side
 * (`b = a + b mod 16` means (a + b) mod 16); every value is finally taken mod 2^size(OUT).
 *
 * Qubit order: a register's value is Σ bit_i·2^i (index 0 = LSB). Polynomials are over input
 * bits identified by flat qubit index (register offset + index).
 */
import { create, parseDependencies } from 'mathjs';
import type { MathNode } from 'mathjs';
import type { PlacedRegister } from '../circuit.js';
import { readSpecExpression, type ReadNode } from './spec-reader.js';

const math = create({ parseDependencies }, { number: 'bigint' });

/** A spec problem, with the 1-based column in the spec text. */
export class SpecError extends Error {
	constructor(
		readonly spec: string,
		readonly column: number,
		readonly detail: string
	) {
		super(`spec "${spec}", column ${column}: ${detail}`);
		this.name = 'SpecError';
	}
}

/** A parsed spec: output register, right side, optional trailing modulus. */
export interface Spec {
	text: string;
	out: string;
	outSize: number;
	expr: MathNode;
	modulus: MathNode | null;
	/** Registers read on the right side. */
	reads: string[];
}

/** Multilinear integer polynomial over input bits: monomial key (sorted flat qubits joined by '.', '' = 1) → coefficient. */
export type IntPoly = Map<string, bigint>;

const FUNCS = new Set(['floor', 'mod', 'min', 'max', 'abs']);

/** Parse `OUT = EXPR` against the circuit's registers. Throws {@link SpecError} naming the column. */
export function parseSpec(text: string, registers: { name: string; size: number }[]): Spec {
	const eq = text.indexOf('=');
	if (eq < 0) throw new SpecError(text, 1, 'expected OUT = EXPR, e.g. "p = a*b mod 2^8"');
	const lhs = text.slice(0, eq);
	const out = lhs.trim();
	const outCol = lhs.indexOf(out) + 1;
	if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(out)) throw new SpecError(text, outCol || 1, `left side "${out}" must be a register name`);
	const outReg = registers.find((r) => r.name === out);
	if (!outReg) throw new SpecError(text, outCol, `unknown register "${out}"; the circuit has ${registers.map((r) => r.name).join(', ')}`);
	let rhs = text.slice(eq + 1).replace(/\*\*/g, '^ ');
	const rhsCol = eq + 2;
	if (rhs.trim() === '') throw new SpecError(text, rhsCol, 'expected an expression after "="');
	// Split a trailing top-level `mod M`.
	let modText: string | null = null;
	let modCol = 0;
	let depth = 0;
	// a conditional (`c == 3 ? (b + 5) mod 13 : b`) keeps its own precedence: no trailing split
	const conditional = /\?/.test(rhs);
	for (let i = rhs.length - 1; i >= 0 && !conditional; i--) {
		const ch = rhs[i];
		if (ch === ')') depth++;
		else if (ch === '(') depth--;
		else if (depth === 0 && rhs.startsWith('mod', i) && !/[A-Za-z0-9_]/.test(rhs[i - 1] ?? ' ') && !/[A-Za-z0-9_]/.test(rhs[i + 3] ?? ' ')) {
			modText = rhs.slice(i + 3);
			modCol = rhsCol + i + 3;
			rhs = rhs.slice(0, i);
			break;
		}
	}
	const parse = (s: string, col: number): MathNode => {
		if (s.trim() === '') throw new SpecError(text, col, 'expected an expression');
		// The common form is read without mathjs (the same tree, see spec-reader.ts).
		const read = readSpecExpression(s);
		if (read) return read as unknown as MathNode;
		try {
			return math.parse(s);
		} catch (e) {
			const m = /\(char (\d+)\)/.exec((e as Error).message);
			throw new SpecError(text, col + (m ? Math.max(0, Number(m[1]) - 1) : 0), `expression does not parse: ${(e as Error).message.replace(/ \(char \d+\)/, '')}`);
		}
	};
	const expr = parse(rhs, rhsCol);
	const modulus = modText !== null ? parse(modText, modCol) : null;
	const reads = new Set<string>();
	const check = (node: MathNode, base: number, src: string) => validateNode(text, node, base, src, registers, reads);
	check(expr, rhsCol, rhs);
	if (modulus) check(modulus, modCol, modText!);
	return { text, out, outSize: outReg.size, expr, modulus, reads: [...reads] };
}

/** Every node of the tree, parent first (mathjs's own traverse, or the same order for a tree of spec-reader.ts). */
function traverse(node: MathNode, visit: (n: MathNode, parent: MathNode | null) => void): void {
	if (typeof (node as { traverse?: unknown }).traverse === 'function') return node.traverse((n, _path, parent) => visit(n, parent));
	const walk = (n: ReadNode, parent: ReadNode | null): void => {
		visit(n as unknown as MathNode, parent as unknown as MathNode | null);
		if (n.type === 'OperatorNode') for (const a of n.args) walk(a, n);
		else if (n.type === 'ParenthesisNode') walk(n.content, n);
	};
	walk(node as unknown as ReadNode, null);
}

function validateNode(text: string, node: MathNode, base: number, src: string, registers: { name: string }[], reads: Set<string>): void {
	traverse(node, (n, parent) => {
		const nd = n as unknown as { type: string; name?: string; fn?: string | { name: string }; value?: unknown };
		if (nd.type === 'SymbolNode') {
			const isFn = parent && (parent as unknown as { type: string; fn?: unknown }).type === 'FunctionNode' && (parent as unknown as { fn: unknown }).fn === n;
			if (isFn) {
				if (!FUNCS.has(nd.name!)) throw new SpecError(text, base + wordIndex(src, nd.name!), `unknown function "${nd.name}"; expected ${[...FUNCS].join(', ')}`);
				return;
			}
			if (!registers.some((r) => r.name === nd.name)) throw new SpecError(text, base + wordIndex(src, nd.name!), `unknown register "${nd.name}" on the right side`);
			reads.add(nd.name!);
		} else if (nd.type === 'ConstantNode' && typeof nd.value !== 'bigint' && typeof nd.value !== 'boolean') {
			throw new SpecError(text, base, `constant ${String(nd.value)} is not an integer; specs use integer arithmetic`);
		} else if (nd.type === 'ConstantNode' && typeof nd.value === 'boolean') {
			// true / false read as 1 / 0
		} else if (!['OperatorNode', 'ParenthesisNode', 'FunctionNode', 'ConstantNode', 'ConditionalNode'].includes(nd.type)) {
			throw new SpecError(text, base, `unsupported ${nd.type.replace('Node', '').toLowerCase()} in a spec`);
		}
	});
	}

function wordIndex(src: string, word: string): number {
	const m = new RegExp(`(^|[^A-Za-z0-9_])${word}(?![A-Za-z0-9_])`).exec(src);
	return m ? m.index + m[1].length : 0;
}

function bmod(a: bigint, m: bigint): bigint {
	const r = a % m;
	return r < 0n ? r + m : r;
}

/** Evaluate a spec node over register values (BigInt, exact). Throws RangeError on division by zero and the like. */
export function evaluateNode(node: MathNode, values: Map<string, bigint>): bigint {
	const nd = node as unknown as { type: string; name?: string; fn?: string | { name: string }; value?: unknown; args?: MathNode[]; content?: MathNode };
	switch (nd.type) {
		case 'ConstantNode':
			return typeof nd.value === 'boolean' ? (nd.value ? 1n : 0n) : (nd.value as bigint);
		case 'SymbolNode':
			return values.get(nd.name!)!;
		case 'ConditionalNode': {
			const cn = node as unknown as { condition: MathNode; trueExpr: MathNode; falseExpr: MathNode };
			return evaluateNode(cn.condition, values) !== 0n ? evaluateNode(cn.trueExpr, values) : evaluateNode(cn.falseExpr, values);
		}
		case 'ParenthesisNode':
			return evaluateNode(nd.content!, values);
		case 'OperatorNode': {
			const a = nd.args!.map((x) => evaluateNode(x, values));
			switch (nd.fn as string) {
				case 'unaryMinus':
					return -a[0];
				case 'unaryPlus':
					return a[0];
				case 'add':
					return a[0] + a[1];
				case 'subtract':
					return a[0] - a[1];
				case 'multiply':
					return a[0] * a[1];
				case 'divide': {
					if (a[1] === 0n) throw new RangeError('division by zero');
					const q = a[0] / a[1];
					return q * a[1] > a[0] ? q - 1n : q; // floor
				}
				case 'mod':
					if (a[1] === 0n) throw new RangeError('modulo by zero');
					return bmod(a[0], a[1]);
				case 'pow':
					if (a[1] < 0n || a[1] > 100_000n) throw new RangeError('exponent must be between 0 and 100000');
					return a[0] ** a[1];
				case 'leftShift':
					return a[0] << a[1];
				case 'rightShift':
				case 'rightArithShift':
					return a[0] >> a[1];
				case 'bitAnd':
					return a[0] & a[1];
				case 'bitOr':
					return a[0] | a[1];
				case 'bitXor':
					return a[0] ^ a[1];
				case 'equal':
					return a[0] === a[1] ? 1n : 0n;
				case 'unequal':
					return a[0] !== a[1] ? 1n : 0n;
				case 'smaller':
					return a[0] < a[1] ? 1n : 0n;
				case 'smallerEq':
					return a[0] <= a[1] ? 1n : 0n;
				case 'larger':
					return a[0] > a[1] ? 1n : 0n;
				case 'largerEq':
					return a[0] >= a[1] ? 1n : 0n;
				case 'and':
					return a[0] !== 0n && a[1] !== 0n ? 1n : 0n;
				case 'or':
					return a[0] !== 0n || a[1] !== 0n ? 1n : 0n;
				case 'xor':
					return (a[0] !== 0n) !== (a[1] !== 0n) ? 1n : 0n;
				case 'not':
					return a[0] === 0n ? 1n : 0n;
			}
			throw new RangeError(`operator ${nd.fn as string} is not supported in specs`);
		}
		case 'FunctionNode': {
			const name = typeof nd.fn === 'string' ? nd.fn : nd.fn!.name;
			const a = nd.args!.map((x) => evaluateNode(x, values));
			if (name === 'floor') return a[0];
			if (name === 'abs') return a[0] < 0n ? -a[0] : a[0];
			if (name === 'min') return a.reduce((x, y) => (y < x ? y : x));
			if (name === 'max') return a.reduce((x, y) => (y > x ? y : x));
			if (name === 'mod') {
				if (a[1] === 0n) throw new RangeError('modulo by zero');
				return bmod(a[0], a[1]);
			}
		}
	}
	throw new RangeError(`cannot evaluate ${nd.type}`);
}

/** A domain condition over register start values (`b < N`, `x < 21 and y == 1`). */
export interface Condition {
	text: string;
	expr: MathNode;
	reads: string[];
}

const COMPARISONS = new Set(['smaller', 'smallerEq', 'larger', 'largerEq', 'equal', 'unequal', 'and', 'or', 'xor', 'not']);

/**
 * Parse a domain condition: a comparison (or `and`/`or`/`not` of comparisons) over register
 * names and integers, as in the document's `assume`. Throws {@link SpecError} naming the column.
 */
export function parseCondition(text: string, registers: { name: string; size: number }[]): Condition {
	const head = `${registers[0]?.name ?? 'x'} = `;
	const shift = head.length;
	const col = (c: number) => Math.max(1, c - shift);
	let probe: Spec;
	try {
		probe = parseSpec(head + text, registers.length ? registers : [{ name: 'x', size: 1 }]);
	} catch (e) {
		if (e instanceof SpecError) throw new SpecError(text, col(e.column), e.detail);
		throw e;
	}
	if (probe.modulus) throw new SpecError(text, 1, 'a condition has no trailing "mod"; write (x mod M) < K');
	const top = probe.expr as unknown as { type: string; fn?: string; content?: MathNode };
	let node = top;
	while (node.type === 'ParenthesisNode') node = node.content as unknown as typeof top;
	if (node.type !== 'OperatorNode' || !COMPARISONS.has(node.fn!)) throw new SpecError(text, col(shift + 1), 'expected a comparison such as "b < 13" or "x < 21 and y == 1"');
	return { text, expr: probe.expr, reads: probe.reads };
}

/** True when the register values satisfy every condition (exact). */
export function satisfiesConditions(conditions: Condition[], values: Map<string, bigint>): boolean {
	for (const c of conditions) if (evaluateNode(c.expr, values) === 0n) return false;
	return true;
}

/** Value the spec requires of its output register, mod 2^size (exact). */
export function evaluateSpec(spec: Spec, values: Map<string, bigint>): bigint {
	let v = evaluateNode(spec.expr, values);
	if (spec.modulus) {
		const m = evaluateNode(spec.modulus, values);
		if (m <= 0n) throw new RangeError('modulus must be positive');
		v = bmod(v, m);
	}
	return bmod(v, 1n << BigInt(spec.outSize));
}

// ---------------------------------------------------------------------------------------------
// Polynomial form

/** Multiply two monomial keys (union of their variable sets). */
export function mulKeys(a: string, b: string): string {
	if (a === '') return b;
	if (b === '') return a;
	if (a === b) return a;
	// The provers multiply the same few monomials over and over (a phase polynomial times each
	// control of each flip): remember recent products.
	const memo = a < b ? `${a}|${b}` : `${b}|${a}`;
	const hit = mulMemo.get(memo);
	if (hit !== undefined) return hit;
	const s = new Set<number>();
	for (const x of a.split('.')) s.add(Number(x));
	for (const x of b.split('.')) s.add(Number(x));
	const out = [...s].sort((x, y) => x - y).join('.');
	if (mulMemo.size >= MUL_MEMO_SIZE) mulMemo.clear();
	mulMemo.set(memo, out);
	return out;
}
const MUL_MEMO_SIZE = 1 << 18;
const mulMemo = new Map<string, string>();

function polyAddTo(p: IntPoly, key: string, c: bigint): void {
	const v = (p.get(key) ?? 0n) + c;
	if (v === 0n) p.delete(key);
	else p.set(key, v);
}
function polyMul(a: IntPoly, b: IntPoly, maxTerms: number): IntPoly | null {
	const out: IntPoly = new Map();
	for (const [ka, ca] of a)
		for (const [kb, cb] of b) {
			polyAddTo(out, mulKeys(ka, kb), ca * cb);
			if (out.size > maxTerms) return null;
		}
	return out;
}

/** Σ 2^i·x_{offset+i}: a register's value as a polynomial in its bits. */
export function registerPoly(r: PlacedRegister): IntPoly {
	const p: IntPoly = new Map();
	for (let i = 0; i < r.size; i++) p.set(String(r.offset + i), 1n << BigInt(i));
	return p;
}

/**
 * The spec's right side as an integer multilinear polynomial over the input bits, when it is made
 * of +, −, ×, integer powers, shifts by constants and a power-of-two modulus ≥ 2^size(OUT); null
 * otherwise (then callers fall back to Möbius inversion over the values).
 */
export function specPolynomial(spec: Spec, registers: PlacedRegister[], inputs: Set<string>, maxTerms = 200_000): IntPoly | null {
	if (spec.modulus) {
		let m: bigint;
		try {
			m = evaluateNode(spec.modulus, new Map());
		} catch {
			return null;
		}
		if (m <= 0n || (m & (m - 1n)) !== 0n || m < 1n << BigInt(spec.outSize)) return null;
	}
	const walk = (node: MathNode): IntPoly | null => {
		const nd = node as unknown as { type: string; name?: string; fn?: string; value?: unknown; args?: MathNode[]; content?: MathNode };
		switch (nd.type) {
			case 'ConstantNode':
				return (nd.value as bigint) === 0n ? new Map() : new Map([['', nd.value as bigint]]);
			case 'SymbolNode': {
				if (!inputs.has(nd.name!)) return new Map();
				return registerPoly(registers.find((r) => r.name === nd.name)!);
			}
			case 'ParenthesisNode':
				return walk(nd.content!);
			case 'OperatorNode': {
				const a = nd.args!.map(walk);
				if (a.some((x) => x === null)) return null;
				const [x, y] = a as IntPoly[];
				switch (nd.fn) {
					case 'unaryPlus':
						return x;
					case 'unaryMinus':
						return new Map([...x].map(([k, c]) => [k, -c]));
					case 'add':
					case 'subtract': {
						const out = new Map(x);
						for (const [k, c] of y) polyAddTo(out, k, nd.fn === 'add' ? c : -c);
						return out;
					}
					case 'multiply':
						return polyMul(x, y, maxTerms);
					case 'pow':
					case 'leftShift': {
						if (y.size > 1 || (y.size === 1 && !y.has(''))) return null;
						const e = y.get('') ?? 0n;
						if (e < 0n || e > 4096n) return null;
						if (nd.fn === 'leftShift') return new Map([...x].map(([k, c]) => [k, c << e]));
						let r: IntPoly | null = new Map([['', 1n]]);
						for (let i = 0n; i < e && r; i++) r = polyMul(r, x, maxTerms);
						return r;
					}
				}
				return null;
			}
		}
		return null;
	};
	return walk(spec.expr);
}
