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

/** Punctuation by char code where the character begins no longer punctuation (`;` `,` `(` …). */
const SINGLE_PUNCT: (string | undefined)[] = new Array(128).fill(undefined);
for (const p of PUNCT) if (p.length === 1 && PUNCT_BY_FIRST.get(p.charCodeAt(0))!.length === 1) SINGLE_PUNCT[p.charCodeAt(0)] = p;

// A-Z a-z _ Greek (U+0370–U+03FF) ℇ (U+2107); digits continue an identifier.
const isIdentStartCode = (c: number) => (c >= 97 && c <= 122) || (c >= 65 && c <= 90) || c === 95 || (c >= 0x370 && c <= 0x3ff) || c === 0x2107;
const isDigit = (c: number) => c >= 48 && c <= 57;
const isIdentPartCode = (c: number) => isIdentStartCode(c) || isDigit(c);

/** Split OpenQASM text into tokens, skipping `//` and `/* … *\/` comments; ends with an `eof` token. */
export function lexQasm(text: string): Token[] {
	const s = lexQasmStream(text);
	s.lexToEnd();
	const out: Token[] = new Array(s.length);
	for (let i = 0; i < s.length; i++) out[i] = s.at(i);
	return out;
}

const KIND_CODE: Record<TokenKind, number> = { ident: 0, int: 1, float: 2, string: 3, punct: 4, eof: 5 };
const KIND_OF: TokenKind[] = ['ident', 'int', 'float', 'string', 'punct', 'eof'];
const CACHE = 1024;
const INITIAL_CAPACITY = 4096;

/**
 * The tokens of a text in typed arrays (kind, offsets, line, column), lexed on demand: the reader
 * asks for token i ({@link TokenStream.at}) and the text is read up to it. A token object is made
 * only when the reader looks at it (recent ones are cached, so peeking is cheap). The reader's
 * fast path for plain gate calls (`parser.ts`) reads those statements straight from the text and
 * moves the lexer past them ({@link TokenStream.skipTo}), so they cost no tokens at all.
 * Lexical errors keep their priority over the reader's: `importQasm` lexes the rest of the file
 * ({@link TokenStream.lexToEnd}) before it reports a reading error, as when the file was lexed first.
 */
export class TokenStream {
	/** Tokens lexed so far (the last one is `eof` once {@link done}). */
	length = 0;
	/** True once the `eof` token is lexed. */
	done = false;
	/** Where the lexer stands: offset in the text, line, and the offset where that line starts. */
	offset = 0;
	line = 1;
	lineStart = 0;
	private kinds = new Uint8Array(INITIAL_CAPACITY);
	private starts = new Int32Array(INITIAL_CAPACITY);
	private ends = new Int32Array(INITIAL_CAPACITY);
	private lines = new Int32Array(INITIAL_CAPACITY);
	private cols = new Int32Array(INITIAL_CAPACITY);
	/** Token texts that are not the source slice (numbers with `_`, strings, eof). */
	private readonly texts = new Map<number, string>();
	private readonly cache: (Token | undefined)[] = new Array(CACHE);
	private readonly cached = new Int32Array(CACHE).fill(-1);

	constructor(readonly text: string) {}

	/** Append a token; `text` only when it is not `source.slice(start, end)`. */
	push(kind: TokenKind, start: number, end: number, line: number, column: number, text?: string): void {
		const i = this.length;
		if (i === this.kinds.length) this.grow();
		this.kinds[i] = KIND_CODE[kind];
		this.starts[i] = start;
		this.ends[i] = end;
		this.lines[i] = line;
		this.cols[i] = column;
		if (text !== undefined) this.texts.set(i, text);
		this.length = i + 1;
	}

	private grow(): void {
		const cap = this.kinds.length * 2;
		const g = <T extends Uint8Array | Int32Array>(a: T, make: (n: number) => T): T => {
			const b = make(cap);
			b.set(a);
			return b;
		};
		this.kinds = g(this.kinds, (n) => new Uint8Array(n));
		this.starts = g(this.starts, (n) => new Int32Array(n));
		this.ends = g(this.ends, (n) => new Int32Array(n));
		this.lines = g(this.lines, (n) => new Int32Array(n));
		this.cols = g(this.cols, (n) => new Int32Array(n));
	}

	/** Token `i` (i ≥ 0), lexing up to it; past the end of the file, the `eof` token. */
	at(i: number): Token {
		while (i >= this.length) {
			if (this.done) {
				i = this.length - 1;
				break;
			}
			lexNext(this);
		}
		const slot = i & (CACHE - 1);
		if (this.cached[slot] === i) return this.cache[slot]!;
		const start = this.starts[i];
		const end = this.ends[i];
		const t: Token = { kind: KIND_OF[this.kinds[i]], text: this.texts.get(i) ?? this.text.slice(start, end), line: this.lines[i], column: this.cols[i], start, end };
		this.cache[slot] = t;
		this.cached[slot] = i;
		return t;
	}

	/** Lex the rest of the text (throws its first lexical error); returns the token count. */
	lexToEnd(): number {
		while (!this.done) lexNext(this);
		return this.length;
	}

	/**
	 * Move the lexer past text the caller has read itself (only when no token is lexed beyond the
	 * caller's position): `offset` is the next character, on `line` starting at `lineStart`.
	 */
	skipTo(offset: number, line: number, lineStart: number): void {
		this.offset = offset;
		this.line = line;
		this.lineStart = lineStart;
	}
}

/** Split OpenQASM text into a {@link TokenStream}, lexed as it is read. */
export function lexQasmStream(text: string): TokenStream {
	return new TokenStream(text);
}

/** Lex one token (skipping whitespace and comments) at the stream's position; the `eof` token at the end. */
function lexNext(tokens: TokenStream): void {
	const text = tokens.text;
	let i = tokens.offset;
	let line = tokens.line;
	let lineStart = tokens.lineStart; // offset of the current line's first character (column = i − lineStart + 1)
	const n = text.length;
	const before = tokens.length;
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
			tokens.push('ident', start, j, line, col);
			i = j;
			break;
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
				let k = j;
				while (k < n && k - i < 40 && isIdentPartCode(text.charCodeAt(k))) k++;
				throw new QasmError(line, col, `malformed number "${text.slice(i, k)}": expected digits, a decimal point or an exponent`);
			}
			tokens.push(isFloat ? 'float' : 'int', start, j, line, col, underscore ? text.slice(i, j).replace(/_/g, '') : undefined);
			i = j;
			break;
		}
		if (c === 34 || c === 39) {
			let j = i + 1;
			while (j < n && text.charCodeAt(j) !== c && text.charCodeAt(j) !== 10) j++;
			if (j >= n || text.charCodeAt(j) !== c) throw new QasmError(line, col, `unterminated string: expected a closing ${text[i]} on the same line`);
			tokens.push('string', start, j + 1, line, col, text.slice(i + 1, j));
			i = j + 1;
			break;
		}
		// Most punctuation is one character that starts no longer one: no search.
		let p: string | undefined = c < 128 ? SINGLE_PUNCT[c] : undefined;
		if (p === undefined) {
			const cands = PUNCT_BY_FIRST.get(c);
			if (cands)
				for (const x of cands)
					if (x.length === 1 || text.startsWith(x, i)) {
						p = x;
						break;
					}
		}
		if (p) {
			tokens.push('punct', start, i + p.length, line, col);
			i += p.length;
			break;
		}
		throw new QasmError(line, col, `unexpected character "${String.fromCodePoint(text.codePointAt(i)!)}"`);
	}
	if (i >= n && tokens.length === before) {
		tokens.push('eof', n, n, line, i - lineStart + 1, '');
		tokens.done = true;
	}
	tokens.offset = i;
	tokens.line = line;
	tokens.lineStart = lineStart;
}
