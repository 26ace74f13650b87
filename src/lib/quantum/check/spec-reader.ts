/**
 * A small reader for the common form of a spec's right side: integers, register names, + − × ÷,
 * powers (^, right-associative, a unary sign allowed in the exponent), unary signs, parentheses
 * and the `mod` operator. It builds the same syntax tree mathjs's parser builds for that text
 * (the same node types, operators, functions and order of arguments), as plain objects, so the
 * page's first run does not wait for mathjs's parser to set itself up (about 0.2 s in a fresh
 * worker). For anything else (function calls, comparisons, conditionals, implicit
 * multiplication, decimals, keywords, any other character) it answers null and the caller
 * parses with mathjs, which stays the reference: `spec-reader.test.ts` compares both trees on
 * every spec the project ships and on generated expressions.
 *
 * Only the node fields the spec walkers read are set: `type`, and `op`, `fn`, `args`,
 * `implicit`, `isPercentage` (OperatorNode), `value` (ConstantNode, a bigint), `name`
 * (SymbolNode), `content` (ParenthesisNode).
 */

/** A node of the tree, shaped like mathjs's node of the same type. */
export type ReadNode =
	| { type: 'OperatorNode'; op: string; fn: string; args: ReadNode[]; implicit: false; isPercentage: false }
	| { type: 'ConstantNode'; value: bigint }
	| { type: 'SymbolNode'; name: string }
	| { type: 'ParenthesisNode'; content: ReadNode };

/** Names mathjs's parser reads as something other than a symbol (constants and word operators). */
const RESERVED = new Set(['mod', 'to', 'in', 'and', 'xor', 'or', 'not', 'true', 'false', 'null', 'undefined', 'NaN', 'Infinity']);

/** Most nested parentheses and unary signs read here (deeper text goes to mathjs). */
const MAX_DEPTH = 200;

type Token = { kind: 'num'; text: string } | { kind: 'name'; text: string } | { kind: 'op'; text: string };

/** Tokens of `src`, or null when it holds anything outside this reader's form. */
function tokens(src: string): Token[] | null {
	const out: Token[] = [];
	let i = 0;
	while (i < src.length) {
		const ch = src.charCodeAt(i);
		if (ch === 32 || ch === 9) {
			i++;
			continue;
		}
		if (ch >= 48 && ch <= 57) {
			let j = i;
			while (j < src.length && src.charCodeAt(j) >= 48 && src.charCodeAt(j) <= 57) j++;
			// a digit run followed by a letter, `_` or `.` is another number form (hex, decimal,
			// exponent) or an implicit product: mathjs decides
			if (j < src.length && /[A-Za-z_.$]/.test(src[j])) return null;
			out.push({ kind: 'num', text: src.slice(i, j) });
			i = j;
			continue;
		}
		if ((ch >= 65 && ch <= 90) || (ch >= 97 && ch <= 122) || ch === 95) {
			let j = i + 1;
			while (j < src.length && /[A-Za-z0-9_]/.test(src[j])) j++;
			if (j < src.length && /[$.]/.test(src[j])) return null;
			out.push({ kind: 'name', text: src.slice(i, j) });
			i = j;
			continue;
		}
		const c = src[i];
		if (c === '+' || c === '-' || c === '*' || c === '/' || c === '^' || c === '(' || c === ')') {
			// `.*`, `./`, `.^` and `**` never reach here (a `.` is refused; `**` is rewritten to `^` first)
			out.push({ kind: 'op', text: c });
			i++;
			continue;
		}
		return null;
	}
	return out;
}

const BINARY: Record<string, string> = { '+': 'add', '-': 'subtract', '*': 'multiply', '/': 'divide', mod: 'mod' };
const UNARY: Record<string, string> = { '-': 'unaryMinus', '+': 'unaryPlus' };

const op = (o: string, fn: string, args: ReadNode[]): ReadNode => ({ type: 'OperatorNode', op: o, fn, args, implicit: false, isPercentage: false });

/** Thrown inside the reader when the text is not of its form (caught: the answer is null). */
class NotThisForm extends Error {}

/**
 * The syntax tree mathjs would build for `src` when `src` is of the common form (see the module
 * comment), else null. Never throws.
 */
export function readSpecExpression(src: string): ReadNode | null {
	const ts = tokens(src);
	if (!ts || ts.length === 0) return null;
	let at = 0;
	let depth = 0;
	const peek = (): Token | undefined => ts[at];
	const isOp = (t: Token | undefined, text: string): boolean => t !== undefined && t.kind === 'op' && t.text === text;
	const binaryAt = (t: Token | undefined, level: 'add' | 'multiply'): string | null => {
		if (!t) return null;
		if (level === 'add') return t.kind === 'op' && (t.text === '+' || t.text === '-') ? t.text : null;
		if (t.kind === 'op' && (t.text === '*' || t.text === '/')) return t.text;
		return t.kind === 'name' && t.text === 'mod' ? 'mod' : null;
	};
	// mathjs: parseAddSubtract → parseMultiplyDivideModulus → (implicit products, refused here) →
	// parseUnary → parsePow → primary.
	/** Left-associative operators of one level, over operands of the next. */
	const leftChain = (level: 'add' | 'multiply', operand: () => ReadNode): ReadNode => {
		let node = operand();
		for (let o = binaryAt(peek(), level); o; o = binaryAt(peek(), level)) {
			at++;
			node = op(o, BINARY[o], [node, operand()]);
		}
		return node;
	};
	const addSubtract = (): ReadNode => leftChain('add', multiplyDivide);
	const multiplyDivide = (): ReadNode => leftChain('multiply', unary);
	const unary = (): ReadNode => {
		const t = peek();
		if (t && t.kind === 'op' && (t.text === '-' || t.text === '+')) {
			if (++depth > MAX_DEPTH) throw new NotThisForm();
			at++;
			const inner = unary();
			depth--;
			return op(t.text, UNARY[t.text], [inner]);
		}
		return pow();
	};
	const pow = (): ReadNode => {
		const node = primary();
		if (isOp(peek(), '^')) {
			// a ^ chain nests to the right, like parentheses: bounded the same way
			if (++depth > MAX_DEPTH) throw new NotThisForm();
			at++;
			const exponent = unary();
			depth--;
			return op('^', 'pow', [node, exponent]);
		}
		return node;
	};
	const primary = (): ReadNode => {
		const t = peek();
		if (!t) throw new NotThisForm();
		let node: ReadNode;
		if (t.kind === 'num') {
			at++;
			node = { type: 'ConstantNode', value: BigInt(t.text) };
		} else if (t.kind === 'name') {
			if (RESERVED.has(t.text)) throw new NotThisForm();
			at++;
			node = { type: 'SymbolNode', name: t.text };
		} else if (t.text === '(') {
			if (++depth > MAX_DEPTH) throw new NotThisForm();
			at++;
			const content = addSubtract();
			if (!isOp(peek(), ')')) throw new NotThisForm();
			at++;
			depth--;
			node = { type: 'ParenthesisNode', content };
		} else throw new NotThisForm();
		// What may follow a complete operand here: a binary operator, `^`, `)` or the end. Anything
		// else (a name, a number, `(`: an implicit product or a call) is mathjs's to read.
		const next = peek();
		if (next && next.kind !== 'op' && !(next.kind === 'name' && next.text === 'mod')) throw new NotThisForm();
		if (next && isOp(next, '(')) throw new NotThisForm();
		return node;
	};
	try {
		const tree = addSubtract();
		return at === ts.length ? tree : null;
	} catch (e) {
		if (e instanceof NotThisForm) return null;
		throw e;
	}
}
