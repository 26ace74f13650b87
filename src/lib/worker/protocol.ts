// Messages between the workbench page and its engine worker. Everything here is structured-
// clone friendly (BigInt included). Qubit order: flat index, register[index] with 0 = LSB.
// Angles in the view types are turns: a number for drawing and an exact text such as "5/16".
import type { CircuitDocument } from '$lib/quantum/circuit';
import type { DialQubit } from '$lib/dials/dial-model';
import type { CheckReport, ResourceCounts } from '$lib/quantum/check/index';
import type { ModularFigures } from '$lib/quantum/check/modular-resources';

export interface RunRequestInputs {
	/** Decimal (or 0b… binary) value per register. */
	values: Record<string, string>;
	superposed: string[];
}

/** A breakpoint kept in the page: on a gate (stop before it runs), a block boundary, or a condition. */
export type BreakpointSpec =
	| { id: string; kind: 'gate'; gate: number; note?: string }
	| { id: string; kind: 'block'; itemId: string; at: 'start' | 'end'; note?: string }
	| { id: string; kind: 'divergence'; qubit: number | null; tolerance: number; note?: string }
	| { id: string; kind: 'entangled'; qubit: number | null; note?: string };

export type SeekKind = 'into' | 'back' | 'over' | 'out' | 'next-boundary' | 'prev-boundary' | 'divergence' | 'breakpoint' | 'start' | 'end';

export type WorkerRequest =
	/** With `preview`, step 0 is sent first and the run is computed once the page says it drew it ('drawn'). */
	| { id: number; type: 'load'; doc: CircuitDocument; inputs: RunRequestInputs; keyframeInterval?: number; preview?: boolean }
	/** The page has drawn the preview of the last load: compute its run now (no answer of its own). */
	| { id: number; type: 'drawn' }
	| { id: number; type: 'frame'; step: number }
	| { id: number; type: 'ledger'; qubit: number; step: number }
	| { id: number; type: 'seek'; from: number; kind: SeekKind; breakpoints?: BreakpointSpec[] }
	| { id: number; type: 'gates'; from: number; to: number }
	| { id: number; type: 'check'; doc: CircuitDocument; inputs: CheckInputChoice; ignorePhase?: boolean };

/** Which inputs a check covers: every basis input, a seeded random sample, or the automatic choice. */
export type CheckInputChoice = { mode: 'auto' } | { mode: 'all' } | { mode: 'random'; count: number; seed: number };

export interface BlockView {
	index: number;
	parent: number;
	depth: number;
	itemId: string;
	kind: string;
	label: string;
	start: number;
	end: number;
	effect: string | null;
}

export interface RunSummary {
	title: string;
	qubitCount: number;
	gateCount: number;
	lastStep: number;
	registers: { name: string; size: number; offset: number; role?: string }[];
	blocks: BlockView[];
	boundaries: number[];
	firstDivergence: { step: number; qubit: number; label: string; message: string } | null;
	divergenceCount: number;
	/** How many expectations the run states after step 0 (the inputs): expected Fourier angles and expected bits. */
	stated: { angles: number; bits: number };
	handover: { step: number; reason: string } | null;
	stopped: { step: number; reason: string } | null;
	warnings: string[];
	keyframeChecksums: { step: number; checksum: string }[];
	resources: ResourceCounts;
	/** Formula against lowered counts for each top-level modular part, with published qubit counts. */
	modular: ModularFigures[];
	millis: number;
}

/** The position a step stands at: the gate it just ran and where that gate came from. */
export interface PositionView {
	step: number;
	gateIndex: number | null;
	gateText: string | null;
	blockPath: { index: number; label: string; kind: string }[];
	itemId: string | null;
	loop: Record<string, number>;
	source: { line: number; column: number } | null;
}

export interface FrameView {
	step: number;
	engine: 'ledger' | 'amplitudes';
	handover: { step: number; reason: string } | null;
	position: PositionView;
	qubits: DialQubit[];
	/** Register values (decimal) when classical, else null. */
	registerValues: Record<string, string | null>;
	distributions: Record<string, number[]>;
	checksum: string;
	/** Qubits whose fresh expectation fails at this step. */
	diverged: number[];
}

/** Where one failing input of a check first leaves its expected angles (null: nowhere stated). */
export interface FailureDivergence {
	step: number;
	qubit: string;
	gate: string;
	line: number | null;
}

export interface LedgerRow {
	step: number;
	gate: number;
	gateText: string;
	block: string | null;
	kind: string;
	amount: string | null;
	total: string | null;
	expected: string | null;
	parted: boolean;
}

export interface LedgerView {
	qubit: number;
	label: string;
	rows: LedgerRow[];
	firstParted: number | null;
	truncated: boolean;
}

export type WorkerResponse =
	| { id: number; type: 'loaded'; summary: RunSummary; frame: FrameView }
	| { id: number; type: 'frame'; frame: FrameView }
	| { id: number; type: 'ledger'; ledger: LedgerView }
	| { id: number; type: 'seek'; step: number; reason: string | null; breakpointId: string | null }
	| { id: number; type: 'gates'; gates: GateRow[]; truncated: boolean }
	| { id: number; type: 'progress'; done: number; total: number }
	/** Step 0 of a load, before the run through every gate is done (the 'loaded' answer follows). */
	| { id: number; type: 'preview'; frame: FrameView }
	| { id: number; type: 'checked'; report: CheckReport; millis: number; firstDivergences: (FailureDivergence | null)[] }
	| { id: number; type: 'error'; message: string; path?: string };

export interface GateRow {
	index: number;
	text: string;
	line: number | null;
}
