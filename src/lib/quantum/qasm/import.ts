/**
 * OpenQASM 2.0 / 3.0 → circuit document: the entry point. The file is read by `parser.ts`
 * (statements, declarations, OpenQASM 3 control flow), each gate call expanded by `expand.ts`
 * (definitions, modifiers) from the standard gates of `gates.ts` (citing the specification's
 * `qelib1.inc` and `stdgates.inc`) and turned into document gate items by `emit.ts`; then
 * decomposed gates are recognised (`peephole.ts`) and `let` aliases become registers
 * (`register-map.ts`). Every produced gate item carries the top-level call site as `source`
 * (1-based line, column).
 *
 * Qubit order: a qreg / qubit[n] register becomes a document register with q[0] as bit 0 (LSB).
 * Angles: radian expressions in the file; rational multiples of π with a power-of-two denominator
 * are kept exact (stored as `"k/2^m turn"`), everything else as a float in turns (`"~0.123"`).
 */
import { lexQasmStream, QasmError, type TokenStream } from './lexer.js';
import { documentWithBody } from './emit.js';
import { recogniseIn, type PeepholeReport } from './peephole.js';
import { applyRegisterMap, RegisterMapError, type RegisterMapEntry } from './register-map.js';
import { Reader } from './parser.js';
import { DEFAULT_QASM_LIMITS, type GateOrigin, type QasmImport, type QasmImportOptions } from './types.js';

export { angleText } from './emit.js';
export { DEFAULT_QASM_LIMITS, type GateOrigin, type PrintedAngleStats, type QasmImport, type QasmImportOptions, type QasmLimits, type QasmWarning } from './types.js';

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
	// Lexed as the reader goes (see TokenStream); a lexical error anywhere still wins over a reading error.
	const tokens: TokenStream = lexQasmStream(text);
	const r = new Reader(tokens, file, limits, options.defaultVersion ?? 3);
	r.exactDecimals = options.exactDecimals ?? true;
	r.params = new Map(Object.entries(options.params ?? {}));
	try {
		r.run();
	} catch (e) {
		try {
			tokens.lexToEnd();
		} catch (lexical) {
			if (lexical instanceof QasmError) throw lexical.withFile(file);
			throw lexical;
		}
		if (e instanceof QasmError) throw e.file === file ? e : e.withFile(file);
		// Statements place their own RangeErrors; anything left is placed at the end of the file read.
		if (e instanceof RangeError) {
			const last = tokens.at(tokens.length - 1);
			throw new QasmError(last.line, last.column, e.message, file);
		}
		throw e;
	}
	const title = options.title ?? file.replace(/^.*[\\/]/, '').replace(/\.(qasm3?|inc)$/i, '');
	let document = r.documentOf(title);
	// Origins are made when first read (the command line reads them; the upload path does not).
	let origins = (): GateOrigin[] => r.origins;
	const notes: string[] = [];
	const d = r.decimals;
	if (d.exact) notes.push(`${d.exact} printed angle${d.exact === 1 ? '' : 's'} read as exact k/2^m turn (largest difference ${d.largestDifferenceRadians.toExponential(2)} rad)`);
	if (d.inexact) notes.push(`${d.inexact} printed angle${d.inexact === 1 ? '' : 's'} fit no k/2^m turn${r.exactDecimals ? '' : ' (exact reading of decimals is off)'} and stay inexact`);
	let decompositions: PeepholeReport | undefined;
	// The body's length, and per item the reader's entry it came from when the recogniser rewrote the body.
	let bodyLength = r.emitter.length;
	let from: Int32Array | null = null;
	if (options.recogniseDecompositions ?? true) {
		// Read in place: the emitter's columns, no items made (see GateEmitter).
		const p = recogniseIn(r.emitter, document.registers);
		decompositions = p.report;
		if (p.report.regions || p.report.toffolis || p.report.toffoliPhases || p.report.cancelledPairs) {
			// Made when read, like the reader's (the old body is not read here).
			const { format, version, title, registers, blocks } = document;
			document = documentWithBody({ format, version, title, registers }, blocks, () => p.items());
			from = p.from;
			bodyLength = p.length;
			origins = () => Array.from(p.from, (i) => r.emitter.originAt(i));
			const parts: string[] = [];
			if (p.report.regions) parts.push(`${p.report.regions} CNOT region${p.report.regions === 1 ? '' : 's'} read as diagonal phase gates`);
			if (p.report.toffolis) parts.push(`${p.report.toffolis} Toffoli network${p.report.toffolis === 1 ? '' : 's'} read as ccx`);
			if (p.report.toffoliPhases)
				parts.push(`${p.report.toffoliPhases} Toffoli pair${p.report.toffoliPhases === 1 ? '' : 's'} around a phase on an ancilla read as doubly controlled phases (exact; terms on the ancilla vanish while it is |0⟩)`);
			if (p.report.cancelledPairs) parts.push(`${p.report.cancelledPairs} pair${p.report.cancelledPairs === 1 ? '' : 's'} of opposite phases cancelled`);
			notes.push(`decomposed gates recognised: ${parts.join(', ')}${p.report.rzAsPhase ? ` (rz read as p: equal up to a global phase)` : ''}`);
		}
		if (p.report.stoppedAtLimit) notes.push('recognition of decomposed gates stopped at its work limit; the rest of the file is read as written');
	}
	// A document holds at most MAX_BODY_ITEMS items: name the gate that crosses it (the schema would only say "body").
	if (bodyLength > limits.maxItems) {
		const at = r.emitter.originAt(from ? from[limits.maxItems] : limits.maxItems).call;
		throw new QasmError(
			at.line,
			at.column,
			`more than ${limits.maxItems} top-level gates: a circuit holds at most ${limits.maxItems} items; write repeated parts as gate definitions, loops or broadcasts`,
			file
		);
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
			const m = applyRegisterMap(document, entries, { unmapped: 'keep' });
			document = m.document;
			notes.push(`let aliases read as registers: ${entries.map((e) => e.name).join(', ')}`, ...m.notes);
		} catch (e) {
			if (!(e instanceof RegisterMapError)) throw e;
			const at = e.entry >= 0 ? r.topLets.find((l) => l.name === entries[e.entry].name)!.tok : r.topLets[0].tok;
			r.warnings.push({ line: at.line, column: at.column, message: `let aliases kept as aliases, not registers: ${e.message}` });
		}
	}
	let made: GateOrigin[] | undefined;
	return {
		document,
		version: r.version,
		warnings: r.warnings,
		get origins() {
			return (made ??= origins());
		},
		set origins(v: GateOrigin[]) {
			made = v;
		},
		decimals: d,
		decompositions,
		notes
	};
}
