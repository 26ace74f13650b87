/**
 * OpenQASM 2.0 / 3.0 → circuit document. A hand-written recursive-descent reader: gate
 * definitions are expanded at their call sites, modifiers (ctrl, negctrl, inv, pow) applied, and
 * every produced gate item carries the top-level call site as `source` (1-based line, column).
 *
 * Qubit order: a qreg / qubit[n] register becomes a document register with q[0] as bit 0 (LSB).
 * Angles: radian expressions in the file; rational multiples of π with a power-of-two denominator
 * are kept exact (stored as `"k/2^m turn"`), everything else as a float in turns (`"~0.123"`).
 */
import { CIRCUIT_FORMAT, CIRCUIT_VERSION, type BodyItem, type CallItem, type CircuitDocument, type GateItem, type Matrix2, type QubitRef, type SourcePosition, type UserBlock } from '../circuit.js';
import type { Angle } from '../angle.js';
import { lexQasm, QasmError, type Token } from './lexer.js';
import { add, evaluateTokens, exactNum, mul, numToAngle, numToFloat, numToInteger, readPrintedAngle, type Num, type NumScope } from './expr.js';
import { recogniseDecompositions, type PeepholeReport } from './peephole.js';
import { applyRegisterMap, RegisterMapError, type RegisterMapEntry } from './register-map.js';
import { matDagger, matMul, matSqrt, MATRICES, rzMatrix, ryMatrix, u3Matrix, zyz } from './matrix.js';
import { BudgetExceeded, shortInteger, WorkBudget } from '../budget.js';

/** A non-fatal note about the file (skipped statement, lenient reading), with its position. */
export interface QasmWarning {
	line: number;
	column: number;
	message: string;
}

/** Where a produced gate item came from: the top-level call and the chain of `gate` definitions it went through. */
export interface GateOrigin {
	qasm: string;
	call: SourcePosition;
	definitions: { gate: string; line: number; column: number }[];
}

/** Bounds on what a file may make us do. */
export interface QasmLimits {
	maxQubits: number;
	maxGates: number;
	maxBytes: number;
	maxDepth: number;
	/** Gate-definition calls after expansion (a call that makes no gate still costs work). */
	maxCalls: number;
}

/** Default bounds: 1024 qubits, 1 000 000 gates after expansion, 4 MB of text, gate calls nested 64 deep, 200 000 expanded calls. */
export const DEFAULT_QASM_LIMITS: QasmLimits = { maxQubits: 1024, maxGates: 1_000_000, maxBytes: 4_000_000, maxDepth: 64, maxCalls: 200_000 };

/** Options of {@link importQasm}. */
export interface QasmImportOptions {
	file?: string;
	title?: string;
	limits?: Partial<QasmLimits>;
	/** Version assumed when the file has no OPENQASM header (default 3, with a warning). */
	defaultVersion?: 2 | 3;
	/**
	 * Read a gate parameter written as a plain decimal (`0.785398`, `-1.5707963267948966`) as the
	 * exact angle k/2^m turn it prints, when it is within half a unit of its last digit of one
	 * (see `readPrintedAngle`). Default true.
	 */
	exactDecimals?: boolean;
	/** Recognise decomposed controlled phases, doubly controlled phases and Toffolis (`peephole.ts`). Default true. */
	recogniseDecompositions?: boolean;
	/** Values of OpenQASM 3 `input` parameters, as expressions (`theta` → `pi/8`). */
	params?: Record<string, string>;
}

/** How printed decimals were read (see {@link QasmImportOptions.exactDecimals}). */
export interface PrintedAngleStats {
	/** Decimal parameters read as exact angles. */
	exact: number;
	/** Largest |printed − exact| among them, radians. */
	largestDifferenceRadians: number;
	/** Decimal parameters that fit no k/2^m turn and stay inexact. */
	inexact: number;
}

/** Result of {@link importQasm}: the document, the version read, warnings, and per body item its origin. */
export interface QasmImport {
	document: CircuitDocument;
	version: 2 | 3;
	warnings: QasmWarning[];
	origins: GateOrigin[];
	/** Printed decimals read as exact angles. */
	decimals: PrintedAngleStats;
	/** What the recognition of decomposed gates changed (absent when it was turned off). */
	decompositions?: PeepholeReport;
	/** Sentences for the user about how the file was read (decimals, decompositions). */
	notes: string[];
}

// ----------------------------------------------------------------------------------------------
// Semantic gate ops: a gate with any number of controls, before mapping to document gate items.

type OpKind = 'x' | 'h' | 'phase' | 'rz' | 'gphase' | 'u' | 'swap';
interface Op {
	kind: OpKind;
	ctrls: number[];
	t: number[];
	angle?: Num; // radians
	matrix?: Matrix2;
	origin: GateOrigin;
}

const PI = exactNum(1n, 1n, 1);
const HALF_PI = exactNum(1n, 2n, 1);
const QUARTER_PI = exactNum(1n, 4n, 1);
const neg = (x: Num) => mul(exactNum(-1n), x);
const half = (x: Num) => mul(exactNum(1n, 2n), x);
const isExactZero = (x: Num) => x.exact && x.n === 0n;

type Builder = (p: Num[], q: number[], o: GateOrigin) => Op[];
interface Builtin {
	params: number;
	qubits: number;
	lib: 'core2' | 'core3' | 'lib' | 'lib2' | 'lib3';
	build: Builder;
}

const op = (kind: OpKind, t: number[], o: GateOrigin, extra: Partial<Op> = {}): Op => ({ kind, ctrls: [], t, origin: o, ...extra });
const phase = (a: Num, q: number, o: GateOrigin) => op('phase', [q], o, { angle: a });
const umat = (m: Matrix2, q: number, o: GateOrigin) => op('u', [q], o, { matrix: m });
const withCtrl = (ops: Op[], c: number[]): Op[] => ops.map((x) => ({ ...x, ctrls: [...c, ...x.ctrls] }));

/** U(θ, φ, λ): exact phase(φ+λ) when θ is exactly 0, else the matrix. */
function uGate(th: Num, ph: Num, la: Num, q: number, o: GateOrigin): Op[] {
	if (isExactZero(th)) return [phase(add(ph, la, 1n), q, o)];
	return [umat(u3Matrix(numToFloat(th), numToFloat(ph), numToFloat(la)), q, o)];
}

const BUILTINS: Record<string, Builtin> = {
	U: { params: 3, qubits: 1, lib: 'core2', build: (p, q, o) => uGate(p[0], p[1], p[2], q[0], o) },
	CX: { params: 0, qubits: 2, lib: 'core2', build: (_p, q, o) => withCtrl([op('x', [q[1]], o)], [q[0]]) },
	gphase: { params: 1, qubits: 0, lib: 'core3', build: (p, _q, o) => [op('gphase', [], o, { angle: p[0] })] },
	u3: {
		params: 3,
		qubits: 1,
		lib: 'lib',
		// stdgates.inc defines u3 as U with a global phase e^{−i(φ+λ)/2} (from memory); it matters only under ctrl @.
		build: (p, q, o) => [op('gphase', [], o, { angle: neg(half(add(p[1], p[2], 1n))) }), ...uGate(p[0], p[1], p[2], q[0], o)]
	},
	u2: { params: 2, qubits: 1, lib: 'lib', build: (p, q, o) => [op('gphase', [], o, { angle: neg(half(add(p[0], p[1], 1n))) }), ...uGate(HALF_PI, p[0], p[1], q[0], o)] },
	u1: { params: 1, qubits: 1, lib: 'lib', build: (p, q, o) => [phase(p[0], q[0], o)] },
	u: { params: 3, qubits: 1, lib: 'lib', build: (p, q, o) => uGate(p[0], p[1], p[2], q[0], o) },
	p: { params: 1, qubits: 1, lib: 'lib', build: (p, q, o) => [phase(p[0], q[0], o)] },
	phase: { params: 1, qubits: 1, lib: 'lib3', build: (p, q, o) => [phase(p[0], q[0], o)] },
	id: { params: 0, qubits: 1, lib: 'lib', build: () => [] },
	x: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [op('x', [q[0]], o)] },
	// Y = S·X·S† exactly.
	y: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [phase(neg(HALF_PI), q[0], o), op('x', [q[0]], o), phase(HALF_PI, q[0], o)] },
	z: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [phase(PI, q[0], o)] },
	h: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [op('h', [q[0]], o)] },
	s: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [phase(HALF_PI, q[0], o)] },
	sdg: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [phase(neg(HALF_PI), q[0], o)] },
	t: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [phase(QUARTER_PI, q[0], o)] },
	tdg: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [phase(neg(QUARTER_PI), q[0], o)] },
	sx: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [umat(MATRICES.sx, q[0], o)] },
	sxdg: { params: 0, qubits: 1, lib: 'lib', build: (_p, q, o) => [umat(matDagger(MATRICES.sx), q[0], o)] },
	rx: { params: 1, qubits: 1, lib: 'lib', build: (p, q, o) => [umat(u3Matrix(numToFloat(p[0]), -Math.PI / 2, Math.PI / 2), q[0], o)] },
	ry: { params: 1, qubits: 1, lib: 'lib', build: (p, q, o) => [umat(ryMatrix(numToFloat(p[0])), q[0], o)] },
	rz: { params: 1, qubits: 1, lib: 'lib', build: (p, q, o) => [op('rz', [q[0]], o, { angle: p[0] })] },
	cx: { params: 0, qubits: 2, lib: 'lib', build: (_p, q, o) => withCtrl([op('x', [q[1]], o)], [q[0]]) },
	cy: { params: 0, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl(BUILTINS.y.build(p, [q[1]], o), [q[0]]) },
	cz: { params: 0, qubits: 2, lib: 'lib', build: (_p, q, o) => withCtrl([phase(PI, q[1], o)], [q[0]]) },
	ch: { params: 0, qubits: 2, lib: 'lib', build: (_p, q, o) => withCtrl([op('h', [q[1]], o)], [q[0]]) },
	csx: { params: 0, qubits: 2, lib: 'lib', build: (_p, q, o) => withCtrl([umat(MATRICES.sx, q[1], o)], [q[0]]) },
	ccx: { params: 0, qubits: 3, lib: 'lib', build: (_p, q, o) => withCtrl([op('x', [q[2]], o)], [q[0], q[1]]) },
	// qelib1.inc (as common exporters ship it; from memory): u0 is an idle gate, rccx the relative-phase
	// Toffoli h c; t c; cx b,c; tdg c; cx a,c; t c; cx b,c; tdg c; h c.
	u0: { params: 1, qubits: 1, lib: 'lib2', build: () => [] },
	rccx: {
		params: 0,
		qubits: 3,
		lib: 'lib2',
		build: (_p, q, o) => {
			const [a, b, c] = q;
			const cx = (x: number, y: number) => withCtrl([op('x', [y], o)], [x]);
			return [op('h', [c], o), phase(QUARTER_PI, c, o), ...cx(b, c), phase(neg(QUARTER_PI), c, o), ...cx(a, c), phase(QUARTER_PI, c, o), ...cx(b, c), phase(neg(QUARTER_PI), c, o), op('h', [c], o)];
		}
	},
	c3x: { params: 0, qubits: 4, lib: 'lib2', build: (_p, q, o) => withCtrl([op('x', [q[3]], o)], q.slice(0, 3)) },
	c4x: { params: 0, qubits: 5, lib: 'lib2', build: (_p, q, o) => withCtrl([op('x', [q[4]], o)], q.slice(0, 4)) },
	crz: { params: 1, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl([op('rz', [q[1]], o, { angle: p[0] })], [q[0]]) },
	crx: { params: 1, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl(BUILTINS.rx.build(p, [q[1]], o), [q[0]]) },
	cry: { params: 1, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl(BUILTINS.ry.build(p, [q[1]], o), [q[0]]) },
	cu1: { params: 1, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl([phase(p[0], q[1], o)], [q[0]]) },
	cp: { params: 1, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl([phase(p[0], q[1], o)], [q[0]]) },
	cphase: { params: 1, qubits: 2, lib: 'lib3', build: (p, q, o) => withCtrl([phase(p[0], q[1], o)], [q[0]]) },
	// qelib1.inc's cu3 is the controlled u3 matrix with no extra phase (from memory).
	cu3: { params: 3, qubits: 2, lib: 'lib', build: (p, q, o) => withCtrl(uGate(p[0], p[1], p[2], q[1], o), [q[0]]) },
	cu: {
		params: 4,
		qubits: 2,
		lib: 'lib',
		build: (p, q, o) => withCtrl([op('gphase', [], o, { angle: p[3] }), ...uGate(p[0], p[1], p[2], q[1], o)], [q[0]])
	},
	swap: { params: 0, qubits: 2, lib: 'lib', build: (_p, q, o) => [op('swap', [q[0], q[1]], o)] },
	cswap: { params: 0, qubits: 3, lib: 'lib', build: (_p, q, o) => withCtrl([op('swap', [q[1], q[2]], o)], [q[0]]) },
	rzz: {
		params: 1,
		qubits: 2,
		lib: 'lib',
		build: (p, q, o) => [...withCtrl([op('x', [q[1]], o)], [q[0]]), op('rz', [q[1]], o, { angle: p[0] }), ...withCtrl([op('x', [q[1]], o)], [q[0]])]
	}
};

function builtinAvailable(b: Builtin, version: 2 | 3, included: boolean): boolean {
	if (b.lib === 'core2') return true;
	if (b.lib === 'core3') return version === 3;
	if (!included) return false;
	if (b.lib === 'lib2') return version === 2;
	if (b.lib === 'lib3') return version === 3;
	return true;
}

function invertOps(ops: Op[]): Op[] {
	const out: Op[] = [];
	for (let i = ops.length - 1; i >= 0; i--) {
		const o = ops[i];
		if (o.kind === 'phase' || o.kind === 'rz' || o.kind === 'gphase') out.push({ ...o, angle: neg(o.angle!) });
		else if (o.kind === 'u') out.push({ ...o, matrix: matDagger(o.matrix!) });
		else out.push(o);
	}
	return out;
}

// ----------------------------------------------------------------------------------------------
// Parsed structures

interface Modifier {
	kind: 'ctrl' | 'negctrl' | 'inv' | 'pow';
	count: number;
	exponent?: Num;
	tok: Token;
}
interface GateCall {
	mods: Modifier[];
	name: string;
	nameTok: Token;
	params: Token[][];
	qargs: { name: string; index: Token[] | null; tok: Token }[];
}
interface GateDef {
	/** Lower bound on the gate items one call produces (for an early size check). */
	leaves: number;
	name: string;
	params: string[];
	qubits: string[];
	body: GateCall[];
	tok: Token;
}

const RESERVED_WORDS = new Set(['OPENQASM', 'include', 'qreg', 'creg', 'qubit', 'bit', 'gate', 'opaque', 'measure', 'reset', 'barrier', 'if', 'const', 'ctrl', 'negctrl', 'inv', 'pow']);
const UNSUPPORTED_3 = new Set(['for', 'while', 'def', 'defcal', 'cal', 'defcalgrammar', 'box', 'delay', 'let', 'input', 'output', 'return', 'extern', 'switch', 'break', 'continue', 'end', 'array', 'duration', 'stretch', 'complex']);

class Reader {
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
	private budget = 0;
	readonly items: BodyItem[] = [];
	/** Gates made so far (a broadcast's gates sit in its block, so this is more than items.length). */
	private gatesMade = 0;
	readonly origins: GateOrigin[] = [];
	private flatToRef: QubitRef[] = [];
	exactDecimals = true;
	readonly decimals: PrintedAngleStats = { exact: 0, largestDifferenceRadians: 0, inexact: 0 };
	private readonly decimalSeen = new Set<number>();
	private readonly printedCache = new Map<string, ReturnType<typeof readPrintedAngle>>();
	/** Expanded calls (src/lib/quantum/budget.ts); gates are counted by `budget` and `items`. */
	readonly work: WorkBudget;
	/** First token of the statement being read: where a problem without a better position is reported. */
	private statementTok: Token | null = null;
	private nextItemId = 1;
	/** Blocks made for broadcasts (`h q;` over a register stays one call item), by content. */
	readonly broadcastBlocks: UserBlock[] = [];
	private broadcastByKey = new Map<string, UserBlock>();

	constructor(
		private readonly tokens: Token[],
		private readonly file: string,
		private readonly limits: QasmLimits,
		defaultVersion: 2 | 3
	) {
		this.version = defaultVersion;
		this.work = new WorkBudget({ calls: limits.maxCalls, gates: limits.maxGates, qubits: limits.maxQubits });
	}

	private err(t: { line: number; column: number }, msg: string): never {
		throw new QasmError(t.line, t.column, msg, this.file);
	}
	private warn(t: { line: number; column: number }, msg: string): void {
		if (this.warnings.length < 1000) this.warnings.push({ line: t.line, column: t.column, message: msg });
	}
	private peek(k = 0): Token {
		return this.tokens[Math.min(this.pos + k, this.tokens.length - 1)];
	}
	private next(): Token {
		const t = this.tokens[this.pos];
		if (this.pos < this.tokens.length - 1) this.pos++;
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
			const prev = this.tokens[this.pos - 1];
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
	private angleParam(tokens: Token[], scope: NumScope): Num {
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
		void kw;
	}

	run(): void {
		this.readHeader();
		while (this.peek().kind !== 'eof') {
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
				this.skipStatement(t, 'measure skipped: the checker reads the final state directly');
				return;
			case 'reset':
				this.skipStatement(t, 'reset skipped: qubits start in |0⟩ and mid-circuit reset is not simulated');
				return;
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
			this.skipStatement(t, 'measure skipped: the checker reads the final state directly', true);
			return;
		}
		const call = this.gateCall(null);
		this.topLevelCall(call);
	}

	private skipStatement(t: Token, message: string, mustMeasure = false): void {
		let sawMeasure = false;
		while (!this.isP(';')) {
			const x = this.next();
			if (x.kind === 'eof') this.err(t, 'missing ";" at the end of the statement before the end of the file');
			if (x.text === 'measure') sawMeasure = true;
		}
		if (mustMeasure && !sawMeasure) this.err(t, `assignment to "${t.text}" is not supported; only measurement results may be assigned`);
		this.next();
		this.warn(t, message);
	}

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
			this.skipStatement(kw, 'measure skipped: the checker reads the final state directly', true);
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
		this.expectP('{', `to open the body of gate ${name}`);
		const formals = new Set(qubits);
		const scopeNames = new Set([...params, ...this.consts.keys()]);
		const body: GateCall[] = [];
		while (!this.isP('}')) {
			const t = this.peek();
			if (t.kind === 'eof') this.err(nameTok, `gate ${name}: missing "}" to close the body before the end of the file`);
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

	private resolveGate(call: GateCall, defining: string | null): { params: number; qubits: number; def?: GateDef; builtin?: Builtin } {
		if (defining !== null && call.name === defining) this.err(call.nameTok, `recursive gate definition: gate "${defining}" calls itself`);
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
		if (this.leafBound(call) + this.gatesMade > this.limits.maxGates)
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
		const params = call.params.map((ex) => this.angleParam(ex, this.consts));
		const start = this.items.length;
		for (let k = 0; k < width; k++) {
			const qs = lists.map((l) => (l.length === 1 ? l[0] : l[k]));
			const seen = new Set<number>();
			qs.forEach((q, j) => {
				if (seen.has(q)) {
					const ref = this.flatToRef[q];
					this.err(call.qargs[j].tok, `qubit ${ref.register}[${ref.index}] is used twice in one gate call`);
				}
				seen.add(q);
			});
			const origin: GateOrigin = { qasm: call.name, call: { line: call.nameTok.line, column: (call.mods[0]?.tok ?? call.nameTok).column }, definitions: [] };
			if (call.mods.length) origin.call.column = call.mods[0].tok.column;
			this.budget = 0;
			const ops = this.expand(call, params, qs, origin, 0, this.consts);
			for (const o of ops) this.emit(o, call);
		}
		// Only a broadcast over a whole declared register is compacted (not over an alias or a slice).
		const whole = call.qargs.find((q) => !q.index && !this.aliases.has(q.name) && (this.regByName.get(q.name)?.size ?? 0) > 1);
		if (width > 1 && whole) this.compactBroadcast(call, start, whole.name);
	}

	private expand(call: GateCall, params: Num[], qs: number[], origin: GateOrigin, depth: number, _scope: NumScope): Op[] {
		if (depth > this.limits.maxDepth) this.err(origin.call, `gate calls nested deeper than ${this.limits.maxDepth} (limit)`);
		return this.applyMods(call, 0, params, qs, origin, depth);
	}

	private applyMods(call: GateCall, mi: number, params: Num[], qs: number[], origin: GateOrigin, depth: number): Op[] {
		if (mi < call.mods.length) {
			const m = call.mods[mi];
			if (m.kind === 'ctrl' || m.kind === 'negctrl') {
				const cs = qs.slice(0, m.count);
				const inner = this.applyMods(call, mi + 1, params, qs.slice(m.count), origin, depth);
				const ctl = withCtrl(inner, cs);
				if (m.kind === 'ctrl') return ctl;
				const flips = cs.map((c) => op('x', [c], origin));
				return [...flips, ...ctl, ...flips];
			}
			const inner = this.applyMods(call, mi + 1, params, qs, origin, depth);
			if (m.kind === 'inv') return invertOps(inner);
			const k = m.exponent!;
			const diagonal = inner.every((o) => o.kind === 'phase' || o.kind === 'rz' || o.kind === 'gphase');
			if (diagonal) return inner.map((o) => ({ ...o, angle: mul(k, o.angle!) }));
			const ki = numToInteger(k);
			if (ki === null) this.err(m.tok, `pow(${numToFloat(k)}) @ ${call.name}: a non-integer power is supported on phase gates only`);
			const reps = ki < 0n ? -ki : ki;
			if (reps * BigInt(inner.length) > BigInt(this.limits.maxGates)) this.err(m.tok, `pow(${ki}) @ ${call.name} exceeds the limit of ${this.limits.maxGates} gates`);
			const base = ki < 0n ? invertOps(inner) : inner;
			const out: Op[] = [];
			for (let r = 0n; r < reps; r++) out.push(...base);
			return out;
		}
		const g = this.resolveGate(call, null);
		if (g.builtin) {
			// Count leaf ops as they are made, so an exploding chain of definitions stops early.
			this.budget++;
			if (this.budget + this.gatesMade > this.limits.maxGates) this.err(origin.call, `more than ${this.limits.maxGates} gates after expanding gate definitions (limit)`);
			return g.builtin.build(params, qs, origin);
		}
		const def = g.def!;
		// Every expanded call costs work, also one whose body makes no gate.
		if (this.work.wouldExceed('calls', 1)) this.err(origin.call, `more than ${this.limits.maxCalls} gate calls after expanding gate definitions (limit); "${def.name}" is called too often`);
		this.work.charge('calls', 1);
		const scope: NumScope = new Map(this.consts);
		def.params.forEach((p, i) => scope.set(p, params[i]));
		const qmap = new Map(def.qubits.map((q, i) => [q, qs[i]]));
		const out: Op[] = [];
		const inner: GateOrigin = { ...origin, definitions: [...origin.definitions, { gate: def.name, line: def.tok.line, column: def.tok.column }] };
		for (const c of def.body) {
			const ps = c.params.map((ex) => this.angleParam(ex, scope));
			const bodyOrigin: GateOrigin = { ...inner, definitions: [...inner.definitions.slice(0, -1), { gate: def.name, line: c.nameTok.line, column: c.nameTok.column }] };
			const ops = this.expand(c, ps, c.qargs.map((q) => qmap.get(q.name)!), bodyOrigin, depth + 1, scope);
			for (const o of ops) out.push(o);
			if (out.length > this.limits.maxGates) this.err(origin.call, `more than ${this.limits.maxGates} gates after expanding gate definitions (limit)`);
		}
		return out;
	}

	// ------------------------------------------------------------------------------------------
	// Mapping ops to document gate items

	private push(gate: GateItem['gate'], qubits: number[], o: Op, angle?: Num, matrix?: Matrix2): void {
		if (this.gatesMade >= this.limits.maxGates) this.err(o.origin.call, `more than ${this.limits.maxGates} gates after expanding gate definitions (limit)`);
		const item: GateItem = {
			id: `g${this.nextItemId++}`,
			type: 'gate',
			gate,
			qubits: qubits.map((q) => this.flatToRef[q]),
			source: { line: o.origin.call.line, column: o.origin.call.column }
		};
		if (o.origin.definitions.length) {
			const d = o.origin.definitions;
			item.label = `${o.origin.qasm} → ${d.map((x) => `${x.gate}@${x.line}:${x.column}`).join(' → ')}`.slice(0, 200);
		}
		if (angle !== undefined) item.angle = angleText(numToAngle(angle));
		if (matrix) item.matrix = matrix;
		this.items.push(item);
		this.origins.push(o.origin);
		this.gatesMade++;
	}

	/**
	 * A broadcast (`h q;` over a register) stays one item: the gates it made (items from `start`)
	 * move into a block (shared by every broadcast that made the same gates) and one call item
	 * takes their place. Without this, `h q;` on 1000 qubits three hundred times stored 300 000 items.
	 */
	private compactBroadcast(call: GateCall, start: number, register: string): void {
		const made = this.items.slice(start) as GateItem[];
		if (made.length < 2 || made.length > 10_000) return;
		const key = JSON.stringify(made.map((it) => [it.gate, it.qubits, it.angle, it.matrix, it.label]));
		let block = this.broadcastByKey.get(key);
		if (!block) {
			const base = `each_${call.name}_${register}`.replace(/[^A-Za-z0-9_]/g, '_').slice(0, 60);
			let name = base;
			for (let n = 2; this.broadcastBlocks.some((b) => b.name === name) || this.defs.has(name); n++) name = `${base}_${n}`;
			block = {
				name,
				params: [],
				description: `OpenQASM broadcast: ${call.name} on every qubit of ${register}`,
				body: made.map((it, i) => {
					const inner: GateItem = { ...it, id: `g${i + 1}` };
					delete inner.source;
					return inner;
				})
			};
			this.broadcastBlocks.push(block);
			this.broadcastByKey.set(key, block);
		}
		const origin = this.origins[start];
		const source = made[0].source;
		this.items.length = start;
		this.origins.length = start;
		const item: CallItem = { id: `g${this.nextItemId++}`, type: 'call', block: block.name, args: {}, label: `${call.name} ${register} (broadcast over ${made.length} gates)` };
		if (source) item.source = source;
		this.items.push(item);
		this.origins.push(origin);
	}

	private phaseGate(ctrls: number[], t: number, a: Num, o: Op): void {
		if (ctrls.length === 0) this.push('p', [t], o, a);
		else if (ctrls.length === 1) this.push('cp', [ctrls[0], t], o, a);
		else this.push('mcp', [...ctrls, t], o, a);
	}

	private emit(o: Op, call: GateCall): void {
		const cs = o.ctrls;
		switch (o.kind) {
			case 'x':
				if (cs.length === 0) this.push('x', [o.t[0]], o);
				else if (cs.length === 1) this.push('cx', [cs[0], o.t[0]], o);
				else if (cs.length === 2) this.push('ccx', [cs[0], cs[1], o.t[0]], o);
				else {
					// C^k X = H · C^k Z · H, and C^k Z is a phase of π with k controls: exact.
					this.push('h', [o.t[0]], o);
					this.phaseGate(cs, o.t[0], PI, o);
					this.push('h', [o.t[0]], o);
				}
				return;
			case 'phase':
				this.phaseGate(cs, o.t[0], o.angle!, o);
				return;
			case 'rz':
				// rz(θ) = e^{−iθ/2}·p(θ): under controls the global phase lands on the last control.
				if (cs.length === 0) this.push('rz', [o.t[0]], o, o.angle!);
				else {
					this.phaseGate(cs.slice(0, -1), cs[cs.length - 1], neg(half(o.angle!)), o);
					this.phaseGate(cs, o.t[0], o.angle!, o);
				}
				return;
			case 'gphase':
				if (cs.length > 0 && !isExactZero(o.angle!)) this.phaseGate(cs.slice(0, -1), cs[cs.length - 1], o.angle!, o);
				return;
			case 'swap':
				if (cs.length === 0) this.push('swap', [o.t[0], o.t[1]], o);
				else {
					const [a, b] = o.t;
					this.push('cx', [b, a], o);
					this.emit({ ...o, kind: 'x', ctrls: [...cs, a], t: [b] }, call);
					this.push('cx', [b, a], o);
				}
				return;
			case 'h':
				if (cs.length === 0) this.push('h', [o.t[0]], o);
				else this.emit({ ...o, kind: 'u', matrix: MATRICES.h }, call);
				return;
			case 'u': {
				const m = o.matrix!;
				if (cs.length === 0) {
					this.push('u', [o.t[0]], o, undefined, m);
					return;
				}
				if (cs.length === 1) {
					// Nielsen and Chuang, Corollary 4.2 and Fig. 4.6: U = e^{iα}·A·X·B·X·C with A·B·C = I.
					const { alpha, beta, gamma, delta } = zyz(m);
					const t = o.t[0];
					const A = matMul(rzMatrix(beta), ryMatrix(gamma / 2));
					const B = matMul(ryMatrix(-gamma / 2), rzMatrix(-(delta + beta) / 2));
					const C = rzMatrix((delta - beta) / 2);
					this.push('u', [t], o, undefined, C);
					this.push('cx', [cs[0], t], o);
					this.push('u', [t], o, undefined, B);
					this.push('cx', [cs[0], t], o);
					this.push('u', [t], o, undefined, A);
					if (Math.abs(alpha) > 1e-15) this.push('p', [cs[0]], o, { exact: false, v: alpha });
					return;
				}
				// Barenco et al. 1995, Lemma 7.5: C^k U from C-V, C^{k−1}X, C-V†, C^{k−1}X, C^{k−1}V with V² = U.
				const v = matSqrt(m);
				const last = cs[cs.length - 1];
				const rest = cs.slice(0, -1);
				this.emit({ ...o, ctrls: [last], matrix: v }, call);
				this.emit({ ...o, kind: 'x', ctrls: rest, t: [last] }, call);
				this.emit({ ...o, ctrls: [last], matrix: matDagger(v) }, call);
				this.emit({ ...o, kind: 'x', ctrls: rest, t: [last] }, call);
				this.emit({ ...o, ctrls: rest, matrix: v }, call);
				return;
			}
		}
	}

	documentOf(title: string): CircuitDocument {
		if (this.registers.length === 0) this.err(this.peek(), 'the file declares no qubits; expected at least one qreg or qubit declaration');
		return {
			format: CIRCUIT_FORMAT,
			version: CIRCUIT_VERSION,
			title,
			registers: this.registers.map((r) => ({ name: r.name, size: r.size })),
			body: this.items,
			...(this.broadcastBlocks.length ? { blocks: this.broadcastBlocks } : {})
		};
	}
}

/** Document angle string for an angle in turns: exact `"k/2^m turn"`, float `"~t"`. */
export function angleText(a: Angle): string {
	if (!a.exact) return `~${a.turns}`;
	if (a.num === 0n) return '0 turn';
	return `${a.num}/2^${a.exp} turn`;
}

/**
 * Read an OpenQASM 2.0 or 3.0 file into a circuit document. Throws {@link QasmError}
 * (`file:line:column: what is wrong, what was expected`) for unusable files; never hangs
 * (input size, qubits, gates after expansion and gate-call nesting are bounded).
 * Qubit order: q[0] is bit 0 (LSB) of its register; angles in the document are in turns.
 */
export function importQasm(text: string, options: QasmImportOptions = {}): QasmImport {
	const file = options.file ?? '<input>';
	const limits = { ...DEFAULT_QASM_LIMITS, ...options.limits };
	if (text.length > limits.maxBytes) {
		// Point at where the limit is crossed.
		const before = text.slice(0, limits.maxBytes);
		const line = before.split('\n').length;
		const column = limits.maxBytes - before.lastIndexOf('\n');
		throw new QasmError(line, column, `file is too large: ${text.length} characters exceeds the limit of ${limits.maxBytes}; the limit is crossed here`, file);
	}
	let tokens: Token[];
	try {
		tokens = lexQasm(text);
	} catch (e) {
		if (e instanceof QasmError) throw e.withFile(file);
		throw e;
	}
	const r = new Reader(tokens, file, limits, options.defaultVersion ?? 3);
	r.exactDecimals = options.exactDecimals ?? true;
	r.params = new Map(Object.entries(options.params ?? {}));
	try {
		r.run();
	} catch (e) {
		if (e instanceof QasmError) throw e.file === file ? e : e.withFile(file);
		if (e instanceof RangeError) throw new QasmError(1, 1, e.message, file);
		throw e;
	}
	const title = options.title ?? file.replace(/^.*[\\/]/, '').replace(/\.(qasm3?|inc)$/i, '');
	let document = r.documentOf(title);
	let origins = r.origins;
	const notes: string[] = [];
	const d = r.decimals;
	if (d.exact) notes.push(`${d.exact} printed angle${d.exact === 1 ? '' : 's'} read as exact k/2^m turn (largest difference ${d.largestDifferenceRadians.toExponential(2)} rad)`);
	if (d.inexact) notes.push(`${d.inexact} printed angle${d.inexact === 1 ? '' : 's'} fit no k/2^m turn${r.exactDecimals ? '' : ' (exact reading of decimals is off)'} and stay inexact`);
	let decompositions: PeepholeReport | undefined;
	if (options.recogniseDecompositions ?? true) {
		const p = recogniseDecompositions(document);
		decompositions = p.report;
		if (p.report.regions || p.report.toffolis || p.report.cancelledPairs) {
			document = { ...document, body: p.body };
			origins = p.from.map((i) => r.origins[i]);
			const parts: string[] = [];
			if (p.report.regions) parts.push(`${p.report.regions} CNOT region${p.report.regions === 1 ? '' : 's'} read as diagonal phase gates`);
			if (p.report.toffolis) parts.push(`${p.report.toffolis} Toffoli network${p.report.toffolis === 1 ? '' : 's'} read as ccx`);
			if (p.report.cancelledPairs) parts.push(`${p.report.cancelledPairs} pair${p.report.cancelledPairs === 1 ? '' : 's'} of opposite phases cancelled`);
			notes.push(`decomposed gates recognised: ${parts.join(', ')}${p.report.rzAsPhase ? ` (rz read as p: equal up to a global phase)` : ''}`);
		}
		if (p.report.stoppedAtLimit) notes.push('recognition of decomposed gates stopped at its work limit; the rest of the file is read as written');
	}
	if (r.topLets.length) {
		// OpenQASM 3 `let` aliases of one register become registers of the document.
		const entries: RegisterMapEntry[] = [];
		for (const l of r.topLets) {
			const reg = r.registers.find((x) => l.qubits[0] >= x.offset && l.qubits[0] < x.offset + x.size)!;
			if (!l.qubits.every((q) => q >= reg.offset && q < reg.offset + reg.size)) {
				r.warnings.push({ line: l.tok.line, column: l.tok.column, message: `let ${l.name} joins qubits of several registers; it stays an alias, not a register` });
				continue;
			}
			entries.push({ name: l.name, qubits: `${reg.name}[{${l.qubits.map((q) => q - reg.offset).join(',')}}]` });
		}
		try {
			const m = applyRegisterMap(document, entries);
			document = m.document;
			notes.push(`let aliases read as registers: ${entries.map((e) => e.name).join(', ')}`, ...m.notes);
		} catch (e) {
			if (!(e instanceof RegisterMapError)) throw e;
			const at = e.entry >= 0 ? r.topLets.find((l) => l.name === entries[e.entry].name)!.tok : { line: 1, column: 1 };
			r.warnings.push({ line: at.line, column: at.column, message: `let aliases kept as aliases, not registers: ${e.message}` });
		}
	}
	return { document, version: r.version, warnings: r.warnings, origins, decimals: d, decompositions, notes };
}
