/**
 * Lowering: circuit document → {@link LoweredCircuit} (flat qubits, gates with provenance, block
 * instances with their stated effects).
 *
 * Conventions (qubit order: index 0 = LSB; flat qubit = register offset + index; angles in turns):
 * - QFT (no swaps), time order: for i = n−1 … 0: H(q_i), then for k = i−1 … 0: cp(q_k → q_i,
 *   1/2^(i−k+1) turn). Afterwards qubit i holds x/2^(i+1) turn (layout `unswapped`, level i+1).
 *   With swaps, swap(q_l, q_(n−1−l)) for l < ⌊n/2⌋ follows and qubit i holds x/2^(n−i) turn
 *   (layout `swapped`, level n−i); the whole circuit is then exactly the DFT
 *   F|x⟩ = Σ_k ω^(xk)|k⟩/√N with k read little-endian.
 * - Inverse QFT is the exact reverse with negated angles.
 * - Fourier add b += 2^t·a: for each target qubit j (level m) and each source bit k with
 *   k + t < m, a rotation by 1/2^(m−k−t) turn controlled by a_k (and by the add's control, which
 *   makes it a doubly controlled phase lowered by `ccpLowering`).
 */
import { DEFAULT_LIMITS, type CcpLowering, type CircuitDocument, type LoweredCircuit, type LoweringLimits, type PlacedRegister } from './circuit.js';
import { readCircuitDocument } from './schema.js';
import { rootEnv, type LowerContext } from './lower/context.js';
import { lowerBody } from './lower/items.js';
import { GateSink, LoweringError } from './lower/sink.js';

export { LoweringError };

/** Options of {@link lowerCircuit}. */
export interface LoweringOptions {
	limits?: Partial<LoweringLimits>;
	/** Overrides the document's default ccp lowering for items that do not set one. */
	ccpLowering?: CcpLowering;
	/** Skip schema validation (the caller already validated). */
	trusted?: boolean;
}

/**
 * Lower a circuit document (validated first unless `trusted`) to a flat {@link LoweredCircuit}.
 * Qubit order: flat = register offset + index (index 0 = LSB); gate angles in turns.
 */
export function lowerCircuit(input: CircuitDocument | unknown, options: LoweringOptions = {}): LoweredCircuit {
	const doc = options.trusted ? (input as CircuitDocument) : readCircuitDocument(input);
	const limits = { ...DEFAULT_LIMITS, ...options.limits };
	const registers = placeRegisters(doc, limits);
	const ctx: LowerContext = {
		sink: new GateSink(limits.maxGates),
		registers,
		regByName: new Map(registers.map((r) => [r.name, r])),
		userBlocks: new Map((doc.blocks ?? []).map((b) => [b.name, b])),
		defaultCcp: options.ccpLowering ?? doc.defaults?.ccpLowering ?? 'native',
		defaultLayout: doc.defaults?.layout ?? 'unswapped',
		ancillaReg: registers.find((r) => r.role === 'ancilla'),
		limits,
		calls: 0,
		ccpAngles: new Map(),
		unitAngles: []
	};
	lowerBody(ctx, doc.body, rootEnv(), 'body');
	return finish(doc, ctx);
}

/** Registers one after another in the flat qubit space (flat qubit = offset + index), within the qubit limit. */
function placeRegisters(doc: CircuitDocument, limits: LoweringLimits): PlacedRegister[] {
	const registers: PlacedRegister[] = [];
	let offset = 0;
	for (const r of doc.registers) {
		registers.push({ ...r, offset });
		offset += r.size;
	}
	if (offset > limits.maxQubits) throw new LoweringError(`${offset} qubits exceeds the limit of ${limits.maxQubits}`, 'registers');
	return registers;
}

/** The sink's growable arrays cut to length, as the lowered circuit. */
function finish(doc: CircuitDocument, ctx: LowerContext): LoweredCircuit {
	const { sink, registers } = ctx;
	const last = registers[registers.length - 1];
	return {
		title: doc.title,
		qubitCount: last ? last.offset + last.size : 0,
		registers,
		gateCount: sink.count,
		kinds: sink.kinds.finish(),
		controlCounts: sink.controlCounts.finish(),
		qubitStart: sink.qubitStart.finish(),
		qubitList: sink.qubitList.finish(),
		angleIndex: sink.angleIndex.finish(),
		angles: sink.angles,
		matrixIndex: sink.matrixIndex.finish(),
		matrices: sink.matrices,
		blockOf: sink.blockOf.finish(),
		loops: sink.loops.finish(),
		itemOf: sink.itemOf.finish(),
		itemIds: sink.itemIds,
		itemSources: sink.itemSources,
		blocks: sink.blocks
	};
}
