/**
 * Benchmarks of the checker: proof of 32- and 64-bit multipliers, sweep throughput on a 4-bit
 * multiplier (all 256 inputs), and OpenQASM import speed. Same shape as the core's bench registry
 * ({name, run} returning figures); runnable alone: `npx tsx src/lib/quantum/bench/check-benches.ts`.
 * Qubit order: index 0 = LSB; angles in turns.
 */
import { lowerCircuit } from '../lower.js';
import type { CcpLowering, CircuitDocument } from '../circuit.js';
import { checkCircuit, parseSpec, proveCircuit, sweepCircuit } from '../check/index.js';
import { specPolynomial } from '../check/spec.js';
import { exportQasm } from '../qasm/export.js';
import { importQasm } from '../qasm/import.js';
import { parseCondition } from '../check/spec.js';
import { symbolicProve } from '../check/symbolic.js';
import { beauregardCMult, beauregardModAdder, cuccaroAdder } from '../testing/arith.js';

/** One measured figure. */
export interface CheckFigure {
	name: string;
	value: number;
	unit: string;
}
/** A bench: a name and a function returning its figures. */
export interface CheckBench {
	name: string;
	run: () => CheckFigure[];
}

const multiplier = (n: number, lowering: CcpLowering): CircuitDocument => ({
	format: 'orrery.circuit',
	version: 1,
	title: `${n}-bit multiplier`,
	registers: [
		{ name: 'a', size: n },
		{ name: 'b', size: n },
		{ name: 'p', size: n },
		{ name: 'anc', size: 1, role: 'ancilla' }
	],
	body: [{ id: 'm', type: 'multiply', a: 'a', b: 'b', product: 'p', ccpLowering: lowering }]
});

function proofBench(n: number, lowering: CcpLowering): CheckBench {
	return {
		name: `proof-mult${n}-${lowering}`,
		run: () => {
			const c = lowerCircuit(multiplier(n, lowering));
			const spec = parseSpec(`p = a*b mod 2^${n}`, c.registers);
			const t0 = performance.now();
			const poly = specPolynomial(spec, c.registers, new Set(['a', 'b']))!;
			const r = proveCircuit(c, { inputs: new Set(['a', 'b']), outputs: new Map([['p', poly]]) });
			const ms = performance.now() - t0;
			if (r.status !== 'proved') throw new Error(`proof of the ${n}-bit multiplier failed: ${r.status} ${r.reason ?? ''}`);
			return [
				{ name: `proof ${n}-bit multiplier (${lowering}, ${c.gateCount} gates, all 2^${2 * n} inputs)`, value: Math.round(ms), unit: 'ms' },
				{ name: `proof ${n}-bit multiplier gates per second`, value: Math.round(c.gateCount / (ms / 1000)), unit: 'gates/s' }
			];
		}
	};
}

/** The general prover on a whole circuit document carrying its specs and domain (expects `proved`). */
function symbolicBench(name: string, doc: CircuitDocument): CheckBench {
	return {
		name: `proof-${name}`,
		run: () => {
			const c = lowerCircuit(doc);
			const specs = doc.specs!.map((t) => parseSpec(t, c.registers));
			const conditions = (doc.assume ?? []).map((t) => parseCondition(t, c.registers));
			const inputs = [...new Set([...specs.flatMap((x) => x.reads), ...conditions.flatMap((x) => x.reads)])];
			const t0 = performance.now();
			const r = symbolicProve(c, { specs, conditions, inputs, limits: { maxNodes: 8_000_000, timeMs: 120_000 } });
			const ms = performance.now() - t0;
			if (r.status !== 'proved') throw new Error(`proof of ${doc.title} did not succeed: ${r.status} ${r.reason ?? ''}`);
			return [
				{ name: `proof ${doc.title} (${c.gateCount} gates, ${r.domain.count} domain inputs, ${r.nodes} BDD nodes)`, value: Math.round(ms), unit: 'ms' },
				{ name: `proof ${name} gates per second`, value: Math.round(c.gateCount / (ms / 1000)), unit: 'gates/s' }
			];
		}
	};
}

/** The checker's benches. */
export const checkBenches: CheckBench[] = [
	symbolicBench('cuccaro64', cuccaroAdder(64)),
	symbolicBench('modadd16', beauregardModAdder(16, 65521n, 12345n)),
	symbolicBench('cmult8', beauregardCMult(8, 251n, 7n)),
	proofBench(32, 'native'),
	proofBench(64, 'native'),
	proofBench(32, 'quarter'),
	{
		name: 'sweep-mult4',
		run: () => {
			const d = multiplier(4, 'native');
			d.registers[2].size = 8;
			const c = lowerCircuit(d);
			const specs = [parseSpec('p = a*b mod 2^8', c.registers)];
			sweepCircuit(c, specs, { choice: { mode: 'all' } });
			const t0 = performance.now();
			const reps = 5;
			let cases = 0;
			for (let i = 0; i < reps; i++) {
				const r = sweepCircuit(c, specs, { choice: { mode: 'all' } });
				if (r.failed) throw new Error('4-bit multiplier sweep failed');
				cases += r.cases;
			}
			const s = (performance.now() - t0) / 1000;
			return [{ name: `sweep 4-bit multiplier (${c.gateCount} gates, all 256 inputs, ledger)`, value: Math.round(cases / s), unit: 'inputs/s' }];
		}
	},
	{
		name: 'check-adder8',
		run: () => {
			const d: CircuitDocument = {
				format: 'orrery.circuit',
				version: 1,
				title: 'adder',
				registers: [
					{ name: 'a', size: 8 },
					{ name: 'b', size: 8 }
				],
				body: [
					{ id: 'f', type: 'qft', register: 'b', swaps: false },
					{ id: 'x', type: 'add', addend: 'a', target: 'b' },
					{ id: 'i', type: 'iqft', register: 'b', swaps: false }
				]
			};
			const c = lowerCircuit(d);
			const t0 = performance.now();
			const r = checkCircuit(c, ['b = a + b mod 2^8']);
			const ms = performance.now() - t0;
			if (!r.ok) throw new Error('8-bit adder check failed');
			return [{ name: `check 8-bit adder (sweep of all 65536 inputs + proof)`, value: Math.round(ms), unit: 'ms' }];
		}
	},
	{
		name: 'qasm-import',
		run: () => {
			// The 16-bit multiplier as this project exports it (every doubly controlled phase written
			// out with controlled phases and CNOTs), read back: the file's gates are what is read; the
			// recogniser turns each written-out ccp back into one gate, so the document holds fewer.
			const lowered = lowerCircuit(multiplier(16, 'no-ancilla'));
			const text = exportQasm(lowered, { version: 3 });
			const time = () => {
				const t0 = performance.now();
				const r = importQasm(text);
				return { ms: performance.now() - t0, items: r.document.body.length };
			};
			const cold = time();
			const warm = [time(), time(), time(), time(), time()].map((x) => x.ms).sort((a, b) => a - b)[2];
			const label = `OpenQASM 3 import of an exported 16-bit multiplier (${lowered.gateCount} gates in ${(text.length / 1e3).toFixed(0)} kB, ${cold.items} items after recognition)`;
			return [
				{ name: `${label}, first import in the process`, value: Math.round(lowered.gateCount / (cold.ms / 1000)), unit: 'gates/s' },
				{ name: `${label}, median of 5 after it`, value: Math.round(lowered.gateCount / (warm / 1000)), unit: 'gates/s' }
			];
		}
	}
];

const argv1 = (globalThis as { process?: { argv: string[] } }).process?.argv[1] ?? '';
if (argv1.endsWith('check-benches.ts')) {
	const filter = (globalThis as { process?: { argv: string[] } }).process?.argv[2] ?? '';
	for (const b of checkBenches) {
		if (filter && !b.name.includes(filter)) continue;
		for (const f of b.run()) console.log(`bench ${f.name}: ${f.value} ${f.unit}`);
	}
}
