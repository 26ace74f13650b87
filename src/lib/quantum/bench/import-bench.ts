/**
 * Importer throughput on a large OpenQASM 2 file of the kind exporters write (u1 / cx / h / rz on a
 * 64-qubit register with 6-digit and full-precision angles), against reading and splitting the
 * same text into lines in the same run. Figures: gates/s and ns per gate.
 */
import { importQasm } from '../qasm/import.js';

/** A synthetic exporter-style file with `gates` gate lines (deterministic). */
export function exporterStyleQasm(gates: number): string {
	const lines = ['OPENQASM 2.0;', 'include "qelib1.inc";', 'qreg q[64];', 'creg c[64];'];
	const angles = ['0.785398', '-0.392699', '1.5707963267948966', 'pi/8', '-pi/16', '0.19634954084936207'];
	let x = 12345;
	for (let g = 0; g < gates; g++) {
		x = (x * 1103515245 + 12345) >>> 0;
		const a = x % 64;
		const b = (a + 1 + ((x >>> 8) % 63)) % 64;
		switch ((x >>> 16) % 4) {
			case 0:
				lines.push(`cx q[${a}],q[${b}];`);
				break;
			case 1:
				lines.push(`u1(${angles[(x >>> 20) % angles.length]}) q[${a}];`);
				break;
			case 2:
				lines.push(`h q[${a}];`);
				break;
			default:
				lines.push(`rz(${angles[(x >>> 20) % angles.length]}) q[${b}];`);
		}
	}
	return lines.join('\n') + '\n';
}

/**
 * Median over `reps` runs (after a warm-up) of the line split, of the importer (the file read,
 * checked and its decomposed gates recognised; the fast path's gates kept as ints), and of the
 * importer followed by a read of the document's body (every item made, as a consumer that saves
 * or lowers the document does). Gates/s of the importer and of the import with the body read.
 */
export function measureImport(gates: number, reps = 3): { importMs: number; withBodyMs: number; splitMs: number; gatesPerSecond: number; withBodyGatesPerSecond: number } {
	const text = exporterStyleQasm(gates);
	const med = (f: () => void) => {
		f();
		const t: number[] = [];
		for (let i = 0; i < reps; i++) {
			const s = performance.now();
			f();
			t.push(performance.now() - s);
		}
		return t.sort((a, b) => a - b)[t.length >> 1];
	};
	let sink = 0;
	// A document holds at most 100 000 items; this measures reading a larger file (items raised to fit).
	const limits = { maxGates: 4 * gates, maxBytes: 64 * text.length, maxItems: 4 * gates };
	const splitMs = med(() => {
		sink += text.split('\n').length;
	});
	const importMs = med(() => {
		sink += importQasm(text, { limits }).document.registers.length;
	});
	const withBodyMs = med(() => {
		sink += importQasm(text, { limits }).document.body.length;
	});
	if (sink < 0) throw new Error('unreachable');
	return { importMs, withBodyMs, splitMs, gatesPerSecond: (gates / importMs) * 1000, withBodyGatesPerSecond: (gates / withBodyMs) * 1000 };
}
