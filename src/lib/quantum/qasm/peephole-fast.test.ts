import { describe, expect, it } from 'vitest';
import { CIRCUIT_FORMAT, CIRCUIT_VERSION, type BodyItem, type CircuitDocument, type GateItem } from '../circuit.js';
import { recogniseDecompositions, type PeepholeOptions } from './peephole.js';
import { recogniseDecompositionsReference } from '../testing/peephole-reference.js';
import { importQasm } from './import.js';
import { exporterStyleQasm } from '../bench/import-bench.js';
import { mulberry32 } from '../testing/rng.js';

// `peephole.ts` (parallel arrays, regions checked before they are rewritten, cancellation tried
// only near rewritten gates) against its plain reference `peephole-reference.ts` (one object per
// gate, as the rules were first written): on random gate lists full of the decompositions the
// rules look for, the two must return the same body, the same source indices and the same report.
// Every rule is proved as a matrix identity in peephole.test.ts; this file only checks that the
// fast version makes the same choices.


const ANGLES = ['1/2^3 turn', '7/2^3 turn', '1/2^4 turn', '15/2^4 turn', '1/2^1 turn', '3/2^5 turn', '29/2^5 turn', '~0.1234', '0 turn', '1/2^2 turn', '3/2^2 turn'];

/** A random document on `n` qubits of two registers, made of decomposition snippets and noise. */
function randomDoc(r: () => number, n: number, length: number): CircuitDocument {
	const body: BodyItem[] = [];
	let id = 0;
	const ref = (q: number) => (q < 3 ? { register: 'a', index: q } : { register: 'b', index: q - 3 });
	const gate = (g: GateItem['gate'], qs: number[], angle?: string) => {
		const item: GateItem = { id: `g${++id}`, type: 'gate', gate: g, qubits: qs.map(ref), source: { line: id, column: 1 } };
		if (angle !== undefined) item.angle = angle;
		body.push(item);
	};
	const pick = () => Math.floor(r() * n);
	const two = () => {
		const a = pick();
		let b = pick();
		while (b === a) b = pick();
		return [a, b];
	};
	const three = () => {
		const [a, b] = two();
		let c = pick();
		while (c === a || c === b) c = pick();
		return [a, b, c];
	};
	const angle = () => ANGLES[Math.floor(r() * ANGLES.length)];
	while (body.length < length) {
		const k = Math.floor(r() * 11);
		if (k === 0) {
			// cp written with p and two CNOTs (either orientation), sometimes with a wrong angle.
			const [c, t] = two();
			const a = angle();
			gate('p', [c], a);
			gate(r() < 0.5 ? 'p' : 'rz', [t], a);
			gate('cx', [c, t]);
			gate('p', [t], r() < 0.8 ? a.replace(/^(\d)/, '-$1') : angle());
			gate('cx', [c, t]);
		} else if (k === 1) {
			// The N&C Toffoli network.
			const [a, b, c] = three();
			gate('h', [c]);
			gate('cx', [b, c]);
			gate('p', [c], '7/2^3 turn');
			gate('cx', [a, c]);
			gate('p', [c], '1/2^3 turn');
			gate('cx', [b, c]);
			gate('p', [c], '7/2^3 turn');
			gate('cx', [a, c]);
			gate('p', [b], '1/2^3 turn');
			gate('p', [c], '1/2^3 turn');
			gate('h', [c]);
			gate('cx', [a, b]);
			gate('p', [a], '1/2^3 turn');
			gate('p', [b], '7/2^3 turn');
			gate('cx', [a, b]);
		} else if (k === 2) {
			// A Toffoli pair around a phase on its target.
			const [a, b, c] = three();
			gate('ccx', [a, b, c]);
			gate(r() < 0.5 ? 'p' : 'cp', r() < 0.5 ? [c] : [pick() === c ? a : pick(), c].filter((q, i, s) => s.indexOf(q) === i), angle());
			gate('ccx', [a, b, c]);
		} else if (k === 3) {
			// ccp without an ancilla: controlled phases and CNOTs.
			const [a, b, c] = three();
			gate('cp', [b, c], '1/2^4 turn');
			gate('cx', [a, b]);
			gate('cp', [b, c], '15/2^4 turn');
			gate('cx', [a, b]);
			gate('cp', [a, c], '1/2^4 turn');
		} else if (k === 4) gate('h', [pick()]);
		else if (k === 5) gate('cx', two());
		else if (k === 6) gate(r() < 0.5 ? 'p' : 'rz', [pick()], angle());
		else if (k === 7) gate('cp', two(), angle());
		else if (k === 8) gate('x', [pick()]);
		else if (k === 9 && r() < 0.2) body.push({ id: `g${++id}`, type: 'call', block: 'blk', args: {} });
		else if (k === 10) gate('ccx', three());
	}
	return {
		format: CIRCUIT_FORMAT,
		version: CIRCUIT_VERSION,
		title: 'random',
		registers: [
			{ name: 'a', size: 3 },
			{ name: 'b', size: n - 3 }
		],
		body
	};
}

function expectSameAsReference(doc: CircuitDocument, options: PeepholeOptions = {}) {
	const fast = recogniseDecompositions(doc, options);
	const ref = recogniseDecompositionsReference(doc, options);
	expect(JSON.stringify(fast)).toBe(JSON.stringify(ref));
	return fast.report;
}

describe('the fast peephole makes the same choices as its reference', () => {
	it('300 random gate lists on 4 to 7 qubits, with every rule firing somewhere', () => {
		const r = mulberry32(0xc0ffee);
		const fired = { regions: 0, toffolis: 0, toffoliPhases: 0, cancelledPairs: 0, rzAsPhase: 0, stopped: 0 };
		for (let k = 0; k < 300; k++) {
			const doc = randomDoc(r, 4 + (k % 4), 20 + Math.floor(r() * 200));
			const options: PeepholeOptions = k % 10 === 7 ? { maxWork: 50 + k } : k % 10 === 8 ? { maxRegion: 3 + (k % 7) } : {};
			const rep = expectSameAsReference(doc, options);
			fired.regions += rep.regions;
			fired.toffolis += rep.toffolis;
			fired.toffoliPhases += rep.toffoliPhases;
			fired.cancelledPairs += rep.cancelledPairs;
			fired.rzAsPhase += rep.rzAsPhase;
			fired.stopped += rep.stoppedAtLimit ? 1 : 0;
		}
		// The lists exercised every rule and the work limit (else the comparison proves little).
		for (const [rule, count] of Object.entries(fired)) expect(count, rule).toBeGreaterThan(0);
	});

	it('long lists (cancellation windows of 256 gates, gates far apart) and an imported exporter-style file', () => {
		const r = mulberry32(0xbeef);
		for (let k = 0; k < 4; k++) expectSameAsReference(randomDoc(r, 12 + k, 3000));
		const doc = importQasm(exporterStyleQasm(20_000), { recogniseDecompositions: false }).document;
		expect(expectSameAsReference(doc).regions).toBeGreaterThan(0);
	});
});
