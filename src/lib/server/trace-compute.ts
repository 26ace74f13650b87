import { error } from '@sveltejs/kit';
import { lowerCircuit, LoweringError } from '$lib/quantum/lower';
import { Run } from '$lib/quantum/run';
import type { CircuitDocument } from '$lib/quantum/circuit';
import { parseRegisterValue } from '$lib/quantum/inputs';
import { describeGate, prepareIntents, toFrameView } from '$lib/worker/engine';
import { gateAt, gateProvenance, qubitLabel, type LoweredCircuit } from '$lib/quantum/circuit';
import { formatTurns } from '$lib/quantum/angle';
import { renderDialBoardSvg } from '$lib/dials/dial-svg';
import type { TraceSummaryInput } from '$lib/schemas/review';
import type { LedgerExcerpt } from '$lib/review/types';

export type { LedgerExcerpt };

// The server runs a circuit itself when a trace arrives without a summary (the command line).
// A request must not be able to hang the process, and the run is synchronous, so the work is
// bounded before it starts: at most SERVER_MAX_GATES lowered gates (the exact ledger costs O(1)
// per gate) and at most SERVER_MAX_AMPLITUDE_QUBITS qubits once the amplitude engine takes over
// (2^12 amplitudes × 50 000 gates is well under a second here). A run that would need more is
// refused with a sentence pointing at the workbench, whose worker has the browser's limits.

export const SERVER_MAX_GATES = 50_000;
/** Block calls expanded at most (calls that make no gate cost work too: issue 10). */
export const SERVER_MAX_CALLS = 20_000;
export const SERVER_MAX_AMPLITUDE_QUBITS = 12;

export type ServerInputs = { values: Record<string, string>; superposed: string[] };

const unprocessable = (message: string): never => error(422, { message, code: 'bad_request' });

/** Lower and run `doc` on `inputs` within the server's bounds (422 with a sentence past them). */
function runOnServer(doc: CircuitDocument, inputs: ServerInputs): { circuit: LoweredCircuit; run: Run } {
	let circuit;
	try {
		circuit = lowerCircuit(doc, { limits: { maxGates: SERVER_MAX_GATES, maxCalls: SERVER_MAX_CALLS } });
	} catch (e) {
		if (e instanceof LoweringError || e instanceof RangeError) unprocessable(`The circuit does not lower here: ${e.message}`);
		throw e;
	}
	const needsAmplitudes = inputs.superposed.length > 0;
	if (needsAmplitudes && circuit.qubitCount > SERVER_MAX_AMPLITUDE_QUBITS)
		unprocessable(`Superposed inputs need the amplitude engine, which the server runs for at most ${SERVER_MAX_AMPLITUDE_QUBITS} qubits (this circuit has ${circuit.qubitCount}). Save the trace from the workbench instead.`);
	const values: Record<string, bigint> = {};
	try {
		for (const r of circuit.registers) {
			if (inputs.superposed.includes(r.name)) continue;
			const raw = inputs.values[r.name];
			if (raw !== undefined) values[r.name] = parseRegisterValue(raw, r.name, r.size);
		}
		for (const name of Object.keys(inputs.values)) if (!circuit.registers.some((r) => r.name === name)) unprocessable(`The circuit has no register "${name}".`);
	} catch (e) {
		if (e instanceof RangeError) unprocessable(e.message);
		throw e;
	}
	// The same expectations as the workbench's worker: block effects plus the document's specs, and
	// for a circuit without QFT blocks (an imported gate list) the Fourier sections found from its
	// gates. Without those sections an imported circuit never diverged here (issue 18).
	const { intents, intentSections } = prepareIntents(doc, circuit);
	const run = new Run(circuit, { values, superposed: inputs.superposed }, { maxAmplitudeQubits: SERVER_MAX_AMPLITUDE_QUBITS, amplitudeKeyframeBytes: 64 * 2 ** 20, intents, intentSections });
	if (run.stopped)
		unprocessable(`${run.stopped.reason}. The server's amplitude engine stops at ${SERVER_MAX_AMPLITUDE_QUBITS} qubits; run it in the workbench (its limit is higher) and save the trace from there.`);
	return { circuit, run };
}

/** Lower and run `doc` on `inputs` within the server's bounds; the summary a browser would send. */
export function computeTraceSummary(doc: CircuitDocument, inputs: ServerInputs): TraceSummaryInput {
	const { circuit, run } = runOnServer(doc, inputs);
	const label = (q: number) => qubitLabel(circuit.registers, q);
	const last = run.frameAt(run.lastStep);
	const registerValues: Record<string, string | null> = {};
	for (const [k, v] of Object.entries(last.registerValues)) registerValues[k] = v === null ? null : v.toString();
	const first = run.divergences[0];
	return {
		engine: last.engine,
		gateCount: circuit.gateCount,
		lastStep: run.lastStep,
		qubitCount: circuit.qubitCount,
		registerValues,
		distributions: last.distributions,
		firstDivergence: first ? { step: first.step, qubit: first.qubit, label: label(first.qubit), message: first.message.slice(0, 1000) } : null,
		divergenceCount: run.divergences.length,
		handover: run.handover,
		stopped: null,
		keyframeChecksums: run.keyframeChecksums
	};
}

/** Most ledger rows a report keeps (the ones up to and including its step). */
export const BOARD_LEDGER_ROWS = 8;

export type BoardPicture = { step: number; svg: string; ledger: LedgerExcerpt | null; diverged: string[] };

const turnsText = (a: Parameters<typeof formatTurns>[0]) => formatTurns(a).replace(/ turn.*$/, '');

/**
 * The dial board at `step` of a run of `doc` on `inputs`, drawn as an SVG on the server, and the
 * ledger of the qubit the step is about (the first one diverged at that step, else the run's
 * first diverged qubit) up to that step. Same bounds as computeTraceSummary.
 */
export function drawBoardAt(doc: CircuitDocument, inputs: ServerInputs, step: number, caption: string[] = []): BoardPicture {
	const { circuit, run } = runOnServer(doc, inputs);
	const s = Math.max(0, Math.min(step, run.lastStep));
	const frame = run.frameAt(s);
	const g = s > 0 ? s - 1 : null;
	const view = toFrameView(frame, {
		step: s,
		gateIndex: g,
		gateText: g === null ? null : describeGate(gateAt(circuit, g), circuit),
		blockPath: [],
		itemId: null,
		loop: {},
		source: g === null ? null : (gateProvenance(circuit, g).source ?? null)
	});
	const label = (q: number) => qubitLabel(circuit.registers, q);
	const qubit = view.diverged[0] ?? run.divergences[0]?.qubit ?? null;
	let ledger: LedgerExcerpt | null = null;
	if (qubit !== null) {
		const upTo = run.qubitLedger(qubit).entries.filter((e) => e.step <= s);
		const shown = upTo.slice(-BOARD_LEDGER_ROWS);
		ledger = {
			qubit,
			label: label(qubit),
			earlier: upTo.length - shown.length,
			rows: shown.map((e) => ({
				step: e.step,
				gate: describeGate(gateAt(circuit, e.gate), circuit),
				line: gateProvenance(circuit, e.gate).source?.line ?? null,
				amount: e.amount ? turnsText(e.amount) : null,
				total: e.total ? turnsText(e.total) : null,
				expected: e.expected ? turnsText(e.expected) : null,
				parted: e.parted
			}))
		};
	}
	const lines = [...caption, `step ${s} of ${run.lastStep}${view.position.gateText ? ` · after ${view.position.gateText}` : ''} · ${frame.engine} engine · exact simulation, not a hardware run`];
	return { step: s, svg: renderDialBoardSvg(view.qubits, { caption: lines, selected: qubit }), ledger, diverged: view.diverged.map(label) };
}
