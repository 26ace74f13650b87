import { error } from '@sveltejs/kit';
import { lowerCircuit, LoweringError } from '$lib/quantum/lower';
import { Run } from '$lib/quantum/run';
import type { CircuitDocument } from '$lib/quantum/circuit';
import { parseInputValue } from '$lib/worker/inputs';
import { intentsFromSpecs } from '$lib/worker/engine';
import type { TraceSummaryInput } from '$lib/schemas/debugging';

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

/** Lower and run `doc` on `inputs` within the server's bounds; the summary a browser would send. */
export function computeTraceSummary(doc: CircuitDocument, inputs: ServerInputs): TraceSummaryInput {
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
			if (raw !== undefined) values[r.name] = parseInputValue(raw, r.name, r.size);
		}
		for (const name of Object.keys(inputs.values)) if (!circuit.registers.some((r) => r.name === name)) unprocessable(`The circuit has no register "${name}".`);
	} catch (e) {
		if (e instanceof RangeError) unprocessable(e.message);
		throw e;
	}
	// The same expectations as the workbench's worker: block effects plus the document's specs.
	const { intents } = intentsFromSpecs(doc.specs ?? [], circuit);
	const run = new Run(circuit, { values, superposed: inputs.superposed }, { maxAmplitudeQubits: SERVER_MAX_AMPLITUDE_QUBITS, amplitudeKeyframeBytes: 64 * 2 ** 20, intents });
	if (run.stopped)
		unprocessable(`${run.stopped.reason}. The server's amplitude engine stops at ${SERVER_MAX_AMPLITUDE_QUBITS} qubits; run it in the workbench (its limit is higher) and save the trace from there.`);
	const label = (q: number) => {
		const r = circuit.registers.find((x) => q >= x.offset && q < x.offset + x.size)!;
		return `${r.name}[${q - r.offset}]`;
	};
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
