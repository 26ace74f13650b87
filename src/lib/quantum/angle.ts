/**
 * Angles measured in turns (1 turn = 2π rad).
 *
 * Arithmetic circuits in the Fourier basis only ever rotate by dyadic fractions of a turn, k/2^m,
 * so those are kept exactly (BigInt numerator, reduced, normalised to [0, 1)). Anything that is
 * not dyadic (pi/3, 0.1 rad, sqrt(2)) is kept as a float number of turns and marked inexact, so a
 * caller can always tell an exact comparison from a tolerance-based one.
 */
import { create, parseDependencies, evaluateDependencies, piDependencies, tauDependencies, eDependencies, addDependencies, subtractDependencies, multiplyDependencies, divideDependencies, powDependencies, unaryMinusDependencies, unaryPlusDependencies, sqrtDependencies, sinDependencies, cosDependencies, logDependencies, expDependencies } from 'mathjs';
import type { MathNode } from 'mathjs';
import { bitLength, MAX_NUMBER_BITS } from './budget.js';

const math = create({
	parseDependencies,
	evaluateDependencies,
	piDependencies,
	tauDependencies,
	eDependencies,
	addDependencies,
	subtractDependencies,
	multiplyDependencies,
	divideDependencies,
	powDependencies,
	unaryMinusDependencies,
	unaryPlusDependencies,
	sqrtDependencies,
	sinDependencies,
	cosDependencies,
	logDependencies,
	expDependencies
});

/** Exact angle num/2^exp turns; 0 ≤ num < 2^exp, num odd unless the angle is 0 (then num = 0, exp = 0). */
export interface DyadicAngle {
	readonly exact: true;
	readonly num: bigint;
	readonly exp: number;
}
/** Inexact angle in turns, normalised to [0, 1). */
export interface FloatAngle {
	readonly exact: false;
	readonly turns: number;
}
/** An angle in turns (exact dyadic or float), always normalised to [0, 1). */
export type Angle = DyadicAngle | FloatAngle;

/** A signed angle in turns reduced to (−½, ½]; exact form has −2^(exp−1) < num ≤ 2^(exp−1), num odd unless 0. */
export type SignedAngle =
	| { readonly exact: true; readonly num: bigint; readonly exp: number }
	| { readonly exact: false; readonly turns: number };

/** Largest exponent accepted in an exact angle; keeps BigInt work bounded. */
export const MAX_ANGLE_EXP = 4096;

/** The zero angle (turns). */
export const ZERO_ANGLE: DyadicAngle = Object.freeze({ exact: true, num: 0n, exp: 0 }) as DyadicAngle;

/** Build the exact angle num/2^exp turns, reduced and normalised to [0, 1). */
export function dyadic(num: bigint, exp: number): DyadicAngle {
	if (!Number.isInteger(exp) || exp < 0) throw new RangeError(`angle exponent must be a non-negative integer, got ${exp}`);
	if (exp > MAX_ANGLE_EXP) throw new RangeError(`angle denominator 2^${exp} exceeds 2^${MAX_ANGLE_EXP}`);
	if (exp === 0) return ZERO_ANGLE;
	const mod = 1n << BigInt(exp);
	let n = num % mod;
	if (n < 0n) n += mod;
	if (n === 0n) return ZERO_ANGLE;
	// strip trailing zero bits in one step: n & −n isolates the lowest set bit
	const tz = (n & -n).toString(2).length - 1;
	if (tz > 0) n >>= BigInt(tz);
	return { exact: true, num: n, exp: exp - tz };
}

/** Inexact angle from a float number of turns, normalised to [0, 1). */
export function floatTurns(turns: number): FloatAngle {
	if (!Number.isFinite(turns)) throw new RangeError(`angle must be finite, got ${turns}`);
	let t = turns - Math.floor(turns);
	if (t >= 1) t = 0;
	return { exact: false, turns: t };
}

/** Float value in turns, in [0, 1). */
export function toTurns(a: Angle): number {
	return a.exact ? dyadicToNumber(a.num, a.exp) : a.turns;
}

/** Float value in radians, in [0, 2π). */
export function toRadians(a: Angle): number {
	return toTurns(a) * 2 * Math.PI;
}

function dyadicToNumber(num: bigint, exp: number): number {
	if (num === 0n) return 0;
	// Shift down so the BigInt→number conversion does not overflow for huge exponents.
	if (exp > 1000) {
		const drop = exp - 1000;
		return Number(num >> BigInt(drop)) / 2 ** 1000;
	}
	return Number(num) / 2 ** exp;
}

/** Sum of two angles (turns); exact iff both are. */
export function addAngles(a: Angle, b: Angle): Angle {
	if (a.exact && b.exact) {
		const e = Math.max(a.exp, b.exp);
		return dyadic((a.num << BigInt(e - a.exp)) + (b.num << BigInt(e - b.exp)), e);
	}
	return floatTurns(toTurns(a) + toTurns(b));
}

/** Negation (turns). */
export function negateAngle(a: Angle): Angle {
	return a.exact ? dyadic(-a.num, a.exp) : floatTurns(-a.turns);
}

/** Difference a − b (turns). */
export function subtractAngles(a: Angle, b: Angle): Angle {
	return addAngles(a, negateAngle(b));
}

/** Multiply an angle by an integer (turns). */
export function scaleAngle(a: Angle, k: bigint): Angle {
	return a.exact ? dyadic(a.num * k, a.exp) : floatTurns(a.turns * Number(k));
}

/** Halve an angle exactly (turns): (num/2^exp)/2 = num/2^(exp+1). Normalisation happens after halving, so this is θ/2 of the representative in [0,1). */
export function halveAngle(a: Angle, times = 1): Angle {
	return a.exact ? dyadic(a.num, a.exp + times) : floatTurns(a.turns / 2 ** times);
}

/** Exact equality for two exact angles; for inexact ones, equality within `tolerance` turns on the circle. */
export function anglesEqual(a: Angle, b: Angle, tolerance = 1e-9): boolean {
	if (a.exact && b.exact) return a.num === b.num && a.exp === b.exp;
	return Math.abs(toTurnsSigned(reduceSigned(subtractAngles(a, b)))) <= tolerance;
}

/** Order on [0, 1) (turns): negative if a < b, 0 if equal, positive if a > b. */
export function compareAngles(a: Angle, b: Angle): number {
	if (a.exact && b.exact) {
		const e = Math.max(a.exp, b.exp);
		const x = a.num << BigInt(e - a.exp);
		const y = b.num << BigInt(e - b.exp);
		return x < y ? -1 : x > y ? 1 : 0;
	}
	return toTurns(a) - toTurns(b);
}

/** Reduce a normalised angle to the signed range (−½, ½] turn. */
export function reduceSigned(a: Angle): SignedAngle {
	if (a.exact) {
		if (a.exp === 0) return { exact: true, num: 0n, exp: 0 };
		const half = 1n << BigInt(a.exp - 1);
		return { exact: true, num: a.num > half ? a.num - (half << 1n) : a.num, exp: a.exp };
	}
	return { exact: false, turns: a.turns > 0.5 ? a.turns - 1 : a.turns };
}

/** Divergence actual − expected, reduced to (−½, ½] turn; exact when both are exact. */
export function divergence(actual: Angle, expected: Angle): SignedAngle {
	return reduceSigned(subtractAngles(actual, expected));
}

/** Float value of a signed angle in turns, in (−½, ½]. */
export function toTurnsSigned(s: SignedAngle): number {
	return s.exact ? dyadicToNumber(s.num, s.exp) : s.turns;
}

/** True for the zero signed angle (exactly 0, or |turns| ≤ tolerance when inexact). */
export function isZeroSigned(s: SignedAngle, tolerance = 1e-9): boolean {
	return s.exact ? s.num === 0n : Math.abs(s.turns) <= tolerance;
}

function formatDen(exp: number): string {
	return exp <= 16 ? String(1 << exp) : `2^${exp}`;
}

/** Print in turns: `5/8 turn`, `0 turn`, `1/2^40 turn`; inexact as `0.1234567890 turn ≈`. */
export function formatTurns(a: Angle | SignedAngle): string {
	if (!a.exact) return `${a.turns.toPrecision(12)} turn (inexact)`;
	if (a.num === 0n) return '0 turn';
	return `${a.num}/${formatDen(a.exp)} turn`;
}

/**
 * Print as a radian expression: 5/8 turn → `5*pi/4`, 1/2 turn → `pi`, 1/2^40 turn → `pi/2^39`.
 * Inexact angles print as a decimal number of radians.
 */
export function formatRadians(a: Angle | SignedAngle): string {
	if (!a.exact) return (a.turns * 2 * Math.PI).toPrecision(15);
	if (a.num === 0n) return '0';
	// num/2^exp turn = num*pi/2^(exp-1) rad; num is odd so the fraction is already reduced for exp ≥ 1.
	const den = a.exp - 1;
	const neg = a.num < 0n;
	const abs = neg ? -a.num : a.num;
	const head = abs === 1n ? 'pi' : `${abs}*pi`;
	const body = den === 0 ? head : `${head}/${formatDen(den)}`;
	return neg ? `-${body}` : body;
}

/** Canonical exact string for storage: `5/32` (turns), `0`; inexact as the float turns with a `~` prefix. */
export function serializeAngle(a: Angle): string {
	if (!a.exact) return `~${a.turns}`;
	return a.num === 0n ? '0' : `${a.num}/${a.exp === 0 ? 1 : `2^${a.exp}`}`;
}

// ---------------------------------------------------------------------------------------------
// Parsing. The walker below evaluates the mathjs syntax tree symbolically as q·π^k with q an exact
// rational (BigInt) and k ∈ {0, 1}; only when that fails (functions, π², huge powers) does it fall
// back to mathjs floating-point evaluation, and the angle is then marked inexact.

interface Rational {
	n: bigint;
	d: bigint; // > 0
}
interface Sym {
	q: Rational;
	piPow: number;
}

function gcd(a: bigint, b: bigint): bigint {
	if (a < 0n) a = -a;
	if (b < 0n) b = -b;
	while (b !== 0n) [a, b] = [b, a % b];
	return a;
}
function rat(n: bigint, d: bigint = 1n): Rational {
	if (d === 0n) throw new RangeError('division by zero in angle expression');
	if (d < 0n) {
		n = -n;
		d = -d;
	}
	const g = gcd(n, d) || 1n;
	return { n: n / g, d: d / g };
}

/** Exact rational from a decimal literal such as `0.125`, `3`, `1e-3`. */
function rationalFromDecimal(text: string): Rational | null {
	const m = /^([+-]?)(\d*)(?:\.(\d*))?(?:[eE]([+-]?\d+))?$/.exec(text.trim());
	if (!m || (m[2] === '' && (m[3] ?? '') === '')) return null;
	const digits = (m[2] || '0') + (m[3] ?? '');
	let n = BigInt(digits);
	let d = 10n ** BigInt((m[3] ?? '').length);
	const e = m[4] ? parseInt(m[4], 10) : 0;
	if (Math.abs(e) > 400) return null;
	if (e > 0) n *= 10n ** BigInt(e);
	else if (e < 0) d *= 10n ** BigInt(-e);
	if (m[1] === '-') n = -n;
	return rat(n, d);
}

/** Values an expression may refer to: exact angles (as radians, e.g. a `theta` parameter) or integers. */
export type AngleScope = Record<string, { angle: Angle } | { int: bigint }>;

function walk(node: MathNode, scope: AngleScope): Sym | null {
	const anyNode = node as unknown as {
		type: string;
		value?: unknown;
		name?: string;
		op?: string;
		fn?: string;
		args?: MathNode[];
		content?: MathNode;
	};
	switch (anyNode.type) {
		case 'ConstantNode': {
			const v = anyNode.value;
			if (typeof v === 'bigint') return { q: rat(v), piPow: 0 };
			if (typeof v === 'number') {
				if (!Number.isFinite(v)) return null;
				if (Number.isInteger(v) && !Number.isSafeInteger(v)) return null; // literal already rounded by the parser
				const r = rationalFromDecimal(String(v));
				return r ? { q: r, piPow: 0 } : null;
			}
			return null;
		}
		case 'SymbolNode': {
			const name = anyNode.name!;
			const bound = scope[name];
			if (bound) {
				if ('int' in bound) return { q: rat(bound.int), piPow: 0 };
				const a = bound.angle;
				if (!a.exact) return null;
				// a turns = 2a rad/π
				return { q: rat(2n * a.num, 1n << BigInt(a.exp)), piPow: 1 };
			}
			if (name === 'pi') return { q: rat(1n), piPow: 1 };
			if (name === 'tau') return { q: rat(2n), piPow: 1 };
			return null;
		}
		case 'ParenthesisNode':
			return walk(anyNode.content!, scope);
		case 'OperatorNode': {
			const args = anyNode.args!;
			const vals: Sym[] = [];
			for (const a of args) {
				const v = walk(a, scope);
				if (!v) return null;
				vals.push(v);
			}
			const fn = anyNode.fn;
			if (vals.length === 1) {
				if (fn === 'unaryMinus') return { q: rat(-vals[0].q.n, vals[0].q.d), piPow: vals[0].piPow };
				if (fn === 'unaryPlus') return vals[0];
				return null;
			}
			const [x, y] = vals;
			switch (fn) {
				case 'add':
				case 'subtract': {
					const sign = fn === 'add' ? 1n : -1n;
					if (x.q.n === 0n) return { q: rat(sign * y.q.n, y.q.d), piPow: y.piPow };
					if (y.q.n === 0n) return x;
					if (x.piPow !== y.piPow) return null;
					// Too big to keep exact (sizes estimated before the arithmetic): fall back to a float.
					if (tooBig(Math.max(bits(x.q.n) + bits(y.q.d), bits(y.q.n) + bits(x.q.d)) + 1, bits(x.q.d) + bits(y.q.d))) return null;
					return { q: rat(x.q.n * y.q.d + sign * y.q.n * x.q.d, x.q.d * y.q.d), piPow: x.piPow };
				}
				case 'multiply': {
					if (tooBig(bits(x.q.n) + bits(y.q.n), bits(x.q.d) + bits(y.q.d))) return null;
					const p = x.piPow + y.piPow;
					const q = rat(x.q.n * y.q.n, x.q.d * y.q.d);
					if (q.n === 0n) return { q, piPow: 0 };
					if (p > 1) return null;
					return { q, piPow: p };
				}
				case 'divide': {
					if (y.q.n === 0n) return null;
					if (tooBig(bits(x.q.n) + bits(y.q.d), bits(x.q.d) + bits(y.q.n))) return null;
					const p = x.piPow - y.piPow;
					const q = rat(x.q.n * y.q.d, x.q.d * y.q.n);
					if (q.n === 0n) return { q, piPow: 0 };
					if (p < 0) return null;
					return { q, piPow: p };
				}
				case 'pow': {
					if (y.piPow !== 0 || y.q.d !== 1n) return null;
					const e = y.q.n;
					if (e > 8192n || e < -8192n) return null;
					const ei = Number(e);
					if (x.piPow !== 0 && ei !== 1 && ei !== 0) return null;
					if (ei === 0) return { q: rat(1n), piPow: 0 };
					if (tooBig(bits(x.q.n) * Math.abs(ei), bits(x.q.d) * Math.abs(ei))) return null;
					if (ei > 0) return { q: rat(x.q.n ** e, x.q.d ** e), piPow: x.piPow };
					if (x.q.n === 0n) return null;
					return { q: rat(x.q.d ** -e, x.q.n ** -e), piPow: 0 };
				}
				default:
					return null;
			}
		}
		default:
			return null;
	}
}

const bits = bitLength;
/** Either estimated size over the bound of one exact number (src/lib/quantum/budget.ts). */
const tooBig = (a: number, b: number) => a > MAX_NUMBER_BITS || b > MAX_NUMBER_BITS;

/** Longest angle text read; longer ones are refused before parsing. */
export const MAX_ANGLE_TEXT = 1000;

function isPowerOfTwo(d: bigint): number {
	if (d <= 0n || (d & (d - 1n)) !== 0n) return -1;
	return d.toString(2).length - 1;
}

/** Parse a radian expression (`pi/4`, `2*pi*5/2^4`, `-pi/2^7`, `tau/8`) into an angle in turns, exact when dyadic. */
export function parseRadians(expr: string, scope: AngleScope = {}): Angle {
	let node: MathNode;
	try {
		node = math.parse(expr);
	} catch (err) {
		throw new SyntaxError(`cannot parse angle "${expr}": ${(err as Error).message}`, { cause: err });
	}
	const sym = walk(node, scope);
	if (sym) {
		if (sym.q.n === 0n) return ZERO_ANGLE;
		if (sym.piPow === 1) {
			// q·π rad = q/2 turn
			const exp = isPowerOfTwo(sym.q.d * 2n);
			if (exp >= 0 && exp <= MAX_ANGLE_EXP) return dyadic(sym.q.n, exp);
		}
	}
	return floatTurns(evaluateFloat(node, scope, expr) / (2 * Math.PI));
}

/** Parse a turns expression (`5/32`, `3/2^40`, `0.25`) into an angle, exact when dyadic. */
export function parseTurns(expr: string, scope: AngleScope = {}): Angle {
	let node: MathNode;
	try {
		node = math.parse(expr);
	} catch (err) {
		throw new SyntaxError(`cannot parse angle "${expr}": ${(err as Error).message}`, { cause: err });
	}
	const sym = walk(node, scope);
	if (sym && sym.piPow === 0) {
		if (sym.q.n === 0n) return ZERO_ANGLE;
		const exp = isPowerOfTwo(sym.q.d);
		if (exp >= 0 && exp <= MAX_ANGLE_EXP) return dyadic(sym.q.n, exp);
	}
	return floatTurns(evaluateFloat(node, scope, expr));
}

function evaluateFloat(node: MathNode, scope: AngleScope, expr: string): number {
	const numericScope: Record<string, number> = {};
	for (const [k, v] of Object.entries(scope)) numericScope[k] = 'int' in v ? Number(v.int) : toRadians(v.angle);
	let value: unknown;
	try {
		value = node.compile().evaluate(numericScope);
	} catch (err) {
		throw new SyntaxError(`cannot evaluate angle "${expr}": ${(err as Error).message}`, { cause: err });
	}
	if (typeof value !== 'number' || !Number.isFinite(value)) throw new SyntaxError(`angle "${expr}" is not a finite real number`);
	return value;
}

/**
 * Parse a document angle string. `"<expr> turn"` / `"<expr> turns"` is in turns, `~0.123` is a
 * stored float in turns, anything else is a radian expression. Result in turns.
 */
export function parseAngle(text: string, scope: AngleScope = {}): Angle {
	if (text.length > MAX_ANGLE_TEXT) throw new SyntaxError(`angle is ${text.length} characters long; the limit is ${MAX_ANGLE_TEXT}`);
	// Fast path for the form the importer and the editor write (`5/2^7 turn`, `0 turn`): no parser.
	const fast = /^(-?\d{1,300})\/2\^(\d{1,4}) turns?$/.exec(text);
	if (fast && Number(fast[2]) <= MAX_ANGLE_EXP) return dyadic(BigInt(fast[1]), Number(fast[2]));
	if (text === '0 turn') return ZERO_ANGLE;
	const t = text.trim();
	if (t.startsWith('~')) {
		const v = Number(t.slice(1));
		if (!Number.isFinite(v)) throw new SyntaxError(`cannot parse angle "${text}"`);
		return floatTurns(v);
	}
	const m = /^(.*?)\s*turns?$/.exec(t);
	if (m) return parseTurns(m[1], scope);
	return parseRadians(t, scope);
}

/** Stable key of an angle, for deduplicating tables (turns). */
export function angleKey(a: Angle): string {
	return a.exact ? `${a.num}/${a.exp}` : `f${a.turns}`;
}
