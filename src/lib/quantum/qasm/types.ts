/**
 * Public types of the OpenQASM importer (options, limits, results, origins), shared by the
 * parser (`parser.ts`), the expansion of gate calls (`expand.ts`), the gate items it makes
 * (`emit.ts`) and the entry point (`import.ts`, which re-exports them).
 * Qubit order: q[0] of a register is its bit 0 (LSB); angles in the document are in turns.
 */
import { MAX_BODY_ITEMS, type CircuitDocument, type SourcePosition } from '../circuit.js';
import type { PeepholeReport } from './peephole.js';

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
	/** Top-level items of the document (default MAX_BODY_ITEMS, all a document holds; the import bench raises it to read a larger file). */
	maxItems: number;
}

/** Default bounds: 1024 qubits, 1 000 000 gates after expansion, 4 MB of text, gate calls nested 64 deep, 200 000 expanded calls, 100 000 top-level items. */
export const DEFAULT_QASM_LIMITS: QasmLimits = { maxQubits: 1024, maxGates: 1_000_000, maxBytes: 4_000_000, maxDepth: 64, maxCalls: 200_000, maxItems: MAX_BODY_ITEMS };

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

