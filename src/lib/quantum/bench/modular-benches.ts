/**
 * Benchmarks of the modular parts (Beauregard 2003, quant-ph/0205095): the exact ledger run of a
 * 16-bit modular exponentiation on one basis input (gates per second, gate count against the
 * derived formula), and the proof time of the 8-bit controlled modular multiplier over its
 * domain b < N. Runnable alone: `npx tsx src/lib/quantum/bench/modular-benches.ts`.
 * Qubit order: index 0 = LSB; angles in turns.
 */
import { lowerCircuit } from '../lower.js';
import type { CircuitDocument } from '../circuit.js';
import { applyLedgerGate, buildLedgerTables, createLedgerState } from '../ledger.js';
import { checkCircuit } from '../check/index.js';
import { modExpCounts } from '../check/modular-resources.js';
import { powMod } from '../modular.js';
import type { CheckBench, CheckFigure } from './check-benches.js';

const now = () => performance.now();

/** y ← 7^e·y mod 65521 with N of n = 16 bits and an exponent register of 2n = 32 bits. */
function modExp16(): CheckBench {
	return {
		name: 'modexp16-ledger',
		run: () => {
			const n = 16;
			const e = 2 * n;
			const N = 65521n; // largest prime below 2^16
			const a = 7n;
			const doc: CircuitDocument = {
				format: 'orrery.circuit',
				version: 1,
				title: '16-bit modular exponentiation',
				registers: [
					{ name: 'e', size: e },
					{ name: 'y', size: n },
					{ name: 'w', size: n + 1 },
					{ name: 'anc', size: 1, role: 'ancilla' }
				],
				body: [{ id: 'x', type: 'mod-exp', exponent: 'e', y: 'y', work: 'w', value: String(a), modulus: String(N), ancilla: { register: 'anc', index: 0 } }]
			};
			let t = now();
			const c = lowerCircuit(doc);
			const lowerMs = now() - t;
			const formula = modExpCounts(a, N, n + 1, e, 'native', n + 1).gates;
			const E = 0xdeadbeefn;
			const bits = new Uint8Array(c.qubitCount);
			for (let i = 0; i < e; i++) bits[i] = Number((E >> BigInt(i)) & 1n);
			bits[e] = 1; // y = 1
			t = now();
			const lt = buildLedgerTables(c);
			const s = createLedgerState(c.qubitCount, bits);
			for (let g = 0; g < c.gateCount; g++) if (!applyLedgerGate(s, c, lt, g, null)) throw new Error(`gate ${g} left the ledger`);
			const ms = now() - t;
			let y = 0n;
			for (let i = 0; i < n; i++) if (s.bit[e + i]) y |= 1n << BigInt(i);
			if (y !== powMod(a, E, N)) throw new Error(`ledger gave ${y}, expected 7^${E} mod ${N} = ${powMod(a, E, N)}`);
			return [
				{ name: 'modexp16 gates (lowered)', value: c.gateCount, unit: 'gates' },
				{ name: 'modexp16 gates (formula)', value: formula, unit: `gates (${c.gateCount === formula ? 'equal' : 'DIFFERENT'})` },
				{ name: 'modexp16 lowering', value: lowerMs, unit: 'ms' },
				{ name: 'modexp16 ledger run, one basis input', value: ms, unit: 'ms' },
				{ name: 'modexp16 ledger throughput', value: c.gateCount / (ms / 1000), unit: 'gates/s' }
			];
		}
	};
}

/** The 8-bit controlled modular multiplier b ← (b + c·a·x) mod 251 proved over b < 251. */
function proofMul8(): CheckBench {
	return {
		name: 'modmul8-proof',
		run: () => {
			const n = 8;
			const doc: CircuitDocument = {
				format: 'orrery.circuit',
				version: 1,
				title: '8-bit controlled modular multiplier',
				registers: [
					{ name: 'c', size: 1 },
					{ name: 'x', size: n },
					{ name: 'b', size: n + 1 },
					{ name: 'anc', size: 1, role: 'ancilla' }
				],
				body: [{ id: 'm', type: 'mod-mul', x: 'x', target: 'b', value: '100', modulus: '251', control: { register: 'c', index: 0 }, ancilla: { register: 'anc', index: 0 } }]
			};
			const c = lowerCircuit(doc);
			const t = now();
			const r = checkCircuit(c, ['b = b + c*100*x mod 251'], { assume: ['b < 251'], inputs: { mode: 'given', values: new Map([['c', 1n], ['x', 200n], ['b', 250n]]) } });
			const ms = now() - t;
			const out: CheckFigure[] = [
				{ name: 'modmul8 gates', value: c.gateCount, unit: 'gates' },
				{ name: `modmul8 proof over b < 251 (${r.proof.status}${r.proof.reason ? `: ${r.proof.reason}` : ''})`, value: r.proof.stats.ms, unit: 'ms' },
				{ name: 'modmul8 check total (one swept input + proof)', value: ms, unit: 'ms' }
			];
			return out;
		}
	};
}

/** The modular benches, in the order `npm run bench` prints them. */
export const modularBenches: CheckBench[] = [modExp16(), proofMul8()];

const self = (globalThis as { process?: { argv?: string[] } }).process?.argv?.[1] ?? '';
if (self.endsWith('modular-benches.ts')) for (const b of modularBenches) for (const f of b.run()) console.log(`bench ${f.name}: ${f.value >= 100 ? f.value.toFixed(0) : f.value.toPrecision(3)} ${f.unit}`);
