/**
 * Parameter expressions of OpenQASM files, parsed with mathjs and evaluated by our own walker so
 * that rational multiples of π stay exact (they become exact dyadic angles in turns when the
 * denominator is a power of two). Anything else (sin, sqrt, e, …) is a float.
 */
import { create, parseDependencies } from 'mathjs';
import type { MathNode } from 'mathjs';
import { dyadic, floatTurns, ZERO_ANGLE, type Angle } from '../angle.js';
import { QasmError, type Token } from './lexer.js';
import { BudgetExceeded, bitLength, checkBits } from '../budget.js';

const math = create({ parseDependencies }, { number: 'bigint' });
const parseCache = new Map<string, MathNode>();

/** A number in an expression: exact q·π^pi with q = n/d rational (d > 0), or a float. Units are whatever the context says (radians for angles). */
export type Num = { exact: true; n: bigint; d: bigint; pi: 0 | 1 } | { exact: false; v: number };

/** Names an expression may use: constants and gate parameters. */
export type NumScope = Map<string, Num>;

const FUNCTIONS = new Set(['sin', 'cos', 'tan', 'arcsin', 'arccos', 'arctan', 'asin', 'acos', 'atan', 'sqrt', 'exp', 'ln', 'log', 'floor', 'ceiling', 'ceil', 'abs', 'pow', 'mod']);
const CONSTANTS = new Map<string, string>([
	['pi', 'pi'],
	['π', 'pi'],
	['tau', 'tau'],
	['τ', 'tau'],
	['e', 'e'],
	['euler', 'e'],
	['ℇ', 'e']
]);
// mathjs reads these as operators or keywords; an OpenQASM name spelled like one would be misread.
const MATHJS_WORDS = new Set(['mod', 'to', 'in', 'and', 'or', 'not', 'xor', 'true', 'false', 'null', 'end', 'Infinity', 'NaN', 'undefined']);

function gcd(a: bigint, b: bigint): bigint {
	if (a < 0n) a = -a;
	if (b < 0n) b = -b;
	while (b) [a, b] = [b, a % b];
	return a;
}

/** Exact rational q·π^pi, reduced. */
export function exactNum(n: bigint, d = 1n, pi: 0 | 1 = 0): Num {
	if (d === 0n) throw new RangeError('division by zero');
	if (d < 0n) {
		n = -n;
		d = -d;
	}
	const g = gcd(n, d) || 1n;
	return { exact: true, n: n / g, d: d / g, pi: n === 0n ? 0 : pi };
}

/** Float value of a number (radians when it is an angle). */
export function numToFloat(x: Num): number {
	if (!x.exact) return x.v;
	const v = Number(x.n) / Number(x.d);
	return x.pi ? v * Math.PI : v;
}

/** A radian value as an angle in turns: exact dyadic when it is (k/2^m)·π, else a float. */
export function numToAngle(x: Num): Angle {
	if (x.exact) {
		if (x.n === 0n) return ZERO_ANGLE;
		if (x.pi === 1) {
			const d2 = x.d * 2n; // q·π rad = q/2 turn
			if ((d2 & (d2 - 1n)) === 0n) {
				const exp = d2.toString(2).length - 1;
				if (exp <= 4096) return dyadic(x.n, exp);
			}
		}
	}
	return floatTurns(numToFloat(x) / (2 * Math.PI));
}

/** A radian value from an angle in turns (exact stays exact). */
export function angleToNum(a: Angle): Num {
	if (!a.exact) return { exact: false, v: a.turns * 2 * Math.PI };
	return exactNum(2n * a.num, 1n << BigInt(a.exp), 1);
}

/** Exact integer value, or null. */
export function numToInteger(x: Num): bigint | null {
	if (x.exact && x.pi === 0 && x.d === 1n) return x.n;
	if (!x.exact && Number.isInteger(x.v) && Math.abs(x.v) < 2 ** 53) return BigInt(x.v);
	return null;
}

const f = (v: number): Num => ({ exact: false, v });

/** x + sign·y (exact when both are and the π powers agree). */
export function add(x: Num, y: Num, sign: 1n | -1n): Num {
	if (x.exact && y.exact) {
		if (y.n === 0n) return x;
		if (x.n === 0n) return exactNum(sign * y.n, y.d, y.pi);
		if (x.pi === y.pi) {
			// Sizes are bounded before the big-integer arithmetic runs (src/lib/quantum/budget.ts).
			checkBits(Math.max(bitLength(x.n) + bitLength(y.d), bitLength(y.n) + bitLength(x.d)) + 1);
			checkBits(bitLength(x.d) + bitLength(y.d));
			return exactNum(x.n * y.d + sign * y.n * x.d, x.d * y.d, x.pi);
		}
	}
	return f(numToFloat(x) + Number(sign) * numToFloat(y));
}
/** x·y. */
export function mul(x: Num, y: Num): Num {
	if (x.exact && y.exact) {
		if (x.n === 0n || y.n === 0n) return exactNum(0n);
		if (x.pi + y.pi <= 1) {
			checkBits(bitLength(x.n) + bitLength(y.n));
			checkBits(bitLength(x.d) + bitLength(y.d));
			return exactNum(x.n * y.n, x.d * y.d, (x.pi + y.pi) as 0 | 1);
		}
	}
	return f(numToFloat(x) * numToFloat(y));
}
/** x/y, null when y = 0. */
export function div(x: Num, y: Num): Num | null {
	if (y.exact ? y.n === 0n : y.v === 0) return null;
	if (x.exact && y.exact) {
		if (x.n === 0n) return exactNum(0n);
		if (x.pi >= y.pi) {
			checkBits(bitLength(x.n) + bitLength(y.d));
			checkBits(bitLength(x.d) + bitLength(y.n));
			return exactNum(x.n * y.d, x.d * y.n, (x.pi - y.pi) as 0 | 1);
		}
	}
	return f(numToFloat(x) / numToFloat(y));
}
function pow(x: Num, y: Num): Num {
	if (x.exact && y.exact && y.pi === 0 && y.d === 1n && y.n >= -4096n && y.n <= 4096n) {
		const e = y.n;
		if (e === 0n) return exactNum(1n);
		// The result has about |e| times the bits of the base: refuse it before computing it.
		const times = Number(e < 0n ? -e : e);
		checkBits(Math.max(bitLength(x.n), bitLength(x.d)) * times);
		if (x.pi === 0 || e === 1n) {
			if (e > 0n) return exactNum(x.n ** e, x.d ** e, x.pi);
			if (x.n !== 0n && x.pi === 0) return exactNum(x.d ** -e, x.n ** -e);
		}
	}
	return f(numToFloat(x) ** numToFloat(y));
}

/** Where an expression sits in the file, for messages. */
interface ExprSite {
	line: number;
	column: number;
	file: string;
}

/**
 * Evaluate the expression made of `tokens` (already cut at the enclosing `,` / `)` / `]`).
 * Unknown names and operator errors are reported at the offending token; evaluation problems
 * (division by zero, non-finite result) at the start of the expression.
 */
export function evaluateTokens(tokens: Token[], scope: NumScope, file: string, warn?: (t: Token, message: string) => void, version = 2): Num {
	if (tokens.length === 0) throw new RangeError('empty expression');
	// Most expressions in exported files are numbers, π over powers of two and parameters: read
	// them directly. Anything else (functions, %, ^, errors) goes through mathjs below.
	let quick: Num | null;
	try {
		quick = quickEvaluate(tokens, scope);
	} catch (e) {
		// Arithmetic refused for size (bounded before it runs): place it at the expression.
		if (e instanceof BudgetExceeded) throw new QasmError(tokens[0].line, tokens[0].column, `${e.message} in this expression`, file);
		throw e;
	}
	if (quick) return quick;
	const parts: string[] = [];
	const aliases = new Map<string, Num>();
	let prevOperand = false;
	for (let i = 0; i < tokens.length; i++) {
		const t = tokens[i];
		const next = tokens[i + 1];
		let text = t.text;
		let operand = false;
		if (t.kind === 'ident') {
			const isCall = next?.kind === 'punct' && next.text === '(';
			if (isCall) {
				if (!FUNCTIONS.has(t.text)) throw new QasmError(t.line, t.column, `unknown function "${t.text}" in expression; expected one of ${[...FUNCTIONS].join(', ')}`, file);
			} else if (scope.has(t.text)) {
				text = `v_${aliases.size}`;
				aliases.set(text, scope.get(t.text)!);
			} else if (CONSTANTS.has(t.text)) {
				text = CONSTANTS.get(t.text)!;
			} else {
				throw new QasmError(t.line, t.column, `unknown name "${t.text}" in expression; expected a parameter, a constant or pi`, file);
			}
			if (MATHJS_WORDS.has(t.text) && !scope.has(t.text)) throw new QasmError(t.line, t.column, `"${t.text}" cannot be used in an expression`, file);
			operand = !isCall;
		} else if (t.kind === 'int' || t.kind === 'float') {
			// A literal's size is known from its digits: refuse a huge one before BigInt reads it.
			const digits = t.text.replace(/[^0-9]/g, '').length;
			if (digits * 3.3219 > 8192) throw new QasmError(t.line, t.column, `number too large: ${digits} digits; the limit is 8192 bits per number`, file);
			operand = true;
		} else if (t.kind === 'punct') {
			if (t.text === '**') text = '^';
			else if (t.text === '^' && version >= 3) warn?.(t, 'read "^" as a power; in OpenQASM 3 it is bitwise XOR on integers, write ** for a power');
			if (!['+', '-', '*', '/', '^', '**', '(', ')', '%', ','].includes(t.text))
				throw new QasmError(t.line, t.column, `unexpected "${t.text}" in expression; expected + - * / ** ^ % or parentheses`, file);
			if (t.text === ')') operand = true;
		} else {
			throw new QasmError(t.line, t.column, `unexpected ${t.kind} "${t.text}" in expression`, file);
		}
		const startsOperand = t.kind !== 'punct' || t.text === '(';
		if (prevOperand && startsOperand) throw new QasmError(t.line, t.column, `expected an operator before "${t.text}"`, file);
		prevOperand = operand;
		parts.push(text);
	}
	const site: ExprSite = { line: tokens[0].line, column: tokens[0].column, file };
	let node: MathNode;
	const key = parts.join(' ');
	try {
		// Parsed trees are cached by text: exported files repeat the same few angle expressions.
		node = parseCache.get(key) ?? math.parse(key);
		if (parseCache.size < 10_000) parseCache.set(key, node);
	} catch (e) {
		throw new QasmError(site.line, site.column, `expression does not parse (${(e as Error).message.replace(/ \(char \d+\)/, '')}); expected an arithmetic expression`, file);
	}
	let v: Num;
	try {
		v = walk(node, aliases, site);
	} catch (e) {
		// Arithmetic refused for size, or a RangeError from exact arithmetic: place it at the expression.
		if (e instanceof BudgetExceeded) throw new QasmError(site.line, site.column, `${e.message} in this expression`, file);
		if (e instanceof RangeError && !(e instanceof QasmError)) throw new QasmError(site.line, site.column, `${e.message} in expression`, file);
		throw e;
	}
	if (!v.exact && !Number.isFinite(v.v)) throw new QasmError(site.line, site.column, 'expression does not evaluate to a finite number', file);
	return v;
}

/** Decimal literal text → exact rational (as the mathjs walker reads a ConstantNode). */
function decimalNum(text: string): Num | null {
	const m = /^(\d*)\.?(\d*)(?:[eE]([+-]?\d+))?$/.exec(text);
	if (!m) return null;
	const digits = (m[1] || '0') + (m[2] || '');
	const e = (m[3] ? parseInt(m[3], 10) : 0) - (m[2] || '').length;
	if (Math.abs(e) >= 400) return null;
	return e >= 0 ? exactNum(BigInt(digits) * 10n ** BigInt(e)) : exactNum(BigInt(digits), 10n ** BigInt(-e));
}

/**
 * Recursive descent over + − * / ** unary ± and parentheses, with numbers, pi/π, tau/τ and scope
 * names; the same values as the mathjs path. Null when the expression needs more (then the caller
 * takes the mathjs path, which also words every error).
 */
function quickEvaluate(tokens: Token[], scope: NumScope): Num | null {
	let i = 0;
	const n = tokens.length;
	const isP = (t: Token | undefined, x: string) => t !== undefined && t.kind === 'punct' && t.text === x;
	const expr = (): Num | null => {
		let a = term();
		while (a && i < n && (isP(tokens[i], '+') || isP(tokens[i], '-'))) {
			const sign = tokens[i++].text === '+' ? 1n : -1n;
			const b = term();
			if (!b) return null;
			a = add(a, b, sign);
		}
		return a;
	};
	const term = (): Num | null => {
		let a = unary();
		while (a && i < n && (isP(tokens[i], '*') || isP(tokens[i], '/'))) {
			const op = tokens[i++].text;
			const b = unary();
			if (!b) return null;
			a = op === '*' ? mul(a, b) : div(a, b);
		}
		return a;
	};
	const unary = (): Num | null => {
		if (isP(tokens[i], '-')) {
			i++;
			const a = unary();
			return a && mul(exactNum(-1n), a);
		}
		if (isP(tokens[i], '+')) {
			i++;
			return unary();
		}
		const base = atom();
		if (base && isP(tokens[i], '**')) {
			i++;
			const e = unary();
			return e && pow(base, e);
		}
		return base;
	};
	const atom = (): Num | null => {
		const t = tokens[i++];
		if (!t) return null;
		if (t.kind === 'int') return exactNum(BigInt(t.text));
		if (t.kind === 'float') return decimalNum(t.text);
		if (t.kind === 'ident') {
			if (isP(tokens[i], '(')) return null;
			const v = scope.get(t.text);
			if (v) return v;
			if (t.text === 'pi' || t.text === 'π') return exactNum(1n, 1n, 1);
			if (t.text === 'tau' || t.text === 'τ') return exactNum(2n, 1n, 1);
			return null;
		}
		if (isP(t, '(')) {
			const v = expr();
			if (!v || !isP(tokens[i], ')')) return null;
			i++;
			return v;
		}
		return null;
	};
	const v = expr();
	if (!v || i !== n) return null;
	if (!v.exact && !Number.isFinite(v.v)) return null;
	return v;
}

function walk(node: MathNode, scope: NumScope, site: ExprSite): Num {
	const nd = node as unknown as { type: string; value?: unknown; name?: string; fn?: string | { name: string }; args?: MathNode[]; content?: MathNode };
	const fail = (msg: string): never => {
		throw new QasmError(site.line, site.column, msg, site.file);
	};
	switch (nd.type) {
		case 'ConstantNode': {
			const v = nd.value;
			if (typeof v === 'bigint') return exactNum(v);
			if (typeof v === 'number') {
				// Decimal literals such as 0.125 are exact rationals; keep them exact.
				const m = /^(\d*)\.?(\d*)(?:e([+-]?\d+))?$/i.exec(String(v));
				if (m && Number.isFinite(v)) {
					const digits = (m[1] || '0') + (m[2] || '');
					const e = (m[3] ? parseInt(m[3], 10) : 0) - (m[2] || '').length;
					if (Math.abs(e) < 400) return e >= 0 ? exactNum(BigInt(digits) * 10n ** BigInt(e)) : exactNum(BigInt(digits), 10n ** BigInt(-e));
				}
				return f(v);
			}
			return fail('expression has a constant that is not a number');
		}
		case 'SymbolNode': {
			const name = nd.name!;
			if (scope.has(name)) return scope.get(name)!;
			if (name === 'pi') return exactNum(1n, 1n, 1);
			if (name === 'tau') return exactNum(2n, 1n, 1);
			if (name === 'e') return f(Math.E);
			return fail(`unknown name "${name}" in expression`);
		}
		case 'ParenthesisNode':
			return walk(nd.content!, scope, site);
		case 'OperatorNode': {
			const args = nd.args!.map((a) => walk(a, scope, site));
			const fn = nd.fn as string;
			if (args.length === 1) {
				if (fn === 'unaryMinus') return mul(exactNum(-1n), args[0]);
				if (fn === 'unaryPlus') return args[0];
				return fail(`operator ${fn} is not supported in expressions`);
			}
			const [x, y] = args;
			switch (fn) {
				case 'add':
					return add(x, y, 1n);
				case 'subtract':
					return add(x, y, -1n);
				case 'multiply':
					return mul(x, y);
				case 'divide':
					return div(x, y) ?? fail('division by zero in expression');
				case 'pow':
					return pow(x, y);
				case 'mod': {
					const a = numToInteger(x);
					const b = numToInteger(y);
					if (a !== null && b !== null && b !== 0n) return exactNum(((a % b) + b) % b);
					const fy = numToFloat(y);
					if (fy === 0) return fail('modulo by zero in expression');
					const fx = numToFloat(x);
					return f(fx - fy * Math.floor(fx / fy));
				}
			}
			return fail(`operator ${fn} is not supported in expressions`);
		}
		case 'FunctionNode': {
			const name = typeof nd.fn === 'string' ? nd.fn : (nd.fn as { name: string }).name;
			const args = nd.args!.map((a) => walk(a, scope, site));
			const want = name === 'pow' || name === 'mod' ? 2 : 1;
			if (args.length !== want) return fail(`function ${name} takes ${want} argument${want > 1 ? 's' : ''}, got ${args.length}`);
			const x = args[0];
			const fx = numToFloat(x);
			switch (name) {
				case 'pow':
					return pow(x, args[1]);
				case 'mod':
					return walk({ type: 'OperatorNode', fn: 'mod', args: nd.args } as unknown as MathNode, scope, site);
				case 'abs':
					return x.exact ? exactNum(x.n < 0n ? -x.n : x.n, x.d, x.pi) : f(Math.abs(x.v));
				case 'floor':
				case 'ceiling':
				case 'ceil': {
					if (x.exact && x.pi === 0) {
						const q = x.n / x.d;
						const r = x.n - q * x.d;
						const fl = r < 0n ? q - 1n : q;
						return exactNum(name === 'floor' || r === 0n ? fl : fl + 1n);
					}
					return f(name === 'floor' ? Math.floor(fx) : Math.ceil(fx));
				}
				case 'sin':
					return x.exact && x.n === 0n ? exactNum(0n) : f(Math.sin(fx));
				case 'cos':
					return x.exact && x.n === 0n ? exactNum(1n) : f(Math.cos(fx));
				case 'tan':
					return f(Math.tan(fx));
				case 'arcsin':
				case 'asin':
					return f(Math.asin(fx));
				case 'arccos':
				case 'acos':
					return f(Math.acos(fx));
				case 'arctan':
				case 'atan':
					return f(Math.atan(fx));
				case 'sqrt': {
					if (fx < 0) return fail('square root of a negative number in expression');
					if (x.exact && x.pi === 0) {
						const rn = isqrt(x.n);
						const rd = isqrt(x.d);
						if (rn !== null && rd !== null) return exactNum(rn, rd);
					}
					return f(Math.sqrt(fx));
				}
				case 'exp':
					return f(Math.exp(fx));
				case 'ln':
				case 'log':
					if (fx <= 0) return fail(`logarithm of a non-positive number in expression`);
					return f(Math.log(fx));
			}
			return fail(`unknown function "${name}"`);
		}
	}
	return fail('unsupported expression');
}

function isqrt(n: bigint): bigint | null {
	if (n < 0n) return null;
	if (n < 2n) return n;
	let x = BigInt(Math.floor(Math.sqrt(Number(n))));
	while (x * x > n) x--;
	while ((x + 1n) * (x + 1n) <= n) x++;
	return x * x === n ? x : null;
}

// ----------------------------------------------------------------------------------------------
// Printed angles: a decimal written by another tool for an exact angle (0.785398 for π/4).

// π to 70 decimal places (from memory; checked in expr.test.ts against Math.PI and mathjs' bignumber pi).
const PI_DIGITS = '31415926535897932384626433832795028841971693993751058209749445923078164';
const SCALE_DIGITS = 68;
const PI_SCALED = BigInt(PI_DIGITS.slice(0, SCALE_DIGITS + 1)); // π · 10^68

/** A printed decimal read as an exact angle: the value and how far the printed text was from it (radians). */
export interface PrintedAngle {
	value: Num;
	differenceRadians: number;
}

/**
 * Read a decimal literal (radians, optionally signed) as the exact angle k/2^m turn when it lies
 * within half a unit of its last printed digit of it, plus the rounding of a double
 * (|v|·2^−52, for full-precision floats); the smallest such m is taken. m is bounded so that the
 * grid 1/2^m turn stays at least 1000 times coarser than that tolerance (and m ≤ 64), so a
 * decimal is never "close" to a grid merely because the grid is fine. Null when none fits.
 */
export function readPrintedAngle(text: string, negative: boolean): PrintedAngle | null {
	const m = /^(\d*)(?:\.(\d*))?(?:[eE]([+-]?\d+))?$/.exec(text);
	if (!m || (m[1] === '' && (m[2] ?? '') === '')) return null;
	const frac = m[2] ?? '';
	const digits = BigInt((m[1] || '0') + frac);
	if (digits === 0n) return null;
	const d = frac.length - (m[3] ? parseInt(m[3], 10) : 0); // value = digits · 10^−d
	if (d > SCALE_DIGITS - 4 || d < -6) return null;
	const v = Number(digits) * 10 ** -d;
	// A decimal of at most 17 significant digits may be a printed double: allow the double's own rounding.
	const isDouble = digits.toString().length <= 17;
	const tol = 0.5 * 10 ** -d + (isDouble ? Math.abs(v) * 2 ** -52 : 0);
	const maxM = Math.min(64, Math.floor(Math.log2((2 * Math.PI) / (1000 * tol))));
	const vS = digits * 10n ** BigInt(SCALE_DIGITS - d); // v · 10^68
	const tolS = 5n * 10n ** BigInt(SCALE_DIGITS - d - 1) + (isDouble ? vS >> 52n : 0n);
	const twoPi = 2n * PI_SCALED;
	for (let e = 0; e <= maxM; e++) {
		const num = vS << BigInt(e);
		const k = (num + twoPi / 2n) / twoPi; // round(v·2^e / 2π)
		let diff = num - k * twoPi;
		if (diff < 0n) diff = -diff;
		if (diff <= tolS << BigInt(e)) {
			const kk = negative ? -k : k;
			return { value: exactNum(2n * kk, 1n << BigInt(e), 1), differenceRadians: Number(diff >> BigInt(e)) / 1e68 };
		}
	}
	return null;
}
