/**
 * Hand-written lexer for OpenQASM 2.0 and 3.0 source text. Positions are 1-based line and column
 * (columns count UTF-16 code units, as editors do for the characters used here).
 */

/** Token kinds produced by {@link lexQasm}. */
export type TokenKind = 'ident' | 'int' | 'float' | 'string' | 'punct' | 'eof';

/** One token with its source position and its offset range in the text. */
export interface Token {
	kind: TokenKind;
	text: string;
	line: number;
	column: number;
	start: number;
	end: number;
}

/** A problem in an OpenQASM file, printed as `file:line:column: message`. */
export class QasmError extends Error {
	constructor(
		readonly line: number,
		readonly column: number,
		readonly detail: string,
		readonly file = '<input>'
	) {
		super(`${file}:${line}:${column}: ${detail}`);
		this.name = 'QasmError';
	}
	/** Same error attributed to another file name. */
	withFile(file: string): QasmError {
		return new QasmError(this.line, this.column, this.detail, file);
	}
}

// Longest first, so `**` wins over `*` and `->` over `-`.
const PUNCT = ['**', '->', '==', '!=', '<=', '>=', '<<', '>>', '&&', '||', '++', '+=', '-=', '*=', '/=', ';', ',', '(', ')', '[', ']', '{', '}', '@', ':', '+', '-', '*', '/', '^', '%', '<', '>', '=', '!', '~', '&', '|', '.'];
const PUNCT_BY_FIRST = new Map<number, string[]>();
for (const p of PUNCT) {
	const c = p.charCodeAt(0);
	if (!PUNCT_BY_FIRST.has(c)) PUNCT_BY_FIRST.set(c, []);
	PUNCT_BY_FIRST.get(c)!.push(p);
}

// A-Z a-z _ Greek (U+0370–U+03FF) ℇ (U+2107); digits continue an identifier.
const isIdentStartCode = (c: number) => (c >= 97 && c <= 122) || (c >= 65 && c <= 90) || c === 95 || (c >= 0x370 && c <= 0x3ff) || c === 0x2107;
const isDigit = (c: number) => c >= 48 && c <= 57;
const isIdentPartCode = (c: number) => isIdentStartCode(c) || isDigit(c);

/** Split OpenQASM text into tokens, skipping `//` and `/* … *\/` comments; ends with an `eof` token. */
export function lexQasm(text: string): Token[] {
	const tokens: Token[] = [];
	let i = 0;
	let line = 1;
	let lineStart = 0; // offset of the current line's first character (column = i − lineStart + 1)
	const n = text.length;
	while (i < n) {
		const c = text.charCodeAt(i);
		if (c === 10) {
			i++;
			line++;
			lineStart = i;
			continue;
		}
		if (c === 32 || c === 9 || c === 13 || c === 12 || c === 11 || c === 0xfeff) {
			i++;
			continue;
		}
		const col = i - lineStart + 1;
		if (c === 47 && text.charCodeAt(i + 1) === 47) {
			while (i < n && text.charCodeAt(i) !== 10) i++;
			continue;
		}
		if (c === 47 && text.charCodeAt(i + 1) === 42) {
			const l0 = line;
			i += 2;
			while (i < n && !(text.charCodeAt(i) === 42 && text.charCodeAt(i + 1) === 47)) {
				if (text.charCodeAt(i) === 10) {
					line++;
					lineStart = i + 1;
				}
				i++;
			}
			if (i >= n) throw new QasmError(l0, col, 'unterminated comment: expected "*/" before the end of the file');
			i += 2;
			continue;
		}
		const start = i;
		if (isIdentStartCode(c)) {
			let j = i + 1;
			while (j < n && isIdentPartCode(text.charCodeAt(j))) j++;
			tokens.push({ kind: 'ident', text: text.slice(i, j), line, column: col, start, end: j });
			i = j;
			continue;
		}
		if (isDigit(c) || (c === 46 && isDigit(text.charCodeAt(i + 1)))) {
			// digits[_digits] [. digits] [e[+-]digits]
			let j = i;
			let isFloat = false;
			let underscore = false;
			while (j < n && (isDigit(text.charCodeAt(j)) || (text.charCodeAt(j) === 95 && j > i))) {
				if (text.charCodeAt(j) === 95) underscore = true;
				j++;
			}
			if (text.charCodeAt(j) === 46) {
				isFloat = true;
				j++;
				while (j < n && isDigit(text.charCodeAt(j))) j++;
			}
			const e = text.charCodeAt(j);
			if (e === 101 || e === 69) {
				let k = j + 1;
				const sign = text.charCodeAt(k);
				if (sign === 43 || sign === 45) k++;
				if (isDigit(text.charCodeAt(k))) {
					while (k < n && isDigit(text.charCodeAt(k))) k++;
					j = k;
					isFloat = true;
				}
			}
			if (j - i > 400) throw new QasmError(line, col, 'number is too long');
			if (j < n && isIdentStartCode(text.charCodeAt(j))) {
				throw new QasmError(line, col, `malformed number "${text.slice(i, j + 1)}": expected digits, a decimal point or an exponent`);
			}
			const raw = text.slice(i, j);
			tokens.push({ kind: isFloat ? 'float' : 'int', text: underscore ? raw.replace(/_/g, '') : raw, line, column: col, start, end: j });
			i = j;
			continue;
		}
		if (c === 34 || c === 39) {
			let j = i + 1;
			while (j < n && text.charCodeAt(j) !== c && text.charCodeAt(j) !== 10) j++;
			if (j >= n || text.charCodeAt(j) !== c) throw new QasmError(line, col, `unterminated string: expected a closing ${text[i]} on the same line`);
			tokens.push({ kind: 'string', text: text.slice(i + 1, j), line, column: col, start, end: j + 1 });
			i = j + 1;
			continue;
		}
		const cands = PUNCT_BY_FIRST.get(c);
		let p: string | undefined;
		if (cands) for (const x of cands) if (x.length === 1 || text.startsWith(x, i)) {
			p = x;
			break;
		}
		if (p) {
			tokens.push({ kind: 'punct', text: p, line, column: col, start, end: i + p.length });
			i += p.length;
			continue;
		}
		throw new QasmError(line, col, `unexpected character "${String.fromCodePoint(text.codePointAt(i)!)}"`);
	}
	tokens.push({ kind: 'eof', text: '', line, column: i - lineStart + 1, start: n, end: n });
	return tokens;
}
