/**
 * The types a run hands out: its inputs and options, what a qubit holds and is expected to hold,
 * frames, ledger entries and divergences. Qubit order: flat (register offset + index, index 0 =
 * LSB); angles in turns.
 */
import type { Angle, SignedAngle } from '../angle.js';
import type { GateView } from '../circuit.js';
import type { ContributionKind } from '../ledger.js';
import type { FourierSection, RegisterIntent } from '../intent.js';

/** Inputs of a run: basis value per register (default 0), or registers in uniform superposition. */
export interface RunInputs {
	values?: Record<string, bigint | number | string>;
	/** Registers prepared in the uniform superposition Σ_x |x⟩/√(2^n) (forces the amplitude engine). */
	superposed?: string[];
}

/** Options of a run. */
export interface RunOptions {
	/** Keyframe every K steps (default 1024) on the ledger; amplitude keyframes are spaced to fit `amplitudeKeyframeBytes`. */
	keyframeInterval?: number;
	/** Amplitude engine qubit limit (default 24, browser; 26 is the server default). */
	maxAmplitudeQubits?: number;
	/** Memory budget for amplitude keyframes (default 256 MiB). */
	amplitudeKeyframeBytes?: number;
	/** Force the amplitude engine from step 0 (for cross-checks). */
	engine?: 'auto' | 'amplitudes';
	/** Tolerance in turns (and for Bloch components) when a float state is compared (default 1e-9). */
	tolerance?: number;
	/** Intended final values of registers (from specs): expected angles inside hand-written Fourier sections. */
	intents?: RegisterIntent[];
	/** Fourier sections found from raw gates (imported files), in addition to QFT blocks. */
	intentSections?: FourierSection[];
	/** Simulate only up to this step (for {@link firstFrame}); a Run always goes to the end. */
	untilStep?: number;
}

/** What one qubit holds in a frame. Angles in turns. */
export type QubitState =
	| { kind: 'classical'; bit: 0 | 1 }
	| { kind: 'fourier'; angle: Angle; turns: string; radians: string }
	| { kind: 'mixed'; bloch: [number, number, number]; length: number };

/** What one qubit is expected to hold (from block effects); Fourier: (num mod 2^level)/2^level turn. */
export type ExpectedState =
	| { kind: 'classical'; bit: 0 | 1; note?: string }
	| { kind: 'fourier'; level: number; value: bigint; angle: Angle; note?: string };

/** One qubit in a frame (flat index, register and bit index with 0 = LSB). */
export interface QubitFrame {
	qubit: number;
	register: string;
	index: number;
	state: QubitState;
	expected: ExpectedState | null;
	/** Step at which the expectation was stated. */
	expectedStep: number | null;
	/** True when no gate touched the qubit since `expectedStep` (only then do mismatches count). */
	fresh: boolean;
	/** actual − expected in (−½, ½] turn, for Fourier vs Fourier; exact when both exact. */
	divergence: SignedAngle | null;
	/** null when nothing is expected; otherwise whether actual matches expected. */
	matches: boolean | null;
}

/** Serialisable frame at one step (qubit order: flat; angles in turns). */
export interface TraceFrame {
	step: number;
	/** Gate just applied (step − 1), null at step 0. */
	gate: GateView | null;
	engine: 'ledger' | 'amplitudes';
	handover: { step: number; reason: string } | null;
	qubits: QubitFrame[];
	/** Register values when every qubit of the register is classical. */
	registerValues: Record<string, bigint | null>;
	/** Marginal distributions (amplitude engine, registers up to 12 qubits). */
	distributions: Record<string, number[]>;
	/** Block instances containing this step (start < step < end, or start ≤ step for a block starting here), outermost first. */
	blockPath: number[];
	checksum: string;
}

/** One ledger entry of a qubit: a contribution and the running total (turns). */
export interface LedgerEntry {
	step: number;
	gate: number;
	kind: keyof typeof ContributionKind;
	amount: Angle | null;
	total: Angle | null;
	expected: Angle | null;
	parted: boolean;
}

/** A mismatch between actual and expected, found while running. */
export interface DivergenceRecord {
	step: number;
	qubit: number;
	boundary: boolean;
	divergence: SignedAngle | null;
	message: string;
	/** Set on a failed reset claim (the qubit was not |0⟩ at a reset), with the probability of 1 there. */
	reset?: { p1: number };
}
