/**
 * Benchmarks of the computation core: `npx tsx src/lib/quantum/bench/run.ts [name-filter]`.
 * Prints one line per figure: `bench <name>: <value> <unit>` plus ` (ratio <r> vs <baseline>)`
 * when a baseline was measured in the same run. Add a bench by pushing onto `benches`.
 * Qubit order: flat (index bit q = qubit q); angles in turns.
 */
import { create, complexDependencies, addDependencies, multiplyDependencies } from 'mathjs';
import type { Complex } from 'mathjs';
import { createState, kernelH, kernelPhase } from '../amplitudes.js';
import { lowerCircuit } from '../lower.js';
import { applyLedgerGate, buildLedgerTables, createContributionLog, createLedgerState } from '../ledger.js';
import { Run } from '../run.js';
import type { CcpLowering, CircuitDocument } from '../circuit.js';
import { checkBenches } from './check-benches.js';
import { measureImport } from './import-bench.js';
import { modularBenches } from './modular-benches.js';

interface Figure {
	name: string;
	value: number;
	unit: string;
	baseline?: { name: string; value: number };
}
interface Bench {
	name: string;
	run: () => Figure[];
}

const now = () => performance.now();
const memMiB = () => {
	const p = (globalThis as { process?: { memoryUsage?: () => { heapUsed: number; rss: number } } }).process;
	return p?.memoryUsage ? p.memoryUsage() : null;
};

/** Median time (ms) of `reps` calls after one warm-up. */
function timeIt(reps: number, f: () => void): number {
	f();
	const t: number[] = [];
	for (let i = 0; i < reps; i++) {
		const s = now();
		f();
		t.push(now() - s);
	}
	t.sort((a, b) => a - b);
	return t[t.length >> 1];
}

const benches: Bench[] = [];

for (const n of [20, 24]) {
	benches.push({
		name: `amplitudes-${n}`,
		run: () => {
			const s = createState(n, 26);
			const dim = 2 ** n;
			// fill with a non-trivial normalised state
			for (let i = 0; i < s.data.length; i++) s.data[i] = ((i * 2654435761) % 1000) / 1000 - 0.5;
			const copy = new Float64Array(s.data.length);
			const reps = n >= 24 ? 5 : 15;
			const copyMs = timeIt(reps, () => copy.set(s.data));
			const perAmp = (ms: number) => (ms * 1e6) / dim;
			const base = { name: 'Float64Array copy', value: perAmp(copyMs) };
			const q = n >> 1;
			const h = timeIt(reps, () => kernelH(s.data, n, q));
			const cp = timeIt(reps, () => kernelPhase(s.data, n, (1 << q) | (1 << 3), 0.7071, 0.7071));
			const mcp3 = timeIt(reps, () => kernelPhase(s.data, n, (1 << q) | (1 << 3) | (1 << 1) | (1 << (n - 1)), 0.7071, 0.7071));
			return [
				{ name: `amplitudes copy ${n}q`, value: base.value, unit: 'ns/amp' },
				{ name: `amplitudes h ${n}q`, value: perAmp(h), unit: 'ns/amp', baseline: base },
				{ name: `amplitudes cp ${n}q`, value: perAmp(cp), unit: 'ns/amp', baseline: base },
				{ name: `amplitudes mcp3 ${n}q`, value: perAmp(mcp3), unit: 'ns/amp', baseline: base }
			];
		}
	});
}

benches.push({
	name: 'amplitudes-vs-mathjs-14',
	run: () => {
		// A straightforward implementation: an array of mathjs Complex, each gate builds a new array.
		const m = create({ complexDependencies, addDependencies, multiplyDependencies });
		const n = 14;
		const dim = 2 ** n;
		let naive: Complex[] = Array.from({ length: dim }, (_, i) => m.complex(i === 0 ? 1 : 0, 0));
		const r = m.complex(Math.SQRT1_2, 0);
		const ph = m.complex(Math.SQRT1_2, Math.SQRT1_2);
		const q = 7;
		const naiveH = () => {
			const out = new Array<Complex>(dim);
			for (let i = 0; i < dim; i++) {
				const j = i ^ (1 << q);
				const bit = (i >> q) & 1;
				out[i] = bit === 0 ? (m.multiply(r, m.add(naive[i], naive[j])) as Complex) : (m.multiply(r, m.add(naive[j], m.multiply(-1, naive[i]) as Complex)) as Complex);
			}
			naive = out;
		};
		const naivePhase = (mask: number) => () => {
			const out = new Array<Complex>(dim);
			for (let i = 0; i < dim; i++) out[i] = (i & mask) === mask ? (m.multiply(ph, naive[i]) as Complex) : naive[i];
			naive = out;
		};
		const s = createState(n);
		const perAmp = (ms: number) => (ms * 1e6) / dim;
		const cpMask = (1 << q) | (1 << 3);
		const mcpMask = cpMask | (1 << 1) | (1 << 12);
		const out: Figure[] = [];
		for (const [name, fast, slow] of [
			['h', () => kernelH(s.data, n, q), naiveH],
			['cp', () => kernelPhase(s.data, n, cpMask, Math.SQRT1_2, Math.SQRT1_2), naivePhase(cpMask)],
			['mcp3', () => kernelPhase(s.data, n, mcpMask, Math.SQRT1_2, Math.SQRT1_2), naivePhase(mcpMask)]
		] as [string, () => void, () => void][]) {
			const slowNs = perAmp(timeIt(5, slow));
			const fastNs = perAmp(timeIt(50, fast));
			// ratio printed as fast/slow; speed-up = 1/ratio
			out.push({ name: `amplitudes ${name} 14q vs mathjs`, value: fastNs, unit: 'ns/amp', baseline: { name: `mathjs complex (${slowNs.toFixed(1)} ns/amp, speed-up ${(slowNs / fastNs).toFixed(0)}x)`, value: slowNs } });
		}
		return out;
	}
});

const multiplierDoc = (n: number, lowering: CcpLowering): CircuitDocument => ({
	format: 'orrery.circuit',
	version: 1,
	title: `${n}x${n} multiplier`,
	registers: [{ name: 'a', size: n }, { name: 'b', size: n }, { name: 'p', size: 2 * n }],
	body: [{ id: 'mul', type: 'multiply', a: 'a', b: 'b', product: 'p', ccpLowering: lowering }]
});

// Invented operands for the 64-bit benches.
const A64 = 0xc0ffee1234567891n;
const B64 = 0x0badf00d9876543fn;

for (const lowering of ['native', 'no-ancilla'] as const) {
	benches.push({
		name: `ledger-mul64-${lowering}`,
		run: () => {
			const m0 = memMiB();
			let t = now();
			const c = lowerCircuit(multiplierDoc(64, lowering));
			const lowerMs = now() - t;
			const bits = new Uint8Array(c.qubitCount);
			for (let i = 0; i < 64; i++) {
				bits[i] = Number((A64 >> BigInt(i)) & 1n);
				bits[64 + i] = Number((B64 >> BigInt(i)) & 1n);
			}
			t = now();
			const tables = buildLedgerTables(c);
			const s = createLedgerState(c.qubitCount, bits);
			const log = createContributionLog(c.gateCount);
			for (let g = 0; g < c.gateCount; g++) if (!applyLedgerGate(s, c, tables, g, log)) throw new Error(`entangled at ${g}`);
			const ledgerMs = now() - t;
			let p = 0n;
			for (let i = 0; i < 128; i++) if (s.bit[128 + i]) p |= 1n << BigInt(i);
			if (p !== A64 * B64) throw new Error('wrong product');
			t = now();
			const run = new Run(c, { values: { a: A64, b: B64 } });
			const runMs = now() - t;
			if (run.divergences.length) throw new Error(run.divergences[0].message);
			const m1 = memMiB();
			const out: Figure[] = [
				{ name: `ledger mul64 ${lowering} gates`, value: c.gateCount, unit: 'gates' },
				{ name: `ledger mul64 ${lowering} lowering`, value: lowerMs, unit: 'ms' },
				{ name: `ledger mul64 ${lowering} ledger pass`, value: ledgerMs, unit: 'ms' },
				{ name: `ledger mul64 ${lowering} full Run (expectations, keyframes, checks)`, value: runMs, unit: 'ms' }
			];
			if (m0 && m1) out.push({ name: `ledger mul64 ${lowering} heap after`, value: m1.heapUsed / 2 ** 20, unit: 'MiB' }, { name: `ledger mul64 ${lowering} rss after`, value: m1.rss / 2 ** 20, unit: 'MiB' });
			// Seek: random frames of this ≥ 1M-gate run (no-ancilla) or of the native run.
			let seed = 12345;
			const rand = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31);
			const times: number[] = [];
			for (let i = 0; i < 20; i++) {
				const step = Math.floor(rand() * run.stepCount);
				const s0 = now();
				run.frameAt(step);
				times.push(now() - s0);
			}
			times.sort((x, y) => x - y);
			out.push({ name: `seek ${lowering} run of ${c.gateCount} gates, median`, value: times[10], unit: 'ms' }, { name: `seek ${lowering} run of ${c.gateCount} gates, max`, value: times[19], unit: 'ms' });
			return out;
		}
	});
}

// The checker's benches (proofs of 32- and 64-bit multipliers, sweep throughput, import).
benches.push(...checkBenches);
// The modular parts: a 16-bit modular exponentiation on the ledger, the 8-bit modular multiplier's proof.
benches.push(...modularBenches);

// The OpenQASM importer on a 200 000-gate exporter-style file, against splitting the same text
// into lines (the least any reader must do). Target: ≥ 1 000 000 gates/s. The fast path's gates
// stay ints until the document's body is read; the second pair of lines reads it (every item made).
benches.push({
	name: 'qasm-import-exporter-style',
	run: () => {
		const gates = 200_000;
		const m = measureImport(gates, 5);
		return [
			{ name: `qasm import, ${gates} gates (ns per gate)`, value: (m.importMs * 1e6) / gates, unit: 'ns', baseline: { name: 'split into lines (ns per line)', value: (m.splitMs * 1e6) / gates } },
			{ name: 'qasm import throughput', value: m.gatesPerSecond, unit: 'gates/s' },
			// A consumer that reads the body (saving it as JSON, lowering it) makes one item per gate.
			{ name: `qasm import and every body item made, ${gates} gates (ns per gate)`, value: (m.withBodyMs * 1e6) / gates, unit: 'ns', baseline: { name: 'split into lines (ns per line)', value: (m.splitMs * 1e6) / gates } },
			{ name: 'qasm import and every body item made, throughput', value: m.withBodyGatesPerSecond, unit: 'gates/s' }
		];
	}
});

const filter = (globalThis as { process?: { argv?: string[] } }).process?.argv?.[2];
for (const b of benches) {
	if (filter && !b.name.includes(filter)) continue;
	for (const f of b.run()) {
		const v = f.value >= 100 ? f.value.toFixed(0) : f.value.toPrecision(3);
		console.log(`bench ${f.name}: ${v} ${f.unit}${f.baseline ? ` (ratio ${(f.value / f.baseline.value).toPrecision(3)} vs ${f.baseline.name})` : ''}`);
	}
}
