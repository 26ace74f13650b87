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

const isIdentStart = (ch: string) => /[A-Za-z_\u0370-\u03ff\u2107]/.test(ch);
const isIdentPart = (ch: string) => /[A-Za-z0-9_\u0370-\u03ff\u2107]/.test(ch);

/** Split OpenQASM text into tokens, skipping `//` and `/* … *\/` comments; ends with an `eof` token. */
export function lexQasm(text: string): Token[] {
	const tokens: Token[] = [];
	let i = 0;
	let line = 1;
	let col = 1;
	const n = text.length;
	const advance = (count: number) => {
		for (let k = 0; k < count; k++) {
			if (text[i] === '\n') {
				line++;
				col = 1;
			} else col++;
			i++;
		}
	};
	while (i < n) {
		const ch = text[i];
		if (ch === ' ' || ch === '\t' || ch === '\r' || ch === '\n' || ch === '\f' || ch === '\v' || ch === '\ufeff') {
			advance(1);
			continue;
		}
		if (ch === '/' && text[i + 1] === '/') {
			while (i < n && text[i] !== '\n') advance(1);
			continue;
		}
		if (ch === '/' && text[i + 1] === '*') {
			const l0 = line;
			const c0 = col;
			advance(2);
			while (i < n && !(text[i] === '*' && text[i + 1] === '/')) advance(1);
			if (i >= n) throw new QasmError(l0, c0, 'unterminated comment: expected "*/" before the end of the file');
			advance(2);
			continue;
		}
		const start = i;
		const l = line;
		const c = col;
		if (isIdentStart(ch)) {
			let j = i + 1;
			while (j < n && isIdentPart(text[j])) j++;
			tokens.push({ kind: 'ident', text: text.slice(i, j), line: l, column: c, start, end: j });
			advance(j - i);
			continue;
		}
		if (/[0-9]/.test(ch) || (ch === '.' && /[0-9]/.test(text[i + 1] ?? ''))) {
			const m = /^(?:\d[\d_]*)?(?:\.\d*)?(?:[eE][+-]?\d+)?/.exec(text.slice(i, i + 400));
			let s = m ? m[0] : ch;
			if (s === '') s = ch;
			const isFloat = /[.eE]/.test(s);
			const after = text[i + s.length] ?? '';
			if (isIdentStart(after)) {
				throw new QasmError(l, c, `malformed number "${s}${after}": expected digits, a decimal point or an exponent`);
			}
			tokens.push({ kind: isFloat ? 'float' : 'int', text: s.replace(/_/g, ''), line: l, column: c, start, end: i + s.length });
			advance(s.length);
			continue;
		}
		if (ch === '"' || ch === "'") {
			let j = i + 1;
			while (j < n && text[j] !== ch && text[j] !== '\n') j++;
			if (j >= n || text[j] !== ch) throw new QasmError(l, c, `unterminated string: expected a closing ${ch} on the same line`);
			tokens.push({ kind: 'string', text: text.slice(i + 1, j), line: l, column: c, start, end: j + 1 });
			advance(j + 1 - i);
			continue;
		}
		const p = PUNCT.find((x) => text.startsWith(x, i));
		if (p) {
			tokens.push({ kind: 'punct', text: p, line: l, column: c, start, end: i + p.length });
			advance(p.length);
			continue;
		}
		throw new QasmError(l, c, `unexpected character "${ch}"`);
	}
	tokens.push({ kind: 'eof', text: '', line, column: col, start: n, end: n });
	return tokens;
}
