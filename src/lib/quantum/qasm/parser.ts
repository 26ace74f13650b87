/**
 * The OpenQASM 2.0 / 3.0 reader: declarations, gate definitions, gate calls (with broadcasts),
 * OpenQASM 3 `const`, `let`, `input`, `def`, `for` and `box`, read by recursive descent over the
 * lexer's tokens. Gate calls are expanded by `expand.ts` and become items in `emit.ts`; the
 * standard gates are in `gates.ts`.
 *
 * Qubit order: registers are numbered flat in declaration order; q[0] is bit 0 (LSB) of q.
 * Angles: expressions in radians (`Num`).
 */
import { CIRCUIT_FORMAT, CIRCUIT_VERSION, type CircuitDocument, type GateItem, type QubitRef } from '../circuit.js';
import { lexQasm, QasmError, type Token, type TokenStream } from './lexer.js';
import { evaluateTokens, exactNum, numToInteger, readPrintedAngle, type Num, type NumScope } from './expr.js';
import { BudgetExceeded, shortInteger, WorkBudget } from '../budget.js';
import { BUILTINS, builtinAvailable, HALF_PI, neg, op, PI, QUARTER_PI, type Builtin } from './gates.js';
import { Expander, type GateCall, type GateDef, type Modifier } from './expand.js';
import { documentWithBody, GateEmitter } from './emit.js';
import type { GateOrigin, PrintedAngleStats, QasmLimits, QasmWarning } from './types.js';

const MEASURE_SKIPPED = 'measure skipped: the checker reads the final state directly';

/** Standard gates the fast path reads (any with qubits, except `id`, which makes no gate); `code` is its index in FAST_GATES. */
interface FastGate {
	name: string;
	builtin: Builtin;
	plain: (typeof PLAIN_GATES)[string] | undefined;
	code: number;
}
/**
 * A gate parameter's source text, its value, how it counts as a printed decimal (0 not one, 1
 * exact, 2 inexact), and the emitter's number for its angle (−1 until the emitter gives one).
 */
interface FastParam {
	key: string;
	value: Num;
	decimal: number;
	difference: number;
	angleId: number;
}
const FAST_GATES: FastGate[] = [];
/** Fast-path gates by the char code of their name's first letter. */
const FAST_BY_FIRST: (FastGate[] | undefined)[] = new Array(128);
const NO_FAST: FastGate[] = [];
/**
 * Standard gates that are one document gate as written (`emit.ts` makes the same item from their
 * ops): the item's gate, and its angle (the call's parameter, or a fixed one). Others are built.
 */
const PLAIN_GATES: Record<string, { gate: GateItem['gate']; angle?: Num | 'param' }> = {
	x: { gate: 'x' },
	h: { gate: 'h' },
	cx: { gate: 'cx' },
	CX: { gate: 'cx' },
	ccx: { gate: 'ccx' },
	swap: { gate: 'swap' },
	u1: { gate: 'p', angle: 'param' },
	p: { gate: 'p', angle: 'param' },
	phase: { gate: 'p', angle: 'param' },
	rz: { gate: 'rz', angle: 'param' },
	cp: { gate: 'cp', angle: 'param' },
	cu1: { gate: 'cp', angle: 'param' },
	cphase: { gate: 'cp', angle: 'param' },
	z: { gate: 'p', angle: PI },
	cz: { gate: 'cp', angle: PI },
	s: { gate: 'p', angle: HALF_PI },
	sdg: { gate: 'p', angle: neg(HALF_PI) },
	t: { gate: 'p', angle: QUARTER_PI },
	tdg: { gate: 'p', angle: neg(QUARTER_PI) }
};
/** The reader's fast path for plain gate calls (tests turn it off to compare with the token path). */
export const FAST_PATH = { enabled: true, /** statements it has read (for the tests) */ read: 0 };
for (const [name, builtin] of Object.entries(BUILTINS))
	if (builtin.qubits > 0 && name !== 'id') {
		const f: FastGate = { name, builtin, plain: PLAIN_GATES[name], code: FAST_GATES.length };
		FAST_GATES.push(f);
		(FAST_BY_FIRST[name.charCodeAt(0)] ??= []).push(f);
	}
const isAsciiIdentStart = (c: number) => (c >= 97 && c <= 122) || (c >= 65 && c <= 90) || c === 95;
const isAsciiIdentPart = (c: number) => isAsciiIdentStart(c) || (c >= 48 && c <= 57);
/** Characters a fast-path parameter may hold: names, numbers, + - * / . ( ) and blanks. */
const PARAM_CHAR = new Uint8Array(128);
for (const ch of 'abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ_0123456789.+-*/() \t') PARAM_CHAR[ch.charCodeAt(0)] = 1;

const RESERVED_WORDS = new Set(['OPENQASM', 'include', 'qreg', 'creg', 'qubit', 'bit', 'gate', 'opaque', 'measure', 'reset', 'barrier', 'if', 'const', 'ctrl', 'negctrl', 'inv', 'pow']);
const UNSUPPORTED_3 = new Set(['for', 'while', 'def', 'defcal', 'cal', 'defcalgrammar', 'box', 'delay', 'let', 'input', 'output', 'return', 'extern', 'switch', 'break', 'continue', 'end', 'array', 'duration', 'stretch', 'complex']);

/** Reads a token stream statement by statement; gate calls go through the expander to the emitter. */
export class Reader {
	private pos = 0;
	version: 2 | 3 = 3;
	included = false;
	readonly warnings: QasmWarning[] = [];
	readonly registers: { name: string; size: number; offset: number; tok: Token }[] = [];
	readonly regByName = new Map<string, { name: string; size: number; offset: number; tok: Token }>();
	readonly cregs = new Map<string, Token>();
	readonly consts: NumScope = new Map();
	readonly defs = new Map<string, GateDef>();
	private qubitCount = 0;
	private readonly flatToRef: QubitRef[] = [];
	readonly emitter: GateEmitter;
	private readonly expander: Expander;
	exactDecimals = true;
	readonly decimals: PrintedAngleStats = { exact: 0, largestDifferenceRadians: 0, inexact: 0 };
	private readonly decimalSeen = new Set<number>();
	private readonly printedCache = new Map<string, ReturnType<typeof readPrintedAngle>>();
	/** Expanded calls (src/lib/quantum/budget.ts); gates are counted by `budget` and `items`. */
	readonly work: WorkBudget;
	/** First token of the statement being read: where a problem without a better position is reported. */
	private statementTok: Token | null = null;
	private resetNoted = false;

	constructor(
		private readonly tokens: TokenStream,
		private readonly file: string,
		readonly limits: QasmLimits,
		defaultVersion: 2 | 3
	) {
		this.version = defaultVersion;
		// Room for about one gate per 16 characters of file at first (exporters' lines are 12 to 30).
		this.emitter = new GateEmitter({ limits, err: (t, m) => this.err(t, m), nameTaken: (n) => this.defs.has(n) }, this.flatToRef, tokens.text.length >> 4);
		this.expander = new Expander(this);
		this.work = new WorkBudget({ calls: limits.maxCalls, gates: limits.maxGates, qubits: limits.maxQubits });
	}

	get origins(): GateOrigin[] {
		return this.emitter.origins;
	}

	err(t: { line: number; column: number }, msg: string): never {
		throw new QasmError(t.line, t.column, msg, this.file);
	}
	private warn(t: { line: number; column: number }, msg: string): void {
		if (this.warnings.length < 1000) this.warnings.push({ line: t.line, column: t.column, message: msg });
	}
	private peek(k = 0): Token {
		return this.tokens.at(this.pos + k);
	}
	private next(): Token {
		const t = this.tokens.at(this.pos);
		if (t.kind !== 'eof') this.pos++;
		return t;
	}
	private isP(text: string, k = 0): boolean {
		const t = this.peek(k);
		return t.kind === 'punct' && t.text === text;
	}
	private describe(t: Token): string {
		return t.kind === 'eof' ? 'the end of the file' : `"${t.text}"`;
	}
	private expectP(text: string, what: string): Token {
		const t = this.peek();
		if (t.kind === 'punct' && t.text === text) return this.next();
		if (text === ';') {
			const prev = this.pos > 0 ? this.tokens.at(this.pos - 1) : undefined;
			const at = prev ? { line: prev.line, column: prev.column + (prev.end - prev.start) } : t;
			this.err(at, `missing ";" after ${what}; found ${this.describe(t)}`);
		}
		this.err(t, `expected "${text}" ${what}, found ${this.describe(t)}`);
	}
	private expectIdent(what: string): Token {
		const t = this.peek();
		if (t.kind !== 'ident') this.err(t, `expected ${what}, found ${this.describe(t)}`);
		return this.next();
	}

	/** Tokens of one expression, up to (not including) a `,` `)` `]` or `;` at nesting depth 0. */
	private exprTokens(what: string): Token[] {
		const out: Token[] = [];
		let depth = 0;
		for (;;) {
			const t = this.peek();
			if (t.kind === 'eof') this.err(t, `unexpected end of the file in ${what}`);
			if (t.kind === 'punct') {
				if (t.text === '(' || t.text === '[') depth++;
				else if (t.text === ')' || t.text === ']') {
					if (depth === 0) break;
					depth--;
				} else if ((t.text === ',' && depth === 0) || t.text === ';' || t.text === '{' || t.text === '}') break;
			}
			out.push(this.next());
			if (out.length > 10_000) this.err(out[0], `${what} is too long`);
		}
		if (out.length === 0) this.err(this.peek(), `expected ${what}, found ${this.describe(this.peek())}`);
		return out;
	}
	private evaluate(tokens: Token[], scope: NumScope): Num {
		return evaluateTokens(tokens, scope, this.file, (t, m) => this.warn(t, m), this.version);
	}
	/** A gate parameter (radians): a lone printed decimal may be read as the exact angle it prints. */
	angleParam(tokens: Token[], scope: NumScope): Num {
		this.lastDecimal = 0;
		const signed = tokens.length === 2 && tokens[0].kind === 'punct' && (tokens[0].text === '-' || tokens[0].text === '+');
		const lit = tokens.length === 1 ? tokens[0] : signed ? tokens[1] : null;
		if (lit && lit.kind === 'float') {
			const fresh = !this.decimalSeen.has(lit.start);
			if (fresh) this.decimalSeen.add(lit.start);
			const negative = signed && tokens[0].text === '-';
			const key = negative ? '-' + lit.text : lit.text;
			let p = this.exactDecimals ? this.printedCache.get(key) : null;
			if (p === undefined) {
				p = readPrintedAngle(lit.text, negative);
				if (this.printedCache.size < 100_000) this.printedCache.set(key, p);
			}
			this.lastDecimal = p ? 1 : 2;
			this.lastDecimalDiff = p ? p.differenceRadians : 0;
			if (fresh) {
				if (p) {
					this.decimals.exact++;
					this.decimals.largestDifferenceRadians = Math.max(this.decimals.largestDifferenceRadians, p.differenceRadians);
				} else this.decimals.inexact++;
			}
			if (p) return p.value;
		}
		return this.evaluate(tokens, scope);
	}
	/**
	 * A top-level gate parameter, remembered by its source text for {@link fastCall} when its value
	 * depends on nothing the file may change (no constant or parameter names) and it warned nothing.
	 */
	private cachedParam(ex: Token[]): Num {
		const warned = this.warnings.length;
		const v = this.angleParam(ex, this.consts);
		if (this.warnings.length !== warned || this.paramCache.size >= 10_000) return v;
		for (const t of ex) if (t.kind === 'string' || (t.kind === 'ident' && this.consts.has(t.text))) return v;
		const key = this.tokens.text.slice(ex[0].start, ex[ex.length - 1].end);
		if (!this.paramCache.has(key)) this.paramCache.set(key, { key, value: v, decimal: this.lastDecimal, difference: this.lastDecimalDiff, angleId: -1 });
		return v;
	}

	/**
	 * The fast path for the statement most files are made of, `name(params) reg[i], reg[j];`: read
	 * straight from the text (no tokens), for a standard gate on literal indices whose parameter
	 * texts were read before (`paramCache`). Anything else, or anything wrong, returns false with
	 * nothing changed, and the statement is read by the tokens (which word every message).
	 * Items, origins, printed-angle counts and limits come out as {@link topLevelCall} makes them.
	 */
	private fastCall(): boolean {
		const ts = this.tokens;
		const text = ts.text;
		const n = text.length;
		let i = ts.offset;
		let line = ts.line;
		let lineStart = ts.lineStart;
		let c: number;
		// Whitespace, line breaks and // comments before the statement.
		for (;;) {
			if (i >= n) return false;
			c = text.charCodeAt(i);
			if (c === 10) {
				line++;
				lineStart = ++i;
			} else if (c === 32 || c === 9 || c === 13) i++;
			else if (c === 47 && text.charCodeAt(i + 1) === 47) while (i < n && text.charCodeAt(i) !== 10) i++;
			else break;
		}
		const nameStart = i;
		if (!isAsciiIdentStart(c)) return false;
		while (++i < n && isAsciiIdentPart((c = text.charCodeAt(i))));
		if (c >= 128) return false;
		// Names are matched in place (no string is cut for them).
		let fast: FastGate | undefined;
		const nameLength = i - nameStart;
		for (const f of FAST_BY_FIRST[text.charCodeAt(nameStart)] ?? NO_FAST)
			if (f.name.length === nameLength && text.startsWith(f.name, nameStart)) {
				fast = f;
				break;
			}
		if (fast === undefined || !builtinAvailable(fast.builtin, this.version, this.included)) return false;
		const name = fast.name;
		const b = fast.builtin;
		if (this.defs.size && this.defs.has(name)) return false;
		while (c === 32 || c === 9) c = text.charCodeAt(++i);
		// Parameters: texts seen before, split at commas outside parentheses.
		// Parameters and qubits are written into reused arrays and counted (no length resets).
		const params = this.fastParams;
		let np = 0;
		if (c === 40) {
			let depth = 0;
			let from = i + 1;
			for (;;) {
				c = text.charCodeAt(++i);
				if (c === 40) depth++;
				else if (c === 41 || (c === 44 && depth === 0)) {
					if (c === 41 && depth-- > 0) continue;
					let a = from;
					let z = i;
					while (a < z && (text.charCodeAt(a) === 32 || text.charCodeAt(a) === 9)) a++;
					while (z > a && (text.charCodeAt(z - 1) === 32 || text.charCodeAt(z - 1) === 9)) z--;
					if (a === z) return false;
					const p = this.paramAt(text, a, z);
					if (p === undefined) return false;
					params[np++] = p;
					from = i + 1;
					if (c === 41) break;
				} else if (!PARAM_CHAR[c] || (c === 47 && (text.charCodeAt(i + 1) === 47 || text.charCodeAt(i + 1) === 42))) return false;
			}
			c = text.charCodeAt(++i);
			while (c === 32 || c === 9) c = text.charCodeAt(++i);
		}
		if (np !== b.params) return false;
		// Qubit arguments reg[int], at least one.
		const qs = this.fastQubits;
		let nq = 0;
		for (;;) {
			const regStart = i;
			if (!isAsciiIdentStart(c)) return false;
			while (++i < n && isAsciiIdentPart((c = text.charCodeAt(i))));
			if (c >= 128) return false;
			const r = this.registerAt(text, regStart, i);
			if (r === undefined) return false;
			while (c === 32 || c === 9) c = text.charCodeAt(++i);
			if (c !== 91) return false;
			c = text.charCodeAt(++i);
			while (c === 32 || c === 9) c = text.charCodeAt(++i);
			if (c < 48 || c > 57) return false;
			let index = 0;
			while (c >= 48 && c <= 57 && index < 1e9) {
				index = index * 10 + (c - 48);
				c = text.charCodeAt(++i);
			}
			while (c === 32 || c === 9) c = text.charCodeAt(++i);
			if (c !== 93 || index >= r.size) return false;
			const q = r.offset + index;
			if (nq === 16) return false;
			for (let k = 0; k < nq; k++) if (qs[k] === q) return false;
			qs[nq++] = q;
			c = text.charCodeAt(++i);
			while (c === 32 || c === 9) c = text.charCodeAt(++i);
			if (c === 44) {
				c = text.charCodeAt(++i);
				while (c === 32 || c === 9) c = text.charCodeAt(++i);
				continue;
			}
			if (c !== 59) return false;
			break;
		}
		if (nq !== b.qubits || this.emitter.gatesMade + 1 > this.limits.maxGates) return false;
		// Read: move the lexer past the statement and make what the token path makes.
		ts.skipTo(i + 1, line, lineStart);
		FAST_PATH.read++;
		for (let k = 0; k < np; k++) {
			const p = params[k];
			if (p.decimal === 1) {
				this.decimals.exact++;
				if (p.difference > this.decimals.largestDifferenceRadians) this.decimals.largestDifferenceRadians = p.difference;
			} else if (p.decimal === 2) this.decimals.inexact++;
		}
		const column = nameStart - lineStart + 1;
		const plain = fast.plain;
		if (plain !== undefined) {
			if (plain.angle === 'param') this.emitter.pushFast(fast.code, plain.gate, name, qs, nq, line, column, params[0].value, params[0]);
			else this.emitter.pushFast(fast.code, plain.gate, name, qs, nq, line, column, plain.angle, null);
			return true;
		}
		const call = { line, column };
		try {
			const values: Num[] = new Array(np);
			for (let k = 0; k < np; k++) values[k] = params[k].value;
			const ops = b.build(values, qs.slice(0, nq), { qasm: name, call, definitions: [] });
			for (let k = 0; k < ops.length; k++) this.emitter.emit(ops[k]);
		} catch (e) {
			if (e instanceof RangeError) this.err(e instanceof BudgetExceeded && e.site && 'line' in e.site ? e.site : call, e.message);
			throw e;
		}
		return true;
	}
	/** The register named by text[start, end) (not an alias), matched in place when there are few registers. */
	private registerAt(text: string, start: number, end: number): Reader['registers'][number] | undefined {
		if (this.registers.length <= 16 && this.aliases.size === 0) {
			for (const r of this.registers) if (r.name.length === end - start && text.startsWith(r.name, start)) return r;
			return undefined;
		}
		const name = text.slice(start, end);
		return this.aliases.has(name) ? undefined : this.regByName.get(name);
	}
	/** The remembered parameter whose text is text[start, end): the last few are matched in place. */
	private paramAt(text: string, start: number, end: number): FastParam | undefined {
		const recent = this.recentParams;
		for (let k = 0; k < recent.length; k++) {
			const e = recent[k];
			if (e.key.length === end - start && text.startsWith(e.key, start)) return e;
		}
		const key = text.slice(start, end);
		const e = this.paramCache.get(key);
		if (e !== undefined) recent[this.recentNext++ & 7] = e;
		return e;
	}
	private readonly recentParams: FastParam[] = [];
	/** Constants changed: parameter texts may mean something else now. */
	private forgetParams(): void {
		this.paramCache.clear();
		this.recentParams.length = 0;
		this.recentNext = 0;
	}
	private recentNext = 0;
	private readonly fastParams: FastParam[] = [];
	private readonly fastQubits: number[] = new Array<number>(16).fill(0);
	/** Gate parameter source text → value and how it counts as a printed decimal (0 not one, 1 exact, 2 inexact). */
	private readonly paramCache = new Map<string, FastParam>();
	private lastDecimal = 0;
	private lastDecimalDiff = 0;

	private intExpr(tokens: Token[], what: string, min: number, max: number): number {
		const v = numToInteger(this.evaluate(tokens, this.consts));
		if (v === null) this.err(tokens[0], `${what} must be an integer`);
		if (v < BigInt(min) || v > BigInt(max)) this.err(tokens[0], `${what} ${shortInteger(v)} is out of range; expected ${min}..${max}`);
		return Number(v);
	}

	// ------------------------------------------------------------------------------------------
	// OpenQASM 3 control flow: loops and subroutines re-read their body's tokens for each
	// iteration / call, with loop variables and arguments bound in `consts` and qubit arguments
	// and `let` names in `aliases`. Work is bounded by `maxIterations` and `maxDepth`.

	readonly subs = new Map<string, { tok: Token; params: { name: string; kind: 'qubit' | 'angle' | 'int'; size: number | null }[]; bodyStart: number; bodyEnd: number }>();
	/** Qubit names that are not registers: `let` aliases and subroutine qubit arguments (flat qubits). */
	aliases = new Map<string, { qubits: number[]; tok: Token }>();
	/** Top-level `let` aliases, in order: they become registers of the document. */
	readonly topLets: { name: string; qubits: number[]; tok: Token }[] = [];
	params = new Map<string, string>();
	private iterations = 0;
	private subDepth = 0;

	/** Tokens inside `[ … ]` (the `[` already read), up to the matching `]` (read). */
	private bracketTokens(open: Token): Token[] {
		const out: Token[] = [];
		let depth = 0;
		for (;;) {
			const t = this.peek();
			if (t.kind === 'eof') this.err(open, 'missing "]" to close this index');
			if (t.kind === 'punct' && (t.text === '[' || t.text === '{' || t.text === '(')) depth++;
			if (t.kind === 'punct' && (t.text === ']' || t.text === '}' || t.text === ')')) {
				if (depth === 0) {
					if (t.text !== ']') this.err(t, `expected "]" to close the index, found "${t.text}"`);
					this.next();
					break;
				}
				depth--;
			}
			if (t.kind === 'punct' && t.text === ';') this.err(t, 'missing "]" to close the index before ";"');
			out.push(this.next());
			if (out.length > 10_000) this.err(open, 'index is too long');
		}
		if (out.length === 0) this.err(open, 'empty index; expected an index, a range a:b or a set {i, j}');
		return out;
	}

	/** Split tokens at depth-0 occurrences of `sep`. */
	private splitTokens(tokens: Token[], sep: string): Token[][] {
		const parts: Token[][] = [[]];
		let depth = 0;
		for (const t of tokens) {
			if (t.kind === 'punct' && (t.text === '(' || t.text === '[' || t.text === '{')) depth++;
			if (t.kind === 'punct' && (t.text === ')' || t.text === ']' || t.text === '}')) depth--;
			if (depth === 0 && t.kind === 'punct' && t.text === sep) parts.push([]);
			else parts[parts.length - 1].push(t);
		}
		return parts;
	}

	/** Integer values of an index set: `i`, `a:b`, `a:s:b` (inclusive, OpenQASM 3) or `{i, j, …}`. */
	private indexValues(tokens: Token[], size: number | null, what: string): number[] {
		const first = tokens[0];
		if (first.kind === 'punct' && first.text === '{') {
			const last = tokens[tokens.length - 1];
			if (!(last.kind === 'punct' && last.text === '}')) this.err(first, `a set in ${what} must end with "}"`);
			return this.splitTokens(tokens.slice(1, -1), ',').map((p) => {
				if (!p.length) this.err(first, `empty element in the set of ${what}`);
				return this.intExpr(p, 'set element', -1e9, 1e9);
			});
		}
		const parts = this.splitTokens(tokens, ':');
		if (parts.length === 1) return [this.intExpr(tokens, 'index', -1e9, 1e9)];
		if (parts.length > 3 || parts.some((p) => p.length === 0)) this.err(first, `a range in ${what} is start:end or start:step:end (both ends given)`);
		const start = this.intExpr(parts[0], 'range start', -1e9, 1e9);
		const end = this.intExpr(parts[parts.length - 1], 'range end', -1e9, 1e9);
		const step = parts.length === 3 ? this.intExpr(parts[1], 'range step', -1e9, 1e9) : 1;
		if (step === 0) this.err(parts[1][0], 'the range step must not be 0');
		const count = Math.max(0, Math.floor((end - start) / step) + 1);
		if (count > (size ?? this.limits.maxGates)) this.err(first, `the range ${start}:${step}:${end} has ${count} values; at most ${size ?? this.limits.maxGates} here`);
		return Array.from({ length: count }, (_, k) => start + k * step);
	}

	/** Flat qubits a qubit argument names (a register, an alias, indexed by an index set). */
	private qubitsOf(q: { name: string; index: Token[] | null; tok: Token }): number[] {
		// Fast path: reg[int literal] (most gate arguments in exported files).
		if (q.index && q.index.length === 1 && q.index[0].kind === 'int' && this.aliases.size === 0) {
			const r = this.regByName.get(q.name);
			const i = Number(q.index[0].text);
			if (r && i < r.size) return [r.offset + i];
		}
		const alias = this.aliases.get(q.name);
		let base: number[];
		let label: string;
		if (alias) {
			base = alias.qubits;
			label = `"${q.name}"`;
		} else {
			const r = this.regByName.get(q.name);
			if (!r) {
				if (this.cregs.has(q.name)) this.err(q.tok, `"${q.name}" is a classical register; expected a qubit register`);
				this.err(q.tok, `undefined register "${q.name}"; declare it first with ${this.version === 2 ? 'qreg' : 'qubit[n]'}`);
			}
			base = Array.from({ length: r.size }, (_, i) => r.offset + i);
			label = `register "${r.name}"`;
		}
		if (!q.index) return base;
		const idx = this.indexValues(q.index, base.length, `the index of "${q.name}"`);
		return idx.map((i) => {
			const j = i < 0 ? base.length + i : i; // OpenQASM 3: negative indices count from the end
			if (j < 0 || j >= base.length) this.err(q.index![0], `index ${i} out of range for ${label} of size ${base.length}; expected 0..${base.length - 1}`);
			return base[j];
		});
	}

	/** `{ statements }`, the `{` not yet read. */
	private block(what: string): void {
		const open = this.expectP('{', `to open the body of ${what}`);
		while (!this.isP('}')) {
			if (this.peek().kind === 'eof') this.err(open, `missing "}" to close the body of ${what} before the end of the file`);
			this.statement();
		}
		this.next();
	}

	/** Skip `{ … }` (the `{` not yet read); returns the positions just inside and just after it. */
	private skipBlock(what: string): { start: number; end: number } {
		const open = this.expectP('{', `to open the body of ${what}`);
		const start = this.pos;
		let depth = 1;
		while (depth > 0) {
			const t = this.next();
			if (t.kind === 'eof') this.err(open, `missing "}" to close the body of ${what} before the end of the file`);
			if (t.kind === 'punct' && t.text === '{') depth++;
			if (t.kind === 'punct' && t.text === '}') depth--;
		}
		return { start, end: this.pos };
	}

	/** Run the statements between token positions (a body already skipped once), then come back. */
	private replay(start: number, end: number, bind: () => void, unbind: () => void): void {
		const back = this.pos;
		this.pos = start;
		bind();
		try {
			while (this.pos < end - 1) this.statement();
		} finally {
			unbind();
		}
		this.pos = back;
	}

	private countIteration(at: Token): void {
		if (++this.iterations > this.limits.maxGates) this.err(at, `more than ${this.limits.maxGates} loop iterations and subroutine calls in all (limit)`);
	}

	private forLoop(): void {
		const kw = this.next();
		// for [type] name in [range] / {set} / register
		let nameTok = this.expectIdent('a loop variable (for uint i in [0:3] { … })');
		if (['int', 'uint'].includes(nameTok.text) && !this.isP('[') && this.peek().kind === 'ident' && this.peek().text !== 'in') nameTok = this.next();
		else if (['int', 'uint'].includes(nameTok.text) && this.isP('[')) {
			this.bracketTokens(this.next());
			nameTok = this.expectIdent('a loop variable');
		}
		const inTok = this.expectIdent('"in" after the loop variable');
		if (inTok.text !== 'in') this.err(inTok, `expected "in" after the loop variable, found "${inTok.text}"`);
		let values: number[];
		if (this.isP('[')) values = this.indexValues(this.bracketTokens(this.next()), null, 'the loop range');
		else if (this.isP('{')) {
			const open = this.next();
			const toks: Token[] = [open];
			while (!this.isP('}')) {
				if (this.peek().kind === 'eof' || this.isP(';')) this.err(open, 'missing "}" to close the set of loop values');
				toks.push(this.next());
			}
			toks.push(this.next());
			values = this.indexValues(toks, null, 'the loop set');
		} else this.err(this.peek(), `expected a range [a:b] or a set {i, j} after "in", found ${this.describe(this.peek())}`);
		const name = nameTok.text;
		if (this.regByName.has(name) || this.aliases.has(name)) this.err(nameTok, `loop variable "${name}" hides a qubit register of the same name`);
		const body = this.skipBlock('the for loop');
		const saved = this.consts.get(name);
		for (const v of values) {
			this.countIteration(kw);
			this.replay(
				body.start,
				body.end,
				() => this.consts.set(name, exactNum(BigInt(v))),
				() => (saved === undefined ? this.consts.delete(name) : this.consts.set(name, saved))
			);
		}
	}

	private defDecl(): void {
		this.next();
		const nameTok = this.expectIdent('a subroutine name after "def"');
		if (this.subs.has(nameTok.text) || this.defs.has(nameTok.text) || BUILTINS[nameTok.text]) this.err(nameTok, `duplicate declaration: "${nameTok.text}" is already defined`);
		this.expectP('(', `after "def ${nameTok.text}"`);
		const params: { name: string; kind: 'qubit' | 'angle' | 'int'; size: number | null }[] = [];
		while (!this.isP(')')) {
			const ty = this.expectIdent('a parameter type (qubit, qubit[n], angle, float, int, uint)');
			let size: number | null = null;
			if (this.isP('[')) {
				const br = this.next();
				const toks = this.bracketTokens(br);
				if (ty.text === 'qubit') size = this.intExpr(toks, 'qubit array size', 1, this.limits.maxQubits);
			}
			let kind: 'qubit' | 'angle' | 'int';
			if (ty.text === 'qubit') kind = 'qubit';
			else if (ty.text === 'angle' || ty.text === 'float') kind = 'angle';
			else if (ty.text === 'int' || ty.text === 'uint') kind = 'int';
			else this.err(ty, `unsupported parameter type "${ty.text}"; expected qubit, qubit[n], angle, float, int or uint`);
			const p = this.expectIdent('a parameter name');
			if (params.some((x) => x.name === p.text)) this.err(p, `duplicate declaration: parameter "${p.text}" appears twice`);
			params.push({ name: p.text, kind, size: kind === 'qubit' ? (size ?? 1) : null });
			if (this.isP(',')) this.next();
			else break;
		}
		this.expectP(')', `to close the parameters of "${nameTok.text}"`);
		if (this.isP('->')) this.err(this.peek(), 'subroutines that return a value are not supported; expected a body "{"');
		const body = this.skipBlock(`def ${nameTok.text}`);
		this.subs.set(nameTok.text, { tok: nameTok, params, bodyStart: body.start, bodyEnd: body.end });
	}

	private callSub(): void {
		const nameTok = this.next();
		const sub = this.subs.get(nameTok.text)!;
		this.expectP('(', `after "${nameTok.text}"`);
		const args: Token[][] = [];
		if (!this.isP(')'))
			for (;;) {
				args.push(this.exprTokensWithBrackets(`an argument of ${nameTok.text}`));
				if (this.isP(',')) {
					this.next();
					continue;
				}
				break;
			}
		this.expectP(')', `after the arguments of ${nameTok.text}`);
		this.expectP(';', `the call of ${nameTok.text}`);
		if (args.length !== sub.params.length) this.err(nameTok, `subroutine ${nameTok.text} takes ${sub.params.length} argument${sub.params.length === 1 ? '' : 's'}, got ${args.length}`);
		if (this.subDepth >= this.limits.maxDepth) this.err(nameTok, `subroutine calls nested deeper than ${this.limits.maxDepth} (limit)`);
		this.countIteration(nameTok);
		const newAliases = new Map<string, { qubits: number[]; tok: Token }>();
		const newConsts: [string, Num][] = [];
		const used = new Set<number>();
		sub.params.forEach((p, i) => {
			const a = args[i];
			if (p.kind === 'qubit') {
				const id = a[0];
				if (id.kind !== 'ident') this.err(id, `argument ${i + 1} of ${nameTok.text} must be qubits (parameter "${p.name}")`);
				let index: Token[] | null = null;
				if (a.length > 1) {
					if (!(a[1].kind === 'punct' && a[1].text === '[') || !(a[a.length - 1].kind === 'punct' && a[a.length - 1].text === ']'))
						this.err(a[1], `argument ${i + 1} of ${nameTok.text}: expected a register, an alias or an indexed qubit`);
					index = a.slice(2, -1);
				}
				const qs = this.qubitsOf({ name: id.text, index, tok: id });
				if (qs.length !== p.size) this.err(id, `argument ${i + 1} of ${nameTok.text} has ${qs.length} qubit${qs.length === 1 ? '' : 's'}; parameter "${p.name}" takes ${p.size}`);
				for (const q of qs) {
					if (used.has(q)) this.err(id, `argument ${i + 1} of ${nameTok.text} repeats a qubit of an earlier argument`);
					used.add(q);
				}
				newAliases.set(p.name, { qubits: qs, tok: id });
			} else {
				let v = p.kind === 'angle' ? this.angleParam(a, this.consts) : this.evaluate(a, this.consts);
				if (p.kind === 'int') {
					const iv = numToInteger(v);
					if (iv === null) this.err(a[0], `argument ${i + 1} of ${nameTok.text} must be an integer (parameter "${p.name}")`);
					v = exactNum(iv);
				}
				newConsts.push([p.name, v]);
			}
		});
		const savedAliases = this.aliases;
		const savedConsts = new Map(this.consts);
		this.subDepth++;
		this.replay(
			sub.bodyStart,
			sub.bodyEnd,
			() => {
				this.aliases = newAliases;
				for (const [k, v] of newConsts) this.consts.set(k, v);
			},
			() => {
				this.aliases = savedAliases;
				this.consts.clear();
				for (const [k, v] of savedConsts) this.consts.set(k, v);
				this.subDepth--;
			}
		);
	}

	/** Expression tokens that may contain a bracketed index (`q[0:2]`), up to `,` or `)` at depth 0. */
	private exprTokensWithBrackets(what: string): Token[] {
		const out: Token[] = [];
		let depth = 0;
		for (;;) {
			const t = this.peek();
			if (t.kind === 'eof' || (t.kind === 'punct' && t.text === ';')) this.err(t, `unexpected ${this.describe(t)} in ${what}`);
			if (t.kind === 'punct') {
				if (t.text === '(' || t.text === '[' || t.text === '{') depth++;
				else if (t.text === ')' || t.text === ']' || t.text === '}') {
					if (depth === 0) break;
					depth--;
				} else if (t.text === ',' && depth === 0) break;
			}
			out.push(this.next());
		}
		if (!out.length) this.err(this.peek(), `expected ${what}, found ${this.describe(this.peek())}`);
		return out;
	}

	private letDecl(): void {
		this.next();
		const nameTok = this.expectIdent('a name after "let"');
		const name = nameTok.text;
		if (this.regByName.has(name) || this.aliases.has(name) || this.cregs.has(name) || this.consts.has(name)) this.err(nameTok, `duplicate declaration: "${name}" is already declared`);
		this.expectP('=', `after "let ${name}"`);
		const qubits: number[] = [];
		for (;;) {
			const id = this.expectIdent('a register or alias (let x = q[0:3];)');
			let index: Token[] | null = null;
			if (this.isP('[')) index = this.bracketTokens(this.next());
			qubits.push(...this.qubitsOf({ name: id.text, index, tok: id }));
			if (this.isP('++')) {
				this.next();
				continue;
			}
			break;
		}
		this.expectP(';', `let ${name}`);
		if (new Set(qubits).size !== qubits.length) this.err(nameTok, `let ${name} names a qubit twice`);
		this.aliases.set(name, { qubits, tok: nameTok });
		if (this.subDepth === 0) this.topLets.push({ name, qubits, tok: nameTok });
	}

	private inputDecl(): void {
		const kw = this.next();
		const ty = this.expectIdent('a type after "input" (angle, float, int, uint)');
		if (!['angle', 'float', 'int', 'uint'].includes(ty.text)) this.err(ty, `unsupported input type "${ty.text}"; expected angle, float, int or uint`);
		if (this.isP('[')) this.bracketTokens(this.next());
		const nameTok = this.expectIdent('a name');
		this.expectP(';', `input ${ty.text} ${nameTok.text}`);
		const text = this.params.get(nameTok.text);
		if (text === undefined) this.err(nameTok, `input ${ty.text} ${nameTok.text} has no value; give it with --param ${nameTok.text}=… (for example pi/8)`);
		if (this.consts.has(nameTok.text) || this.regByName.has(nameTok.text)) this.err(nameTok, `duplicate declaration: "${nameTok.text}" is already declared`);
		let tokens: Token[];
		try {
			tokens = lexQasm(text).slice(0, -1);
		} catch (e) {
			this.err(nameTok, `--param ${nameTok.text}=${text}: ${(e as QasmError).detail ?? (e as Error).message}`);
		}
		if (!tokens.length) this.err(nameTok, `--param ${nameTok.text} is empty`);
		let v: Num;
		try {
			v = ty.text === 'angle' || ty.text === 'float' ? this.angleParam(tokens, this.consts) : this.evaluate(tokens, this.consts);
		} catch (e) {
			this.err(nameTok, `--param ${nameTok.text}=${text}: ${(e as QasmError).detail ?? (e as Error).message}`);
		}
		if ((ty.text === 'int' || ty.text === 'uint') && numToInteger(v) === null) this.err(nameTok, `--param ${nameTok.text}=${text} must be an integer`);
		this.consts.set(nameTok.text, v);
		this.forgetParams();
		void kw;
	}

	run(): void {
		this.readHeader();
		for (;;) {
			// Plain gate calls are read straight from the text when no token is lexed ahead.
			if (FAST_PATH.enabled && this.pos === this.tokens.length && !this.tokens.done && this.fastCall()) continue;
			if (this.peek().kind === 'eof') break;
			this.statementTok = this.peek();
			try {
				this.statement();
			} catch (e) {
				// Arithmetic refused for size, or another RangeError: report it at the statement.
				if (e instanceof RangeError) this.err(e instanceof BudgetExceeded && e.site && 'line' in e.site ? e.site : this.statementTok, e.message);
				throw e;
			}
		}
	}

	private readHeader(): void {
		const t = this.peek();
		if (t.kind === 'ident' && t.text === 'OPENQASM') {
			this.next();
			const v = this.peek();
			if (v.kind !== 'int' && v.kind !== 'float') this.err(v, `bad version header: expected a version number after OPENQASM (2.0 or 3.0), found ${this.describe(v)}`);
			this.next();
			if (/^2(\.0)?$/.test(v.text)) this.version = 2;
			else if (/^3(\.\d+)?$/.test(v.text)) this.version = 3;
			else this.err(v, `bad version header: unsupported OpenQASM version ${v.text}; expected 2.0 or 3.0`);
			this.expectP(';', 'the version header');
		} else {
			this.warn(t, `no OPENQASM header; reading the file as OpenQASM ${this.version}`);
		}
	}

	private statement(): void {
		const t = this.peek();
		if (t.kind === 'punct' && t.text === ';') {
			this.next();
			return;
		}
		if (t.kind !== 'ident') this.err(t, `expected a statement (declaration, gate definition or gate call), found ${this.describe(t)}`);
		switch (t.text) {
			case 'OPENQASM':
				this.err(t, 'bad version header: OPENQASM must be the first statement of the file');
			// falls through (err never returns)
			case 'include':
				return this.include();
			case 'qreg':
				return this.qreg();
			case 'creg':
				return this.creg();
			case 'qubit':
				if (this.version === 2) this.err(t, '"qubit" declarations need OpenQASM 3; this file declares OPENQASM 2.0 (use qreg)');
				return this.qubitDecl();
			case 'bit':
				if (this.version === 2) this.err(t, '"bit" declarations need OpenQASM 3; this file declares OPENQASM 2.0 (use creg)');
				return this.bitDecl();
			case 'const':
				if (this.version === 2) this.err(t, '"const" needs OpenQASM 3; this file declares OPENQASM 2.0');
				return this.constDecl(true);
			case 'int':
			case 'uint':
			case 'float':
			case 'angle':
			case 'bool':
				if (this.version === 3) return this.constDecl(false);
				break;
			case 'gate':
				return this.gateDef();
			case 'opaque':
				this.err(t, 'opaque gates have no definition to simulate; define the gate with "gate" instead');
			// falls through
			case 'measure':
				this.skipMeasurement(t);
				return;
			case 'reset':
				return this.resetStatement();
			case 'barrier':
				this.next();
				if (!this.isP(';')) this.qargList(null);
				this.expectP(';', 'the barrier');
				return;
			case 'if':
				this.err(t, 'classically controlled gates ("if") are not supported; the checker simulates unitary circuits only');
		}
		if (this.version === 3) {
			switch (t.text) {
				case 'for':
					return this.forLoop();
				case 'def':
					return this.defDecl();
				case 'let':
					return this.letDecl();
				case 'input':
					return this.inputDecl();
				case 'box': {
					this.next();
					if (this.isP('[')) this.bracketTokens(this.next());
					return this.block('box');
				}
			}
			if (this.subs.has(t.text) && this.isP('(', 1)) return this.callSub();
		}
		if (this.version === 3 && UNSUPPORTED_3.has(t.text)) this.err(t, `"${t.text}" is not supported; expected gates, gate definitions, registers and const values`);
		if (this.cregs.has(t.text) && (this.isP('=', 1) || this.isP('[', 1))) {
			this.skipMeasurement(t, true);
			return;
		}
		const call = this.gateCall(null);
		this.topLevelCall(call);
	}

	/**
	 * `reset q[i];` or `reset q;` (every qubit of q). Read as a checked claim, not an operation: the
	 * qubit must be |0⟩ there (an ancilla handed back clean); a run where it is not fails at this line.
	 */
	private resetStatement(): void {
		const kw = this.next();
		if (this.isP(';')) this.err(this.peek(), 'expected a qubit or register after reset');
		const qargs = this.qargList(null);
		this.expectP(';', 'the reset');
		for (const q of qargs)
			for (const flat of this.qubitsOf(q)) {
				const origin: GateOrigin = { qasm: 'reset', call: { line: kw.line, column: kw.column }, definitions: [] };
				this.emitter.emit(op('reset', [flat], origin));
			}
		if (!this.resetNoted) {
			this.resetNoted = true;
			this.warn(kw, 'reset is read as a checked claim, not an operation: the qubit must be |0⟩ here, and a run where it is not fails at this line');
		}
	}

	/** Skip a measurement statement (or an assignment from one, `mustMeasure`) to its ";" and note it. */
	private skipMeasurement(t: Token, mustMeasure = false): void {
		let sawMeasure = false;
		while (!this.isP(';')) {
			const x = this.next();
			if (x.kind === 'eof') {
				// Just after the statement's last token, where the ";" belongs.
				const last = this.tokens.at(Math.max(0, this.tokens.length - 2));
				this.err({ line: last.line, column: last.column + (last.end - last.start) }, `missing ";" at the end of the "${t.text}" statement before the end of the file`);
			}
			if (x.text === 'measure') sawMeasure = true;
		}
		if (mustMeasure && !sawMeasure) this.err(t, `assignment to "${t.text}" is not supported; only measurement results may be assigned`);
		this.next();
		this.measureSkipped(t);
	}
	/**
	 * A skipped measurement: one warning for all of the file's (exporters write one per bit), at
	 * the first, counting them and giving their lines (none when the warnings were full by then).
	 */
	private measureSkipped(t: Token): void {
		const m = this.measures;
		if (m === null) {
			const before = this.warnings.length;
			this.warn(t, MEASURE_SKIPPED);
			if (this.warnings.length > before) this.measures = { warning: this.warnings[before], count: 1, first: t.line, last: t.line };
			else this.measures = false;
			return;
		}
		if (m === false) return;
		m.count++;
		m.first = Math.min(m.first, t.line);
		m.last = Math.max(m.last, t.line);
		m.warning.message = `${MEASURE_SKIPPED} (${m.count} measurements skipped in all, lines ${m.first}–${m.last})`;
	}
	/** The one warning for the file's measurements, how many it stands for and their lines (false: there is none, the warnings were full). */
	private measures: { warning: QasmWarning; count: number; first: number; last: number } | false | null = null;

	private include(): void {
		const kw = this.next();
		const s = this.peek();
		if (s.kind !== 'string') this.err(s, `expected a file name in quotes after include, found ${this.describe(s)}`);
		this.next();
		const want = this.version === 2 ? 'qelib1.inc' : 'stdgates.inc';
		if (s.text === want) this.included = true;
		else if (s.text === 'qelib1.inc' || s.text === 'stdgates.inc')
			this.err(s, `"${s.text}" belongs to OpenQASM ${s.text === 'qelib1.inc' ? 2 : 3}; this file declares OPENQASM ${this.version} (include "${want}")`);
		else this.err(s, `cannot include "${s.text}": only "qelib1.inc" (OpenQASM 2) and "stdgates.inc" (OpenQASM 3) are built in; paste other definitions into the file`);
		this.expectP(';', `include "${s.text}"`);
		void kw;
	}

	private declareQubits(nameTok: Token, size: number): void {
		const name = nameTok.text;
		if (this.regByName.has(name) || this.cregs.has(name) || this.consts.has(name))
			this.err(nameTok, `duplicate declaration: "${name}" is already declared${this.regByName.has(name) ? ` at line ${this.regByName.get(name)!.tok.line}` : ''}`);
		if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(name)) this.err(nameTok, `register name "${name}" must use ASCII letters, digits and _`);
		if (this.qubitCount + size > this.limits.maxQubits)
			this.err(nameTok, `too many qubits: ${this.qubitCount + size} exceeds the limit of ${this.limits.maxQubits}`);
		const r = { name, size, offset: this.qubitCount, tok: nameTok };
		this.registers.push(r);
		this.regByName.set(name, r);
		for (let i = 0; i < size; i++) this.flatToRef.push({ register: name, index: i });
		this.qubitCount += size;
	}
	private declareBits(nameTok: Token): void {
		const name = nameTok.text;
		if (this.regByName.has(name) || this.cregs.has(name) || this.consts.has(name)) this.err(nameTok, `duplicate declaration: "${name}" is already declared`);
		this.cregs.set(name, nameTok);
	}

	private qreg(): void {
		this.next();
		const nameTok = this.expectIdent('a register name after qreg');
		this.expectP('[', 'after the register name (qreg name[size];)');
		const size = this.intExpr(this.exprTokens('the register size'), 'register size', 1, this.limits.maxQubits);
		this.expectP(']', 'after the register size');
		this.expectP(';', `qreg ${nameTok.text}[${size}]`);
		this.declareQubits(nameTok, size);
	}
	private creg(): void {
		this.next();
		const nameTok = this.expectIdent('a register name after creg');
		this.expectP('[', 'after the register name (creg name[size];)');
		this.intExpr(this.exprTokens('the register size'), 'register size', 1, 1_000_000);
		this.expectP(']', 'after the register size');
		this.expectP(';', `creg ${nameTok.text}[…]`);
		this.declareBits(nameTok);
	}
	private qubitDecl(): void {
		this.next();
		let size = 1;
		if (this.isP('[')) {
			this.next();
			size = this.intExpr(this.exprTokens('the register size'), 'register size', 1, this.limits.maxQubits);
			this.expectP(']', 'after the register size');
		}
		const nameTok = this.expectIdent('a register name');
		this.expectP(';', `the declaration of "${nameTok.text}"`);
		this.declareQubits(nameTok, size);
	}
	private bitDecl(): void {
		const kw = this.next();
		if (this.isP('[')) {
			this.next();
			this.intExpr(this.exprTokens('the register size'), 'register size', 1, 1_000_000);
			this.expectP(']', 'after the register size');
		}
		const nameTok = this.expectIdent('a register name');
		this.declareBits(nameTok);
		if (this.isP('=')) {
			this.skipMeasurement(kw, true);
			return;
		}
		this.expectP(';', `the declaration of "${nameTok.text}"`);
	}
	private constDecl(isConst: boolean): void {
		const first = this.next();
		const typeTok = isConst ? this.expectIdent('a type after const (int, uint, float, angle)') : first;
		if (!['int', 'uint', 'float', 'angle'].includes(typeTok.text)) this.err(typeTok, `unsupported const type "${typeTok.text}"; expected int, uint, float or angle`);
		if (this.isP('[')) {
			this.next();
			this.exprTokens('the type width');
			this.expectP(']', 'after the type width');
		}
		const nameTok = this.expectIdent('a name');
		if (this.regByName.has(nameTok.text) || this.cregs.has(nameTok.text) || this.consts.has(nameTok.text))
			this.err(nameTok, `duplicate declaration: "${nameTok.text}" is already declared`);
		this.expectP('=', `after "${nameTok.text}" (a constant needs a value)`);
		const ex = this.exprTokens('the value');
		let v = this.evaluate(ex, this.consts);
		if (typeTok.text === 'int' || typeTok.text === 'uint') {
			const iv = numToInteger(v);
			if (iv === null) this.err(ex[0], `value of ${typeTok.text} "${nameTok.text}" must be an integer`);
			if (typeTok.text === 'uint' && iv < 0n) this.err(ex[0], `value of uint "${nameTok.text}" must not be negative`);
			v = exactNum(iv);
		}
		this.expectP(';', `the declaration of "${nameTok.text}"`);
		if (!isConst) this.warn(first, `"${nameTok.text}" is read as a constant (it is never reassigned here)`);
		this.consts.set(nameTok.text, v);
		this.forgetParams();
	}

	private modifiers(): Modifier[] {
		const mods: Modifier[] = [];
		for (;;) {
			const t = this.peek();
			if (t.kind !== 'ident' || !['ctrl', 'negctrl', 'inv', 'pow'].includes(t.text) || !(this.isP('@', 1) || this.isP('(', 1))) break;
			if (this.version === 2) this.err(t, `gate modifier "${t.text} @" needs OpenQASM 3; this file declares OPENQASM 2.0`);
			this.next();
			const m: Modifier = { kind: t.text as Modifier['kind'], count: 1, tok: t };
			if (this.isP('(')) {
				this.next();
				const ex = this.exprTokens(`the argument of ${t.text}`);
				if (m.kind === 'inv') this.err(t, 'inv takes no argument; write "inv @"');
				if (m.kind === 'pow') m.exponent = this.evaluate(ex, this.consts);
				else m.count = this.intExpr(ex, `${t.text} count`, 1, 64);
				this.expectP(')', `after the argument of ${t.text}`);
			} else if (m.kind === 'pow') this.err(this.peek(), 'pow needs an exponent: pow(k) @');
			this.expectP('@', `after the modifier ${t.text}`);
			mods.push(m);
		}
		return mods;
	}

	/** Gate call syntax; `formals` = qubit parameter names inside a gate definition (then no indexing). */
	private gateCall(formals: Set<string> | null): GateCall {
		const mods = this.modifiers();
		const nameTok = this.expectIdent('a gate name');
		const params: Token[][] = [];
		if (this.isP('(')) {
			this.next();
			if (!this.isP(')'))
				for (;;) {
					params.push(this.exprTokens('a gate parameter'));
					if (this.isP(',')) {
						this.next();
						continue;
					}
					break;
				}
			this.expectP(')', 'after the gate parameters');
		}
		const qargs = this.isP(';') ? [] : this.qargList(formals);
		this.expectP(';', `the call of ${nameTok.text}`);
		return { mods, name: nameTok.text, nameTok, params, qargs };
	}

	private qargList(formals: Set<string> | null): GateCall['qargs'] {
		const out: GateCall['qargs'] = [];
		for (;;) {
			const tok = this.expectIdent('a qubit argument');
			let index: Token[] | null = null;
			if (this.isP('[')) {
				const br = this.next();
				if (formals) this.err(br, `qubit arguments inside a gate definition cannot be indexed; "${tok.text}" is a single qubit`);
				index = this.bracketTokens(br);
			}
			if (formals && !formals.has(tok.text)) this.err(tok, `"${tok.text}" is not a qubit argument of this gate definition`);
			out.push({ name: tok.text, index, tok });
			if (this.isP(',')) {
				this.next();
				continue;
			}
			return out;
		}
	}

	private gateDef(): void {
		this.next();
		const nameTok = this.expectIdent('a gate name after "gate"');
		const name = nameTok.text;
		if (this.defs.has(name)) this.err(nameTok, `duplicate declaration: gate "${name}" is already defined at line ${this.defs.get(name)!.tok.line}`);
		const b = BUILTINS[name];
		if (b && builtinAvailable(b, this.version, this.included)) this.err(nameTok, `duplicate declaration: gate "${name}" is already defined by ${b.lib.startsWith('core') ? 'the language' : this.version === 2 ? 'qelib1.inc' : 'stdgates.inc'}`);
		if (RESERVED_WORDS.has(name)) this.err(nameTok, `"${name}" is a keyword and cannot name a gate`);
		const params: string[] = [];
		if (this.isP('(')) {
			this.next();
			if (!this.isP(')'))
				for (;;) {
					const p = this.expectIdent('a parameter name');
					if (params.includes(p.text)) this.err(p, `duplicate declaration: parameter "${p.text}" appears twice`);
					params.push(p.text);
					if (this.isP(',')) {
						this.next();
						continue;
					}
					break;
				}
			this.expectP(')', 'after the gate parameters');
		}
		const qubits: string[] = [];
		for (;;) {
			const q = this.expectIdent('a qubit argument name');
			if (qubits.includes(q.text)) this.err(q, `duplicate declaration: qubit argument "${q.text}" appears twice`);
			qubits.push(q.text);
			if (this.isP(',')) {
				this.next();
				continue;
			}
			break;
		}
		const open = this.expectP('{', `to open the body of gate ${name}`);
		const formals = new Set(qubits);
		const scopeNames = new Set([...params, ...this.consts.keys()]);
		const body: GateCall[] = [];
		while (!this.isP('}')) {
			const t = this.peek();
			if (t.kind === 'eof') this.err(open, `missing "}" to close the body of gate ${name} before the end of the file`);
			if (t.kind === 'ident' && t.text === 'barrier') {
				this.next();
				this.qargList(formals);
				this.expectP(';', 'the barrier');
				continue;
			}
			if (t.kind === 'ident' && (t.text === 'measure' || t.text === 'reset')) this.err(t, `"${t.text}" is not allowed inside a gate definition`);
			const call = this.gateCall(formals);
			this.checkCall(call, name, scopeNames);
			body.push(call);
		}
		this.next();
		let leaves = 0;
		for (const c of body) leaves += this.leafBound(c);
		this.defs.set(name, { name, params, qubits, body, tok: nameTok, leaves });
	}

	resolveGate(call: GateCall, defining: string | null): { params: number; qubits: number; def?: GateDef; builtin?: Builtin } {
		if (defining !== null && call.name === defining) this.err(call.nameTok, `recursive gate definition: gate "${defining}" calls itself`);
		if (call.name === 'reset') this.err(call.nameTok, 'reset is not a gate: it takes no modifiers (ctrl, negctrl, inv, pow); write "reset q;" on its own');
		const def = this.defs.get(call.name);
		if (def) return { params: def.params.length, qubits: def.qubits.length, def };
		const b = BUILTINS[call.name];
		if (b && builtinAvailable(b, this.version, this.included)) return { params: b.params, qubits: b.qubits, builtin: b };
		if (b) {
			const inc = this.version === 2 ? 'qelib1.inc' : 'stdgates.inc';
			if (b.lib === 'core3') this.err(call.nameTok, `"${call.name}" needs OpenQASM 3`);
			if ((b.lib === 'lib2' && this.version === 3) || (b.lib === 'lib3' && this.version === 2))
				this.err(call.nameTok, `unknown gate "${call.name}" in OpenQASM ${this.version}; it is defined in OpenQASM ${this.version === 2 ? 3 : 2} only`);
			this.err(call.nameTok, `unknown gate "${call.name}": it is defined in ${inc}; add include "${inc}"; before using it`);
		}
		this.err(call.nameTok, `unknown gate "${call.name}"; expected a gate from ${this.version === 2 ? 'qelib1.inc' : 'stdgates.inc'} or one defined earlier with "gate"`);
	}

	/** Arity checks shared by definitions and top-level calls; returns the qubit count the call needs. */
	private checkCall(call: GateCall, defining: string | null, scopeNames?: Set<string>): number {
		const g = this.resolveGate(call, defining);
		if (call.params.length !== g.params)
			this.err(call.params[0]?.[0] ?? call.nameTok, `gate ${call.name} takes ${g.params} parameter${g.params === 1 ? '' : 's'}, got ${call.params.length}`);
		const need = g.qubits + call.mods.reduce((s, m) => s + (m.kind === 'ctrl' || m.kind === 'negctrl' ? m.count : 0), 0);
		const label = call.mods.length ? `${call.mods.map((m) => m.kind + (m.count > 1 ? `(${m.count})` : '')).join(' @ ')} @ ${call.name}` : `gate ${call.name}`;
		if (call.qargs.length !== need)
			this.err(call.qargs[0]?.tok ?? call.nameTok, `${label} takes ${need} qubit argument${need === 1 ? '' : 's'}, got ${call.qargs.length}`);
		if (scopeNames) {
			for (const ex of call.params)
				for (let i = 0; i < ex.length; i++) {
					const t = ex[i];
					const isCall = ex[i + 1]?.kind === 'punct' && ex[i + 1].text === '(';
					if (t.kind === 'ident' && !isCall && !scopeNames.has(t.text) && !['pi', 'π', 'tau', 'τ', 'e', 'euler', 'ℇ'].includes(t.text))
						this.err(t, `unknown name "${t.text}" in expression; expected a parameter of this gate, a constant or pi`);
				}
			const seen = new Set<string>();
			for (const q of call.qargs) {
				if (seen.has(q.name)) this.err(q.tok, `qubit "${q.name}" is used twice in one gate call`);
				seen.add(q.name);
			}
		}
		return need;
	}

	private leafBound(call: GateCall): number {
		const d = this.defs.get(call.name);
		if (d) return d.leaves;
		return call.name === 'id' || call.name === 'gphase' ? 0 : 1;
	}

	private topLevelCall(call: GateCall): void {
		this.checkCall(call, null);
		if (this.leafBound(call) + this.emitter.gatesMade > this.limits.maxGates)
			this.err(call.nameTok, `more than ${this.limits.maxGates} gates after expanding gate definitions (limit)`);
		// Resolve each argument to a list of flat qubits (a whole register broadcasts).
		const lists: number[][] = [];
		let width = 1;
		let widthFrom: { name: string; tok: Token } | null = null;
		for (const q of call.qargs) {
			const all = this.qubitsOf(q);
			if (all.length !== 1) {
				if (widthFrom && width !== all.length)
					this.err(q.tok, `register size mismatch in broadcast: "${q.name}" has ${all.length} qubits but "${widthFrom.name}" has ${width}`);
				width = all.length;
				widthFrom = { name: q.name, tok: q.tok };
			}
			lists.push(all);
		}
		const params = call.params.map((ex) => this.cachedParam(ex));
		const start = this.emitter.length;
		for (let k = 0; k < width; k++) {
			const qs = lists.map((l) => (l.length === 1 ? l[0] : l[k]));
			// Calls have a few qubits: compare pairs rather than build a set per gate.
			for (let j = 1; j < qs.length; j++)
				for (let i = 0; i < j; i++)
					if (qs[i] === qs[j]) {
						const ref = this.flatToRef[qs[j]];
						this.err(call.qargs[j].tok, `qubit ${ref.register}[${ref.index}] is used twice in one gate call`);
					}
			const origin: GateOrigin = { qasm: call.name, call: { line: call.nameTok.line, column: (call.mods[0]?.tok ?? call.nameTok).column }, definitions: [] };
			if (call.mods.length) origin.call.column = call.mods[0].tok.column;
			const ops = this.expander.expandCall(call, params, qs, origin, this.emitter.gatesMade);
			for (const o of ops) this.emitter.emit(o);
		}
		// Only a broadcast over a whole declared register is compacted (not over an alias or a slice).
		const whole = call.qargs.find((q) => !q.index && !this.aliases.has(q.name) && (this.regByName.get(q.name)?.size ?? 0) > 1);
		if (width > 1 && whole) this.emitter.compactBroadcast(call, start, whole.name);
	}

	documentOf(title: string): CircuitDocument {
		if (this.registers.length === 0) this.err(this.peek(), 'the file declares no qubits; expected at least one qreg or qubit declaration');
		// The body's items are made when first read (see GateEmitter).
		return documentWithBody(
			{ format: CIRCUIT_FORMAT, version: CIRCUIT_VERSION, title, registers: this.registers.map((r) => ({ name: r.name, size: r.size })) },
			this.emitter.broadcastBlocks.length ? this.emitter.broadcastBlocks : undefined,
			() => this.emitter.items
		);
	}
}
