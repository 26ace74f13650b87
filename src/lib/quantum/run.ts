/**
 * Runs and frames: execute a lowered circuit on basis-state inputs with the exact ledger (handing
 * over to the amplitude engine when a gate would entangle), keep keyframes so any step can be
 * shown by replaying at most K gates, and compare every qubit with its expected value.
 *
 * Qubit order: flat qubits (register offset + index, index 0 = LSB). Angle units: turns.
 * Step s is the state after s gates (step 0 = inputs, step gateCount = output); gate g moves
 * step g to step g + 1.
 *
 * Checksums: FNV-1a 32-bit (offset basis 0x811c9dc5, prime 0x01000193) over the UTF-16 code
 * units of {@link canonicalFrameText}: `<engine>|<step>|` then per qubit `c0`/`c1` (classical),
 * `f<num>/<exp>` (exact Fourier phase num/2^exp turn, reduced), `F<turns to 9 decimals>`
 * (inexact Fourier phase) or `m<x>,<y>,<z>` (Bloch vector, 9 decimals), joined by `;`.
 * Expected values are not part of the checksum; replaying a saved trace on the same engine must
 * give the same checksums.
 */
import {
	allBlochVectors,
	AMPLITUDE_QUBIT_LIMITS,
	applyLoweredGate,
	buildGateTables,
	cloneState,
	registerDistribution,
	type GateTables,
	type StateVector
} from './amplitudes.js';
import { addAngles, divergence, dyadic, floatTurns, formatRadians, formatTurns, isZeroSigned, ZERO_ANGLE, type Angle, type SignedAngle } from './angle.js';
import { gateAt, qubitLabel, type GateView, type LoweredCircuit } from './circuit.js';
import { computeExpectations, ExpectKind, noteKey, type ExpectationEvents } from './expect.js';
import { computeIntentExpectations, mergeExpectations, type FourierSection, type RegisterIntent } from './intent.js';
import {
	applyLedgerGate,
	buildLedgerTables,
	cloneLedgerState,
	ContributionKind,
	createContributionLog,
	createLedgerState,
	entanglingReason,
	LedgerKind,
	ledgerGlobalPhase,
	ledgerPhase,
	ledgerToAmplitudes,
	type ContributionLog,
	type LedgerState,
	type LedgerTables
} from './ledger.js';

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
}

const KIND_NAMES = Object.keys(ContributionKind) as (keyof typeof ContributionKind)[];

/** FNV-1a 32-bit hash of a string's UTF-16 code units, as 8 hex digits. */
export function fnv1a(text: string): string {
	let h = 0x811c9dc5;
	for (let i = 0; i < text.length; i++) {
		h ^= text.charCodeAt(i);
		h = Math.imul(h, 0x01000193) >>> 0;
	}
	return h.toString(16).padStart(8, '0');
}

const fix9 = (x: number) => {
	const s = x.toFixed(9);
	return s === '-0.000000000' ? '0.000000000' : s;
};

/** Canonical text of a frame's qubit states (see module docs); hashed for checksums. */
export function canonicalFrameText(engine: string, step: number, states: QubitState[]): string {
	const parts: string[] = [];
	for (const s of states) {
		if (s.kind === 'classical') parts.push(`c${s.bit}`);
		else if (s.kind === 'fourier') parts.push(s.angle.exact ? `f${s.angle.num}/${s.angle.exp}` : `F${fix9(s.angle.turns)}`);
		else parts.push(`m${fix9(s.bloch[0])},${fix9(s.bloch[1])},${fix9(s.bloch[2])}`);
	}
	return `${engine}|${step}|${parts.join(';')}`;
}

function classifyBloch(x: number, y: number, z: number, tol: number): QubitState {
	const len = Math.sqrt(x * x + y * y + z * z);
	if (z > 1 - tol) return { kind: 'classical', bit: 0 };
	if (z < -1 + tol) return { kind: 'classical', bit: 1 };
	if (len > 1 - tol && Math.abs(z) < tol) {
		const a = floatTurns(Math.atan2(y, x) / (2 * Math.PI));
		return { kind: 'fourier', angle: a, turns: formatTurns(a), radians: formatRadians(a) };
	}
	return { kind: 'mixed', bloch: [x, y, z], length: len };
}

function fourierState(a: Angle): QubitState {
	return { kind: 'fourier', angle: a, turns: formatTurns(a), radians: formatRadians(a) };
}

/** Compare actual with expected (turns). */
function compare(actual: QubitState, expected: ExpectedState, tol: number): { matches: boolean; divergence: SignedAngle | null } {
	if (expected.kind === 'classical') return { matches: actual.kind === 'classical' && actual.bit === expected.bit, divergence: null };
	if (actual.kind !== 'fourier') return { matches: false, divergence: null };
	const d = divergence(actual.angle, expected.angle);
	return { matches: isZeroSigned(d, tol), divergence: d };
}

function lowerBound(a: Int32Array, from: number, to: number, v: number): number {
	// first index in [from, to) with a[i] > v, minus one → last index with a[i] ≤ v (or from − 1)
	let lo = from;
	let hi = to;
	while (lo < hi) {
		const mid = (lo + hi) >> 1;
		if (a[mid] <= v) lo = mid + 1;
		else hi = mid;
	}
	return lo - 1;
}

/**
 * A run of a lowered circuit on given inputs. Construction executes the whole circuit once
 * (recording keyframes, checksums, ledger contributions and divergences); {@link Run.frameAt}
 * then replays at most one keyframe interval.
 */
export class Run {
	readonly circuit: LoweredCircuit;
	readonly stepCount: number;
	readonly keyframeInterval: number;
	/** Step where the ledger handed over to the amplitude engine (null: ledger all the way). */
	readonly handover: { step: number; reason: string } | null = null;
	/** Step where the run stopped (entangling gate beyond the amplitude limit), null if complete. */
	readonly stopped: { step: number; reason: string } | null = null;
	readonly expectations: ExpectationEvents;
	readonly contributions: ContributionLog;
	readonly divergences: DivergenceRecord[] = [];
	readonly keyframeChecksums: { step: number; checksum: string }[] = [];
	/** Why spec-based expectations were not applied somewhere (empty when they all were). */
	readonly intentWarnings: string[] = [];

	private readonly ledgerTables: LedgerTables;
	private gateTables: GateTables | null = null;
	private readonly ledgerKeys: LedgerState[] = [];
	private readonly ampKeys: { step: number; state: StateVector }[] = [];
	private readonly tol: number;
	private readonly maxAmp: number;
	private readonly evOffsets: Int32Array;
	private readonly evIndex: Int32Array;
	private readonly evStepsByQubit: Int32Array;
	private readonly touchOffsets: Int32Array;
	private readonly touchGates: Int32Array;
	private readonly regOfQubit: Int32Array;
	private readonly firstParted: Int32Array;

	constructor(circuit: LoweredCircuit, inputs: RunInputs = {}, options: RunOptions = {}) {
		this.circuit = circuit;
		this.stepCount = circuit.gateCount;
		this.keyframeInterval = Math.max(1, options.keyframeInterval ?? 1024);
		this.tol = options.tolerance ?? 1e-9;
		this.maxAmp = options.maxAmplitudeQubits ?? AMPLITUDE_QUBIT_LIMITS.browser;
		const n = circuit.qubitCount;

		// Inputs → bits.
		const bits = new Uint8Array(n);
		const known = new Map<string, bigint | null>();
		const superposed = new Set(inputs.superposed ?? []);
		for (const name of superposed) if (!circuit.registers.some((r) => r.name === name)) throw new RangeError(`unknown register "${name}" in superposed inputs`);
		for (const [name, raw] of Object.entries(inputs.values ?? {})) {
			const r = circuit.registers.find((x) => x.name === name);
			if (!r) throw new RangeError(`unknown register "${name}" in inputs`);
			const v = BigInt(raw);
			if (v < 0n || v >= 1n << BigInt(r.size)) throw new RangeError(`input ${name} = ${v} does not fit in ${r.size} qubits`);
		}
		this.regOfQubit = new Int32Array(n);
		circuit.registers.forEach((r, ri) => {
			const v = superposed.has(r.name) ? null : BigInt(inputs.values?.[r.name] ?? 0);
			known.set(r.name, v);
			for (let i = 0; i < r.size; i++) {
				this.regOfQubit[r.offset + i] = ri;
				if (v !== null) bits[r.offset + i] = Number((v >> BigInt(i)) & 1n);
			}
		});

		const own = computeExpectations(circuit, known);
		const intents = options.intents ?? [];
		if (intents.length && [...known.values()].every((v) => v !== null)) {
			const got = computeIntentExpectations(circuit, intents, known as Map<string, bigint>, options.intentSections);
			this.intentWarnings = got.warnings;
			this.expectations = mergeExpectations(own, got.events);
		} else this.expectations = own;
		// Per-qubit event index (CSR) for "last expectation at or before step".
		const ev = this.expectations;
		this.evOffsets = new Int32Array(n + 1);
		for (let e = 0; e < ev.length; e++) this.evOffsets[ev.qubit[e] + 1]++;
		for (let q = 0; q < n; q++) this.evOffsets[q + 1] += this.evOffsets[q];
		this.evIndex = new Int32Array(ev.length);
		this.evStepsByQubit = new Int32Array(ev.length);
		{
			const fill = this.evOffsets.slice(0, n);
			for (let e = 0; e < ev.length; e++) {
				const q = ev.qubit[e];
				const at = fill[q]++;
				this.evIndex[at] = e;
				this.evStepsByQubit[at] = ev.step[e];
			}
		}
		// Per-qubit touched gates (CSR).
		this.touchOffsets = new Int32Array(n + 1);
		for (let i = 0; i < circuit.qubitList.length; i++) this.touchOffsets[circuit.qubitList[i] + 1]++;
		for (let q = 0; q < n; q++) this.touchOffsets[q + 1] += this.touchOffsets[q];
		this.touchGates = new Int32Array(circuit.qubitList.length);
		{
			const fill = this.touchOffsets.slice(0, n);
			for (let g = 0; g < circuit.gateCount; g++)
				for (let i = circuit.qubitStart[g]; i < circuit.qubitStart[g + 1]; i++) this.touchGates[fill[circuit.qubitList[i]]++] = g;
		}
		this.firstParted = new Int32Array(n).fill(-1);

		this.ledgerTables = buildLedgerTables(circuit);
		this.contributions = createContributionLog(Math.max(1024, circuit.gateCount));
		const K = this.keyframeInterval;
		let ledger: LedgerState | null = null;
		let amp: StateVector | null = null;
		let ampInterval = K;
		let lastAmpKey = -1;
		let nextEvent = 0;

		const startAmplitudes = (step: number, reason: string, from: LedgerState | null): boolean => {
			if (n > this.maxAmp) {
				(this as { stopped: Run['stopped'] }).stopped = {
					step,
					reason: `stopped at step ${step}: ${reason}; the amplitude engine is limited to ${this.maxAmp} qubits and this circuit has ${n}`
				};
				return false;
			}
			this.gateTables = buildGateTables(circuit);
			if (from) amp = ledgerToAmplitudes(from, this.ledgerTables, this.maxAmp);
			else amp = ledgerToAmplitudes(initialLedger(), this.ledgerTables, this.maxAmp); // product of |bit⟩ and |+⟩ factors
			(this as { handover: Run['handover'] }).handover = { step, reason };
			const bytes = 16 * 2 ** n;
			const budget = options.amplitudeKeyframeBytes ?? 256 * 2 ** 20;
			const maxKeys = Math.max(1, Math.floor(budget / bytes));
			ampInterval = Math.max(K, Math.ceil((circuit.gateCount - step + 1) / maxKeys));
			return true;
		};
		const initialLedger = (): LedgerState => {
			const s = createLedgerState(n, bits);
			for (const name of superposed) {
				const r = circuit.registers.find((x) => x.name === name)!;
				for (let i = 0; i < r.size; i++) {
					s.kind[r.offset + i] = LedgerKind.fourier;
					s.phase[r.offset + i] = 0n;
				}
			}
			return s;
		};

		if (superposed.size > 0 || options.engine === 'amplitudes') {
			const reason = superposed.size > 0 ? `input register${superposed.size > 1 ? 's' : ''} ${[...superposed].join(', ')} in uniform superposition` : 'amplitude engine requested';
			if (!startAmplitudes(0, reason, null)) {
				this.ledgerKeys.push(initialLedger());
			}
		} else ledger = createLedgerState(n, bits);

		const checkEvents = (step: number) => {
			while (nextEvent < ev.length && ev.step[nextEvent] < step) nextEvent++;
			let bloch: Float64Array | null = null;
			for (; nextEvent < ev.length && ev.step[nextEvent] === step; nextEvent++) {
				const e = nextEvent;
				if (ev.kind[e] === ExpectKind.unknown) continue;
				if (amp && n > 16 && !ev.boundary[e]) continue; // partial checks would cost 2^n each
				const q = ev.qubit[e];
				if (ledger && this.ledgerMatches(ledger, e)) continue; // fast exact path, no allocation
				let actual: QubitState;
				if (ledger) actual = this.ledgerQubit(ledger, q);
				else {
					bloch ??= allBlochVectors(amp!);
					actual = classifyBloch(bloch[3 * q], bloch[3 * q + 1], bloch[3 * q + 2], this.tol);
				}
				const exp = this.expectedOf(e);
				const r = compare(actual, exp, this.tol);
				if (!r.matches) {
					if (this.firstParted[q] < 0) this.firstParted[q] = step;
					if (this.divergences.length < 10_000)
						this.divergences.push({
							step,
							qubit: q,
							boundary: ev.boundary[e] === 1,
							divergence: r.divergence,
							message: `q${q} (${qubitLabel(this.circuit.registers, q)}) at step ${step}: expected ${describeExpected(exp)}, got ${describeState(actual)}`
						});
				}
			}
		};

		for (let step = 0; ; step++) {
			if (ledger && step % K === 0) {
				this.ledgerKeys.push(cloneLedgerState(ledger));
				this.keyframeChecksums.push({ step, checksum: fnv1a(this.ledgerCanonicalText(ledger, step)) });
			} else if (amp && (lastAmpKey < 0 || step - lastAmpKey >= ampInterval)) {
				this.ampKeys.push({ step, state: cloneState(amp) });
				lastAmpKey = step;
				this.keyframeChecksums.push({ step, checksum: this.checksumOf('amplitudes', step, this.statesFromAmplitudes(amp)) });
			}
			if (!ledger && !amp) break;
			checkEvents(step);
			if (step === circuit.gateCount) break;
			if (ledger) {
				if (!applyLedgerGate(ledger, circuit, this.ledgerTables, step, this.contributions)) {
					const reason = entanglingReason(ledger, circuit, step);
					const from = ledger;
					if (!startAmplitudes(step, reason, from)) break;
					ledger = null;
					this.ampKeys.push({ step, state: cloneState(amp!) });
					lastAmpKey = step;
					applyLoweredGate(amp!, circuit, this.gateTables!, step);
				}
			} else if (amp) applyLoweredGate(amp, circuit, this.gateTables!, step);
		}
		// The last frame's checksum too, so a replay confirms the whole run even when it is
		// shorter than one keyframe interval.
		const last = this.lastStep;
		const tail = this.keyframeChecksums[this.keyframeChecksums.length - 1];
		if (!tail || tail.step !== last) this.keyframeChecksums.push({ step: last, checksum: this.frameAt(last).checksum });
	}

	/** Number of qubits (flat). */
	get qubitCount(): number {
		return this.circuit.qubitCount;
	}

	/** Last step a frame can be shown for (stepCount unless the run stopped). */
	get lastStep(): number {
		return this.stopped ? this.stopped.step : this.stepCount;
	}

	private expectedOf(e: number): ExpectedState {
		const ev = this.expectations;
		const note = ev.notes?.get(noteKey(ev.step[e], ev.qubit[e]));
		const withNote = note ? { note } : {};
		if (ev.kind[e] === ExpectKind.classical) return { kind: 'classical', bit: ev.level[e] ? 1 : 0, ...withNote };
		const level = ev.level[e];
		return { kind: 'fourier', level, value: ev.num[e], angle: dyadic(ev.num[e], level), ...withNote };
	}

	private ledgerQubit(s: LedgerState, q: number): QubitState {
		const k = s.kind[q];
		if (k === LedgerKind.classical) return { kind: 'classical', bit: s.bit[q] ? 1 : 0 };
		if (k === LedgerKind.fourier) return fourierState(ledgerPhase(s, this.ledgerTables, q));
		const o = 4 * q;
		const ar = s.amp[o];
		const ai = s.amp[o + 1];
		const br = s.amp[o + 2];
		const bi = s.amp[o + 3];
		const x = 2 * (ar * br + ai * bi);
		const y = -2 * (ai * br - ar * bi);
		const z = ar * ar + ai * ai - br * br - bi * bi;
		return classifyBloch(x, y, z, this.tol);
	}

	/** Exact ledger check of expectation event e without building frame objects. */
	private ledgerMatches(s: LedgerState, e: number): boolean {
		const ev = this.expectations;
		const q = ev.qubit[e];
		if (ev.kind[e] === ExpectKind.classical) return s.kind[q] === LedgerKind.classical && s.bit[q] === ev.level[e];
		const t = this.ledgerTables;
		const level = ev.level[e];
		if (s.kind[q] !== LedgerKind.fourier || s.inexact[q] || level > t.exp) return false;
		return s.phase[q] === ((ev.num[e] << BigInt(t.exp - level)) & t.mask);
	}

	/** Same text as canonicalFrameText(…, statesFromLedger(s)) for exact/classical qubits, built directly. */
	private ledgerCanonicalText(s: LedgerState, step: number): string {
		const parts: string[] = [];
		for (let q = 0; q < s.qubitCount; q++) {
			if (s.kind[q] === LedgerKind.classical) parts.push(s.bit[q] ? 'c1' : 'c0');
			else if (s.kind[q] === LedgerKind.fourier && !s.inexact[q]) {
				const a = dyadic(s.phase[q], this.ledgerTables.exp);
				parts.push(`f${a.num}/${a.exp}`);
			} else return canonicalFrameText('ledger', step, this.statesFromLedger(s));
		}
		return `ledger|${step}|${parts.join(';')}`;
	}

	private statesFromLedger(s: LedgerState): QubitState[] {
		const out: QubitState[] = [];
		for (let q = 0; q < s.qubitCount; q++) out.push(this.ledgerQubit(s, q));
		return out;
	}

	private statesFromAmplitudes(s: StateVector): QubitState[] {
		const b = allBlochVectors(s);
		const out: QubitState[] = [];
		for (let q = 0; q < s.qubitCount; q++) out.push(classifyBloch(b[3 * q], b[3 * q + 1], b[3 * q + 2], this.tol));
		return out;
	}

	private checksumOf(engine: string, step: number, states: QubitState[]): string {
		return fnv1a(canonicalFrameText(engine, step, states));
	}

	private checkStep(step: number): void {
		if (!Number.isInteger(step) || step < 0 || step > this.stepCount) throw new RangeError(`step ${step} outside 0..${this.stepCount}`);
		if (this.stopped && step > this.stopped.step) throw new RangeError(`no frame for step ${step}: ${this.stopped.reason}`);
	}

	/** The raw engine state at `step` (replaying from the nearest keyframe): ledger or state vector. */
	stateAt(step: number): { engine: 'ledger'; ledger: LedgerState } | { engine: 'amplitudes'; amplitudes: StateVector } {
		this.checkStep(step);
		const c = this.circuit;
		const useLedger = this.ampKeys.length === 0 || (this.handover !== null && this.handover.step > 0 && step <= this.handover.step);
		if (useLedger) {
			const ki = Math.min(Math.floor(step / this.keyframeInterval), this.ledgerKeys.length - 1);
			const s = cloneLedgerState(this.ledgerKeys[ki]);
			for (let g = ki * this.keyframeInterval; g < step; g++) applyLedgerGate(s, c, this.ledgerTables, g, null);
			return { engine: 'ledger', ledger: s };
		}
		let lo = 0;
		let hi = this.ampKeys.length - 1;
		while (lo < hi) {
			const mid = (lo + hi + 1) >> 1;
			if (this.ampKeys[mid].step <= step) lo = mid;
			else hi = mid - 1;
		}
		const key = this.ampKeys[lo];
		const s = cloneState(key.state);
		for (let g = key.step; g < step; g++) applyLoweredGate(s, c, this.gateTables!, g);
		return { engine: 'amplitudes', amplitudes: s };
	}

	/** Expected state of qubit q at `step`: last stated expectation ≤ step, and whether it is still fresh. */
	expectedAt(q: number, step: number): { expected: ExpectedState | null; step: number | null; fresh: boolean } {
		const at = lowerBound(this.evStepsByQubit, this.evOffsets[q], this.evOffsets[q + 1], step);
		if (at < this.evOffsets[q]) return { expected: null, step: null, fresh: false };
		const e = this.evIndex[at];
		const evStep = this.expectations.step[e];
		if (this.expectations.kind[e] === ExpectKind.unknown) return { expected: null, step: evStep, fresh: false };
		// fresh iff no gate g with evStep ≤ g < step touches q
		const t = lowerBound(this.touchGates, this.touchOffsets[q], this.touchOffsets[q + 1], step - 1);
		const fresh = t < this.touchOffsets[q] || this.touchGates[t] < evStep;
		return { expected: this.expectedOf(e), step: evStep, fresh };
	}

	/** The frame at `step`: every qubit's state, expectation and divergence; serialisable. */
	frameAt(step: number): TraceFrame {
		const st = this.stateAt(step);
		const c = this.circuit;
		const states = st.engine === 'ledger' ? this.statesFromLedger(st.ledger) : this.statesFromAmplitudes(st.amplitudes);
		const qubits: QubitFrame[] = [];
		for (let q = 0; q < c.qubitCount; q++) {
			const r = c.registers[this.regOfQubit[q]];
			const ex = this.expectedAt(q, step);
			let divergenceValue: SignedAngle | null = null;
			let matches: boolean | null = null;
			if (ex.expected) {
				const cmp = compare(states[q], ex.expected, this.tol);
				divergenceValue = cmp.divergence;
				matches = cmp.matches;
			}
			qubits.push({
				qubit: q,
				register: r.name,
				index: q - r.offset,
				state: states[q],
				expected: ex.expected,
				expectedStep: ex.step,
				fresh: ex.fresh,
				divergence: divergenceValue,
				matches
			});
		}
		const registerValues: Record<string, bigint | null> = {};
		const distributions: Record<string, number[]> = {};
		for (const r of c.registers) {
			let v = 0n;
			let ok = true;
			for (let i = 0; i < r.size; i++) {
				const s = states[r.offset + i];
				if (s.kind !== 'classical') ok = false;
				else if (s.bit) v |= 1n << BigInt(i);
			}
			registerValues[r.name] = ok ? v : null;
			if (st.engine === 'amplitudes' && r.size <= 12) distributions[r.name] = Array.from(registerDistribution(st.amplitudes, r.offset, r.size));
		}
		const blockPath: number[] = [];
		for (const b of c.blocks) if (b.start <= step && step < b.end) blockPath.push(b.index);
		return {
			step,
			gate: step > 0 ? gateAt(c, step - 1) : null,
			engine: st.engine,
			handover: this.handover && step > this.handover.step ? this.handover : null,
			qubits,
			registerValues,
			distributions,
			blockPath,
			checksum: this.checksumOf(st.engine, step, states)
		};
	}

	/** The ledger of qubit q: every contribution with the running total and the expectation at that step (turns). */
	qubitLedger(q: number): { entries: LedgerEntry[]; firstParted: number | null } {
		const log = this.contributions;
		const t = this.ledgerTables;
		const entries: LedgerEntry[] = [];
		let total: Angle | null = null;
		for (let i = 0; i < log.length; i++) {
			if (log.qubit[i] !== q) continue;
			const g = log.gate[i];
			const kind = KIND_NAMES[log.kind[i]];
			let amount: Angle | null = null;
			switch (log.kind[i]) {
				case ContributionKind.phase:
					amount = this.circuit.angles[this.circuit.angleIndex[g]];
					break;
				case ContributionKind.origin:
					amount = null;
					break;
				case ContributionKind.negate:
					amount = dyadic(log.explicit.get(i)!, t.exp);
					break;
				case ContributionKind.kickback:
					amount = dyadic(1n, 1);
					break;
			}
			if (kind === 'origin') {
				const st = this.stateAt(g + 1);
				total = st.engine === 'ledger' ? ledgerPhase(st.ledger, t, q) : ZERO_ANGLE;
				amount = total;
			} else if (kind === 'collapse' || kind === 'leave') total = null;
			else if (kind === 'swap') {
				const st = this.stateAt(g + 1);
				total = st.engine === 'ledger' && st.ledger.kind[q] === LedgerKind.fourier ? ledgerPhase(st.ledger, t, q) : null;
			} else if (amount && total) total = addAngles(total, amount);
			const ex = this.expectedAt(q, g + 1);
			const expAngle = ex.expected && ex.expected.kind === 'fourier' ? ex.expected.angle : null;
			const parted = expAngle !== null && total !== null && ex.fresh && !isZeroSigned(divergence(total, expAngle), this.tol);
			entries.push({ step: g + 1, gate: g, kind, amount, total, expected: expAngle, parted });
		}
		const fp = this.firstParted[q];
		return { entries, firstParted: fp >= 0 ? fp : null };
	}

	/** First step where any qubit's fresh expectation fails, or null. */
	firstDivergenceStep(): number | null {
		return this.divergences.length ? this.divergences[0].step : null;
	}

	private boundaries: number[] | null = null;

	/** Sorted, distinct block boundary steps (every block start and end); built once per run. */
	blockBoundaries(): number[] {
		if (!this.boundaries) {
			const s = new Set<number>([0, this.stepCount]);
			for (const b of this.circuit.blocks) {
				s.add(b.start);
				s.add(b.end);
			}
			this.boundaries = [...s].sort((a, b) => a - b);
		}
		return this.boundaries;
	}

	/** Index of the first boundary greater than `step` (binary search). */
	private boundaryAfter(step: number): number {
		const xs = this.blockBoundaries();
		let lo = 0;
		let hi = xs.length;
		while (lo < hi) {
			const mid = (lo + hi) >> 1;
			if (xs[mid] > step) hi = mid;
			else lo = mid + 1;
		}
		return lo;
	}

	/** Next block boundary after `step` (or the last step). */
	nextBoundary(step: number): number {
		const xs = this.blockBoundaries();
		const i = this.boundaryAfter(step);
		return i < xs.length ? xs[i] : this.stepCount;
	}

	/** Previous block boundary before `step` (or 0). */
	previousBoundary(step: number): number {
		const xs = this.blockBoundaries();
		let i = this.boundaryAfter(step) - 1;
		while (i >= 0 && xs[i] >= step) i--;
		return i >= 0 ? xs[i] : 0;
	}

	/** Step into: one gate forward. */
	stepInto(step: number): number {
		return Math.min(step + 1, this.lastStep);
	}

	/** Depth of the innermost block strictly around step (start < step < end), −1 at top level. */
	private depthAt(step: number): number {
		let d = -1;
		for (const b of this.circuit.blocks) if (b.start < step && step < b.end && b.depth > d) d = b.depth;
		return d;
	}

	/**
	 * Step over: if the next gate starts a block one level deeper than the current position,
	 * jump past that whole block; otherwise past the current rotation unit (gates of one block
	 * sharing the same loop indices, e.g. one lowered ccp); otherwise one gate.
	 */
	stepOver(step: number): number {
		const c = this.circuit;
		if (step >= this.lastStep) return this.lastStep;
		const d = this.depthAt(step);
		let best: number | null = null;
		for (const b of c.blocks) if (b.start === step && b.depth === d + 1 && b.end > step) best = Math.max(best ?? 0, b.end);
		if (best !== null) return Math.min(best, this.lastStep);
		const blk = c.blockOf[step];
		let e = step + 1;
		while (e < c.gateCount && c.blockOf[e] === blk && c.loops[3 * e] === c.loops[3 * step] && c.loops[3 * e + 1] === c.loops[3 * step + 1] && c.loops[3 * e + 2] === c.loops[3 * step + 2] && c.loops[3 * step] >= 0) e++;
		return Math.min(e, this.lastStep);
	}

	/** Step out: to the end of the innermost block around `step`, or the last step. */
	stepOut(step: number): number {
		let best: { depth: number; end: number } | null = null;
		for (const b of this.circuit.blocks) if (b.start < step && step < b.end && (!best || b.depth > best.depth)) best = { depth: b.depth, end: b.end };
		return Math.min(best ? best.end : this.stepCount, this.lastStep);
	}
}

function describeExpected(e: ExpectedState): string {
	const note = e.note ? `; ${e.note}` : '';
	return e.kind === 'classical' ? `|${e.bit}⟩${note}` : `Fourier phase ${formatTurns(e.angle)} (level ${e.level}, value ${e.value}${note})`;
}
function describeState(s: QubitState): string {
	if (s.kind === 'classical') return `|${s.bit}⟩`;
	if (s.kind === 'fourier') return `Fourier phase ${s.turns}`;
	return `mixed state, Bloch (${s.bloch.map((x) => x.toFixed(4)).join(', ')})`;
}

/** Ledger global phase of the final state (turns), when the run stayed on the ledger. */
export function finalGlobalPhase(run: Run): Angle | null {
	const st = run.stateAt(run.lastStep);
	return st.engine === 'ledger' ? ledgerGlobalPhase(st.ledger, buildLedgerTables(run.circuit)) : null;
}

