// The workbench's engine session: one Run over one circuit and input, and the views the page
// draws. Pure (no DOM): the worker wraps it, and tests drive it directly in Node.
import { lowerCircuit, LoweringError } from '$lib/quantum/lower';
import { firstFrame, Run, type QubitFrame, type TraceFrame } from '$lib/quantum/run';
import { formatTurns, toTurns, toTurnsSigned, type Angle, type SignedAngle } from '$lib/quantum/angle';
import { GateCode, gateAt, gateDisplayName, gateProvenance, qubitLabel, type CircuitDocument, type GateView, type LoweredCircuit } from '$lib/quantum/circuit';
import { parseInputValue } from './inputs';
import { evaluateSpec, parseSpec, SpecError } from '$lib/quantum/check/spec';
import { checkCircuit, countResources, type InputChoice } from '$lib/quantum/check/index';
import { modularFigures } from '$lib/quantum/check/modular-resources';
import { proveCircuit } from '$lib/quantum/check/proof';
import { specPolynomial, type IntPoly } from '$lib/quantum/check/spec';
import { findFourierSections, type FourierSection } from '$lib/quantum/intent';
import type { RegisterIntent } from '$lib/quantum/intent';
import { ExpectKind, type ExpectationEvents } from '$lib/quantum/expect';
import type { DialQubit } from '$lib/dials/dial-model';
import { resetHolds } from '$lib/quantum/reset-claim';
import type { BreakpointSpec, FailureDivergence, FrameView, GateRow, LedgerView, PositionView, RunRequestInputs, RunSummary, SeekKind, WorkerRequest, WorkerResponse } from './protocol';

/** Most ledger rows sent for one qubit; the view says when it was cut. */
export const MAX_LEDGER_ROWS = 5000;
/** Most steps a condition breakpoint scans before giving up (keeps a seek bounded). */
export const MAX_CONDITION_SCAN = 20000;
/** Most gate rows sent when a block is expanded. */
export const MAX_GATE_ROWS = 500;

const fracText = (a: Angle | SignedAngle): string => formatTurns(a).replace(/ turn.*$/, '');


export function describeGate(g: GateView, c: LoweredCircuit): string {
	const name = (q: number) => qubitLabel(c.registers, q);
	const angle = g.angle ? `(${fracText(g.angle)} turn)` : '';
	const ctl = g.controls.length ? `${g.controls.map(name).join(', ')} → ` : '';
	return `${gateDisplayName(g.kind, g.controls.length)}${angle} ${ctl}${g.targets.map(name).join(', ')}`;
}

export { parseInputValue };

/** Gates at most replayed to locate the first divergence of failing inputs after a check. */
export const MAX_FAILURE_REPLAY_GATES = 2_000_000;

/** Gates at most scanned for QFT patterns when a circuit has no QFT blocks (imported files). */
export const MAX_SECTION_SCAN_GATES = 200_000;

/**
 * Fourier sections of a circuit written as raw gates (an imported file): the prover recognises
 * the QFT and inverse QFT from the gates themselves. Best effort; nothing found is no error.
 */
export function sectionsFromGates(c: LoweredCircuit, specTexts: string[]): FourierSection[] {
	if (c.gateCount > MAX_SECTION_SCAN_GATES) return [];
	try {
		const specs = specTexts.map((t) => parseSpec(t, c.registers));
		const inputs = new Set(specs.flatMap((s) => s.reads));
		const outputs = new Map<string, IntPoly>();
		for (const s of specs) {
			const p = specPolynomial(s, c.registers, inputs);
			if (!p) return [];
			outputs.set(s.out, p);
		}
		const proof = proveCircuit(c, { inputs, outputs });
		return proof.sections.map((x) => {
			const r = c.registers.find((y) => y.name === x.register)!;
			const start = x.qftGates[1] + 1;
			let end = x.iqftGates[0];
			let after: number | null = x.iqftGates[1] >= 0 ? x.iqftGates[1] + 1 : null;
			if (end < 0) {
				// The prover stopped at the wrong terms before reading the inverse QFT: it begins at
				// the first gate after the section that is not a phase on the register.
				const inR = (q: number) => q >= r.offset && q < r.offset + r.size;
				end = c.gateCount;
				for (let g = start; g < c.gateCount; g++) {
					const k = c.kinds[g];
					const qs = c.qubitList.subarray(c.qubitStart[g], c.qubitStart[g + 1]);
					if (k !== GateCode.p && k !== GateCode.cp && k !== GateCode.mcp && qs.some(inR)) {
						end = g;
						break;
					}
				}
				after = null;
			}
			return { register: x.register, layout: x.layout, levels: x.levels, start, end, after };
		});
	} catch {
		return [];
	}
}

/** Specs as register intents; a spec that does not parse is reported, not fatal. */
export function intentsFromSpecs(specs: string[], c: LoweredCircuit): { intents: RegisterIntent[]; problems: string[] } {
	const intents: RegisterIntent[] = [];
	const problems: string[] = [];
	for (const text of specs) {
		try {
			const spec = parseSpec(text, c.registers);
			intents.push({ register: spec.out, value: (inputs) => evaluateSpec(spec, new Map(inputs)) });
		} catch (e) {
			problems.push(e instanceof SpecError ? e.message : `spec "${text}": ${(e as Error).message}`);
		}
	}
	return { intents, problems };
}

interface PreparedCircuit {
	circuit: LoweredCircuit;
	intents: RegisterIntent[];
	problems: string[];
	intentSections: FourierSection[];
}

// What depends on the document only (lowering, specs, the prover's section search) is kept for
// the last document, so changing only the inputs does not lower and scan the circuit again.
let lastPrepared: { doc: CircuitDocument; key: string; circuit: LoweredCircuit; intents: Omit<PreparedCircuit, 'circuit'> | null } | null = null;

/**
 * The expectations a run checks against: the specs as register intents and, for circuits with no
 * QFT blocks (imported gate lists), the Fourier sections found from the raw gates. The server's
 * trace computation uses this too, so both find the same divergences.
 */
export function prepareIntents(doc: CircuitDocument, circuit: LoweredCircuit): Omit<PreparedCircuit, 'circuit'> {
	const { intents, problems } = intentsFromSpecs(doc.specs ?? [], circuit);
	const intentSections = intents.length && !findFourierSections(circuit).length ? sectionsFromGates(circuit, doc.specs ?? []) : [];
	return { intents, problems, intentSections };
}

/** The document lowered, kept for the last document: the same object (documents arrive by message and are never changed here), or one with the same JSON. */
function lowerCached(doc: CircuitDocument): NonNullable<typeof lastPrepared> {
	if (lastPrepared?.doc === doc) return lastPrepared;
	const key = JSON.stringify(doc);
	if (lastPrepared?.key !== key) lastPrepared = { doc, key, circuit: lowerCircuit(doc), intents: null };
	else lastPrepared.doc = doc;
	return lastPrepared;
}

function prepareCircuit(doc: CircuitDocument): PreparedCircuit {
	const entry = lowerCached(doc);
	entry.intents ??= prepareIntents(doc, entry.circuit);
	return { circuit: entry.circuit, ...entry.intents };
}

/** The register values of a load's inputs (superposed registers left out); throws on a bad value. */
function inputValues(c: LoweredCircuit, inputs: RunRequestInputs): Record<string, bigint> {
	const values: Record<string, bigint> = {};
	for (const r of c.registers) {
		if (inputs.superposed.includes(r.name)) continue;
		const raw = inputs.values[r.name];
		if (raw !== undefined) values[r.name] = parseInputValue(raw, r.name, r.size);
	}
	return values;
}

/** Step 0 of a load from the lowered circuit alone (see firstFrame): the same view as frame(0) of the finished session. */
function previewOf(c: LoweredCircuit, req: Extract<WorkerRequest, { type: 'load' }>): FrameView {
	return toFrameView(firstFrame(c, { values: inputValues(c, req.inputs), superposed: req.inputs.superposed }, { keyframeInterval: req.keyframeInterval }), STEP_ZERO);
}

/**
 * A load in two parts, for the worker: step 0 goes to `preview` now, and `finish()` computes the
 * run (the worker calls it once the page has drawn step 0, so the two do not share the CPU).
 * `previewed` is false when nothing was sent (the document or an input is wrong): then
 * `finish()` answers the error at once, from the same work as ever.
 */
export function beginLoad(req: Extract<WorkerRequest, { type: 'load' }>, preview: (frame: FrameView) => void): { previewed: boolean; finish: () => { session: EngineSession | null; response: WorkerResponse } } {
	let previewed = false;
	try {
		preview(previewOf(lowerCached(req.doc).circuit, req));
		previewed = true;
	} catch {
		// finish() lowers again and answers this error as a load always has
	}
	return { previewed, finish: () => handleRequest(null, req) };
}

/**
 * Expected angles and bits the run states after its inputs (its expectation events by kind; those
 * at step 0 only restate the inputs, so they compare nothing).
 */
function statedCounts(ev: ExpectationEvents): RunSummary['stated'] {
	let angles = 0;
	let bits = 0;
	for (let e = 0; e < ev.length; e++) {
		if (ev.step[e] === 0) continue;
		if (ev.kind[e] === ExpectKind.fourier) angles++;
		else if (ev.kind[e] === ExpectKind.classical) bits++;
	}
	return { angles, bits };
}

/** Where step 0 stands: before any gate. */
const STEP_ZERO: PositionView = { step: 0, gateIndex: null, gateText: null, blockPath: [], itemId: null, loop: {}, source: null };

export class EngineSession {
	readonly circuit: LoweredCircuit;
	readonly run: Run;
	readonly summary: RunSummary;
	/** Failed reset claims by the step they show at (few; a frame looks its step up). */
	readonly #resets = new Map<number, { qubit: number; p1: number }[]>();
	private labels: string[];

	/** Lower and run `req` (step 0 ahead of the run is {@link beginLoad}'s). */
	constructor(req: Extract<WorkerRequest, { type: 'load' }>) {
		const t0 = Date.now();
		const prepared = prepareCircuit(req.doc);
		this.circuit = prepared.circuit;
		const c = this.circuit;
		const values = inputValues(c, req.inputs);
		const { intents, problems, intentSections } = prepared;
		this.run = new Run(c, { values, superposed: req.inputs.superposed }, { keyframeInterval: req.keyframeInterval, intents, intentSections });
		this.labels = [];
		for (const r of c.registers) for (let i = 0; i < r.size; i++) this.labels[r.offset + i] = `${r.name}[${i}]`;
		for (const d of this.run.divergences) if (d.reset) this.#resets.set(d.step, [...(this.#resets.get(d.step) ?? []), { qubit: d.qubit, p1: d.reset.p1 }]);
		const first = this.run.divergences[0];
		this.summary = {
			title: c.title,
			qubitCount: c.qubitCount,
			gateCount: c.gateCount,
			lastStep: this.run.lastStep,
			registers: c.registers.map((r) => ({ name: r.name, size: r.size, offset: r.offset, role: r.role })),
			blocks: c.blocks.map((b) => ({
				index: b.index,
				parent: b.parent,
				depth: b.depth,
				itemId: b.itemId,
				kind: b.kind,
				label: b.label,
				start: b.start,
				end: b.end,
				effect: b.effect?.text ?? null
			})),
			boundaries: this.run.blockBoundaries(),
			firstDivergence: first ? { step: first.step, qubit: first.qubit, label: this.labels[first.qubit], message: first.message } : null,
			divergenceCount: this.run.divergences.length,
			stated: statedCounts(this.run.expectations),
			handover: this.run.handover,
			stopped: this.run.stopped,
			warnings: [...problems, ...this.run.intentWarnings, ...this.run.expectations.warnings.map((w) => w.message)],
			keyframeChecksums: this.run.keyframeChecksums,
			resources: countResources(c),
			modular: modularFigures(req.doc, c),
			millis: Date.now() - t0
		};
	}

	position(step: number): PositionView {
		const c = this.circuit;
		if (step === 0 || c.gateCount === 0) return { ...STEP_ZERO, step };
		const g = step - 1;
		const p = gateProvenance(c, g);
		const path: PositionView['blockPath'] = [];
		for (let b = c.blockOf[g]; b >= 0; b = c.blocks[b].parent) path.unshift({ index: b, label: c.blocks[b].label, kind: c.blocks[b].kind });
		return { step, gateIndex: g, gateText: describeGate(gateAt(c, g), c), blockPath: path, itemId: p.itemId, loop: p.loop, source: p.source ?? null };
	}

	frame(step: number): FrameView {
		const s = Math.max(0, Math.min(step, this.run.lastStep));
		const f = this.run.frameAt(s);
		const view = toFrameView(f, this.position(s));
		// A failed reset claim right here: its dial is drawn as diverging and says why.
		for (const d of this.#resets.get(s) ?? []) {
			const i = view.qubits.findIndex((x) => x.qubit === d.qubit);
			if (i >= 0) view.qubits[i] = { ...view.qubits[i], divergence: 0.5, divergenceText: `the reset claims |0⟩ here; ${resetHolds(d.p1)}` };
			if (!view.diverged.includes(d.qubit)) view.diverged.push(d.qubit);
		}
		return view;
	}

	/** Gate rows [from, to) for an expanded block, at most MAX_GATE_ROWS. */
	gates(from: number, to: number): { gates: GateRow[]; truncated: boolean } {
		const c = this.circuit;
		const a = Math.max(0, from);
		const b = Math.min(c.gateCount, to, a + MAX_GATE_ROWS);
		const gates: GateRow[] = [];
		for (let g = a; g < b; g++) gates.push({ index: g, text: describeGate(gateAt(c, g), c), line: gateProvenance(c, g).source?.line ?? null });
		return { gates, truncated: b < Math.min(c.gateCount, to) };
	}

	ledger(qubit: number): LedgerView {
		const c = this.circuit;
		const { entries, firstParted } = this.run.qubitLedger(qubit);
		const rows = entries.slice(0, MAX_LEDGER_ROWS).map((e) => {
			const b = c.blockOf[e.gate];
			return {
				step: e.step,
				gate: e.gate,
				gateText: describeGate(gateAt(c, e.gate), c),
				block: b >= 0 ? c.blocks[b].label : null,
				kind: e.kind,
				amount: e.amount ? fracText(e.amount) : null,
				total: e.total ? fracText(e.total) : null,
				expected: e.expected ? fracText(e.expected) : null,
				parted: e.parted
			};
		});
		return { qubit, label: this.labels[qubit], rows, firstParted, truncated: entries.length > MAX_LEDGER_ROWS };
	}

	seek(from: number, kind: SeekKind, breakpoints: BreakpointSpec[] = []): { step: number; reason: string | null; breakpointId: string | null } {
		const r = this.run;
		const last = r.lastStep;
		switch (kind) {
			case 'into':
				return { step: r.stepInto(from), reason: null, breakpointId: null };
			case 'back':
				return { step: Math.max(0, from - 1), reason: null, breakpointId: null };
			case 'over':
				return { step: r.stepOver(from), reason: null, breakpointId: null };
			case 'out':
				return { step: r.stepOut(from), reason: null, breakpointId: null };
			case 'next-boundary':
				return { step: Math.min(r.nextBoundary(from), last), reason: null, breakpointId: null };
			case 'prev-boundary':
				return { step: r.previousBoundary(from), reason: null, breakpointId: null };
			case 'start':
				return { step: 0, reason: null, breakpointId: null };
			case 'end':
				return { step: last, reason: null, breakpointId: null };
			case 'divergence': {
				const d = r.divergences.find((x) => x.step > from);
				return d
					? { step: d.step, reason: `${this.labels[d.qubit]}: ${d.message}`, breakpointId: null }
					: { step: last, reason: 'no divergence after this step', breakpointId: null };
			}
			case 'breakpoint':
				return this.nextBreakpoint(from, breakpoints);
		}
	}

	private nextBreakpoint(from: number, bps: BreakpointSpec[]) {
		const r = this.run;
		const c = this.circuit;
		let best: { step: number; reason: string; breakpointId: string } | null = null;
		const offer = (step: number, reason: string, id: string) => {
			if (step > from && step <= r.lastStep && (!best || step < best.step)) best = { step, reason, breakpointId: id };
		};
		for (const bp of bps) {
			if (bp.kind === 'gate') offer(bp.gate, `before gate ${bp.gate}: ${describeGate(gateAt(c, Math.min(bp.gate, c.gateCount - 1)), c)}`, bp.id);
			else if (bp.kind === 'block') {
				for (const b of c.blocks) if (b.itemId === bp.itemId) offer(bp.at === 'start' ? b.start : b.end, `${bp.at} of ${b.label}`, bp.id);
			} else if (bp.kind === 'divergence') {
				const d = r.divergences.find(
					(x) => x.step > from && (bp.qubit === null || x.qubit === bp.qubit) && (x.divergence === null || Math.abs(toTurnsSigned(x.divergence)) > bp.tolerance)
				);
				if (d) offer(d.step, `${this.labels[d.qubit]} diverged: ${d.message}`, bp.id);
			} else if (bp.kind === 'entangled') {
				const h = r.handover;
				if (!h) continue;
				const start = Math.max(from + 1, h.step);
				const stop = Math.min(r.lastStep, start + MAX_CONDITION_SCAN);
				for (let s = start; s <= stop; s++) {
					if (best && s >= (best as { step: number }).step) break;
					const f = r.frameAt(s);
					const hit = f.qubits.find((q) => q.state.kind === 'mixed' && q.state.length < 1 - 1e-9 && (bp.qubit === null || q.qubit === bp.qubit));
					if (hit) {
						offer(s, `${this.labels[hit.qubit]} became entangled`, bp.id);
						break;
					}
				}
			}
		}
		return best ?? { step: r.lastStep, reason: 'no breakpoint after this step', breakpointId: null };
	}
}

function toDial(q: QubitFrame): DialQubit {
	const base = { qubit: q.qubit, register: q.register, index: q.index };
	const ex = q.expected;
	const note = ex?.note && q.fresh ? { expectedNote: ex.note } : {};
	const expected = ex && ex.kind === 'fourier' && q.fresh ? { expected: toTurns(ex.angle), expectedText: fracText(ex.angle), level: ex.level } : {};
	const div = q.divergence && q.fresh ? { divergence: toTurnsSigned(q.divergence), divergenceText: fracText(q.divergence) } : {};
	const s = q.state;
	if (s.kind === 'classical') {
		const wrongBit = q.fresh && ex?.kind === 'classical' && ex.bit !== s.bit;
		return { ...base, kind: 'classical', bit: s.bit, ...note, ...(wrongBit ? { divergence: 0.5, divergenceText: `expected |${ex.bit}⟩${ex.note ? ` (${ex.note})` : ''}` } : {}) };
	}
	if (s.kind === 'fourier') {
		const level = s.angle.exact ? Math.max(1, s.angle.exp) : undefined;
		return { ...base, kind: 'fourier', level, angle: toTurns(s.angle), angleText: fracText(s.angle), coherence: 1, ...expected, ...note, ...div };
	}
	const [x, y] = s.bloch;
	const len = Math.hypot(x, y);
	// ⟨X⟩ = cos φ·len, ⟨Y⟩ = sin φ·len for a|0⟩ + b e^{iφ}|1⟩, so φ = atan2(y, x).
	const turns = len > 1e-12 ? (((Math.atan2(y, x) / (2 * Math.PI)) % 1) + 1) % 1 : 0;
	return { ...base, kind: 'mixed', angle: turns, angleText: turns.toFixed(5), coherence: len, ...expected, ...note, ...div };
}

export function toFrameView(f: TraceFrame, position: PositionView): FrameView {
	const qubits = f.qubits.map(toDial);
	const registerValues: Record<string, string | null> = {};
	for (const [k, v] of Object.entries(f.registerValues)) registerValues[k] = v === null ? null : v.toString();
	return {
		step: f.step,
		engine: f.engine,
		handover: f.handover,
		position,
		qubits,
		registerValues,
		distributions: f.distributions,
		checksum: f.checksum,
		diverged: f.qubits.filter((q) => q.fresh && q.matches === false).map((q) => q.qubit)
	};
}

/** Run the checker (sweep + proof) for the document's specs; progress goes to `progress`. */
export function runCheck(req: Extract<WorkerRequest, { type: 'check' }>, progress: (done: number, total: number) => void): WorkerResponse {
	const t0 = Date.now();
	const c = lowerCircuit(req.doc);
	const specs = req.doc.specs ?? [];
	if (!specs.length) return { id: req.id, type: 'error', message: 'Write a spec first (left panel), e.g. "b = a + b mod 8": a check compares the circuit with it.' };
	const choice: InputChoice =
		req.inputs.mode === 'all' ? { mode: 'all' } : req.inputs.mode === 'random' ? { mode: 'random', count: Math.max(1, Math.min(100_000, req.inputs.count)), seed: req.inputs.seed } : { mode: 'auto', sample: 1000, seed: 1 };
	let last = 0;
	const report = checkCircuit(c, specs, {
		inputs: choice,
		assume: req.doc.assume,
		ignorePhase: req.ignorePhase === true,
		// the browser worker keeps the proof small; the server and the command line may allow more
		proofLimits: { maxNodes: 1_000_000, timeMs: 10_000 },
		onProgress: (done, total) => {
			const now = Date.now();
			if (now - last > 60 || done === total) {
				last = now;
				progress(done, total);
			}
		}
	});
	// For the first failures, the step where each first leaves its expected angles (bounded work).
	const firstDivergences: (FailureDivergence | null)[] = [];
	let budget = MAX_FAILURE_REPLAY_GATES;
	for (const f of report.failures.slice(0, 20)) {
		if (budget < c.gateCount) {
			firstDivergences.push(null);
			continue;
		}
		budget -= c.gateCount;
		try {
			const s = new EngineSession({ id: 0, type: 'load', doc: req.doc, inputs: { values: f.input, superposed: [] } });
			const d = s.summary.firstDivergence;
			const pos = d ? s.position(d.step) : null;
			firstDivergences.push(d && pos ? { step: d.step, qubit: d.label, gate: pos.gateText ?? '', line: pos.source?.line ?? null } : null);
		} catch {
			firstDivergences.push(null);
		}
	}
	return { id: req.id, type: 'checked', report, millis: Date.now() - t0, firstDivergences };
}

/** Serve one request against the current session (the worker's message handler). */
export function handleRequest(
	session: EngineSession | null,
	req: WorkerRequest,
	progress: (done: number, total: number) => void = () => {}
): { session: EngineSession | null; response: WorkerResponse } {
	try {
		if (req.type === 'check') return { session, response: runCheck(req, progress) };
		if (req.type === 'load') {
			const s = new EngineSession(req);
			return { session: s, response: { id: req.id, type: 'loaded', summary: s.summary, frame: s.frame(0) } };
		}
		if (req.type === 'drawn') return { session, response: { id: req.id, type: 'error', message: 'Nothing waits for a drawn board.' } };
		if (!session) return { session, response: { id: req.id, type: 'error', message: 'Nothing is loaded yet.' } };
		if (req.type === 'frame') return { session, response: { id: req.id, type: 'frame', frame: session.frame(req.step) } };
		if (req.type === 'gates') return { session, response: { id: req.id, type: 'gates', ...session.gates(req.from, req.to) } };
		if (req.type === 'ledger') return { session, response: { id: req.id, type: 'ledger', ledger: session.ledger(req.qubit) } };
		const r = session.seek(req.from, req.kind, req.breakpoints);
		return { session, response: { id: req.id, type: 'seek', ...r } };
	} catch (e) {
		const path = e instanceof LoweringError ? e.path : undefined;
		return { session: req.type === 'load' ? null : session, response: { id: req.id, type: 'error', message: e instanceof Error ? e.message : String(e), path } };
	}
}
