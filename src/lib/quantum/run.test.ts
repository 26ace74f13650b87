import { describe, expect, it } from 'vitest';
import { lowerCircuit } from './lower.js';
import { Run, fnv1a } from './run.js';
import { dyadic } from './angle.js';
import type { CircuitDocument } from './circuit.js';

// Invented scenario: a greenhouse controller accumulates sensor counts into a tally register.
const tally = (extra: CircuitDocument['body'] = [], lowering: 'native' | 'no-ancilla' = 'native'): CircuitDocument => ({
	format: 'orrery.circuit',
	version: 1,
	title: 'greenhouse tally',
	registers: [{ name: 'en', size: 1 }, { name: 'sensor', size: 3 }, { name: 'tally', size: 4 }],
	body: [
		{ id: 'q', type: 'qft', register: 'tally', swaps: false },
		{ id: 'add', type: 'add', addend: 'sensor', target: 'tally', control: { register: 'en', index: 0 }, shift: 1, ccpLowering: lowering },
		...extra,
		{ id: 'iq', type: 'iqft', register: 'tally', swaps: false }
	]
});

describe('runs and frames', () => {
	it('FNV-1a matches the published test vectors', () => {
		// Test vectors from the FNV reference page by Fowler, Noll and Vo (isthe.com/chongo/tech/comp/fnv), recalled from memory.
		expect(fnv1a('')).toBe('811c9dc5');
		expect(fnv1a('a')).toBe('e40c292c');
		expect(fnv1a('foobar')).toBe('bf9cf968');
	});
	it('seeking from keyframes gives the same frame as a straight run', () => {
		const c = lowerCircuit(tally([], 'no-ancilla'));
		const straight = new Run(c, { values: { en: 1, sensor: 5, tally: 3 } }, { keyframeInterval: 1_000_000 });
		const keyed = new Run(c, { values: { en: 1, sensor: 5, tally: 3 } }, { keyframeInterval: 7 });
		for (const s of [0, 1, 6, 7, 8, 20, 33, c.gateCount]) expect(keyed.frameAt(s)).toEqual(straight.frameAt(s));
		// keyframe checksums are the checksums of the frames at those steps
		for (const k of keyed.keyframeChecksums) expect(keyed.frameAt(k.step).checksum).toBe(k.checksum);
		expect(keyed.frameAt(c.gateCount).registerValues).toEqual({ en: 1n, sensor: 5n, tally: 13n });
	});
	it('states expected angles and exact divergence', () => {
		const c = lowerCircuit(tally());
		const run = new Run(c, { values: { en: 1, sensor: 5, tally: 3 } });
		const addBlock = c.blocks.find((b) => b.itemId === 'add')!;
		const f = run.frameAt(addBlock.end);
		// tally in Fourier basis (unswapped) holding 3 + 2·5 = 13: qubit i at level i+1
		for (let i = 0; i < 4; i++) {
			const q = f.qubits[4 + i];
			expect(q.expected).toEqual({ kind: 'fourier', level: i + 1, value: BigInt(13 % 2 ** (i + 1)), angle: dyadic(BigInt(13 % 2 ** (i + 1)), i + 1) });
			expect(q.divergence).toEqual({ exact: true, num: 0n, exp: 0 });
			expect(q.matches).toBe(true);
		}
		expect(run.divergences).toEqual([]);
		expect(run.firstDivergenceStep()).toBeNull();
	});
	it('finds the first divergence of a wrong circuit (approximate QFT)', () => {
		const d = tally();
		d.body[0] = { id: 'q', type: 'qft', register: 'tally', swaps: false, approx: 2 };
		const c = lowerCircuit(d);
		const run = new Run(c, { values: { en: 0, sensor: 0, tally: 0b1111 } });
		const first = run.firstDivergenceStep();
		expect(first).toBe(c.blocks[0].end); // qft boundary: the dropped R_3, R_4 leave the top qubits off
		const q3 = run.frameAt(first!).qubits[4 + 3];
		// expected 15/16 turn; got 1/2 + 1/4 = 3/4 turn (R_3 and R_4 omitted) → divergence −3/16
		expect(q3.divergence).toEqual({ exact: true, num: -3n, exp: 4 });
		const ledger = run.qubitLedger(4 + 3);
		expect(ledger.firstParted).toBe(first);
		expect(ledger.entries[0].kind).toBe('origin');
	});
	it('hands over to the amplitude engine when a gate entangles, and says so', () => {
		const d: CircuitDocument = {
			format: 'orrery.circuit',
			version: 1,
			title: 'bell',
			registers: [{ name: 'r', size: 2 }],
			body: [
				{ id: 'h', type: 'gate', gate: 'h', qubits: [{ register: 'r', index: 0 }] },
				{ id: 'cx', type: 'gate', gate: 'cx', qubits: [{ register: 'r', index: 0 }, { register: 'r', index: 1 }] }
			]
		};
		const run = new Run(lowerCircuit(d));
		expect(run.handover?.step).toBe(1);
		expect(run.handover?.reason).toMatch(/gate 1/);
		const f = run.frameAt(2);
		expect(f.engine).toBe('amplitudes');
		expect(f.handover?.step).toBe(1);
		expect(f.qubits[0].state.kind).toBe('mixed');
		expect(f.distributions.r.map((x) => +x.toFixed(12))).toEqual([0.5, 0, 0, 0.5]);
		expect(run.frameAt(1).engine).toBe('ledger');
	});
	it('stops with a clear message beyond the amplitude limit', () => {
		const d: CircuitDocument = {
			format: 'orrery.circuit',
			version: 1,
			title: 'wide',
			registers: [{ name: 'r', size: 30 }],
			body: [
				{ id: 'h', type: 'gate', gate: 'h', qubits: [{ register: 'r', index: 0 }] },
				{ id: 'h2', type: 'gate', gate: 'h', qubits: [{ register: 'r', index: 1 }] },
				{ id: 'cp', type: 'gate', gate: 'cp', qubits: [{ register: 'r', index: 0 }, { register: 'r', index: 1 }], angle: 'pi/2' }
			]
		};
		const run = new Run(lowerCircuit(d));
		expect(run.stopped?.step).toBe(2);
		expect(run.stopped?.reason).toMatch(/stopped at step 2.*limited to 24 qubits/);
		expect(() => run.frameAt(3)).toThrow(/stopped at step 2/);
		expect(run.frameAt(2).qubits[0].state.kind).toBe('fourier');
	});
	it('uniform superposition inputs start on the amplitude engine', () => {
		const c = lowerCircuit(tally());
		const run = new Run(c, { values: { en: 1, tally: 0 }, superposed: ['sensor'] });
		expect(run.handover?.step).toBe(0);
		const f = run.frameAt(run.stepCount);
		expect(f.engine).toBe('amplitudes');
		// tally = 2·sensor for sensor uniform over 0..7: values 0,2,…,14 with probability 1/8 each
		expect(f.distributions.tally.map((x) => +x.toFixed(9))).toEqual(Array.from({ length: 16 }, (_, v) => (v % 2 === 0 ? 0.125 : 0)));
	});
	it('the two engines give the same frames through a Run (within tolerance)', () => {
		const c = lowerCircuit(tally([], 'no-ancilla'));
		const a = new Run(c, { values: { en: 1, sensor: 6, tally: 9 } });
		const b = new Run(c, { values: { en: 1, sensor: 6, tally: 9 } }, { engine: 'amplitudes' });
		expect(b.divergences).toEqual([]);
		for (let s = 0; s <= c.gateCount; s++) {
			const fa = a.frameAt(s);
			const fb = b.frameAt(s);
			expect(fb.engine).toBe('amplitudes');
			for (let q = 0; q < c.qubitCount; q++) {
				const x = fa.qubits[q].state;
				const y = fb.qubits[q].state;
				expect(y.kind).toBe(x.kind);
				if (x.kind === 'classical' && y.kind === 'classical') expect(y.bit).toBe(x.bit);
				if (x.kind === 'fourier' && y.kind === 'fourier') {
					const dx = (y.angle.exact ? 0 : y.angle.turns) - Number(x.angle.exact ? Number(x.angle.num) / 2 ** x.angle.exp : 0);
					expect(Math.abs(dx - Math.round(dx))).toBeLessThan(1e-9);
				}
				expect(fb.qubits[q].matches).toBe(fa.qubits[q].matches);
			}
		}
	});
	it('step helpers follow the block tree', () => {
		const c = lowerCircuit(tally([], 'no-ancilla'));
		const run = new Run(c, { values: { en: 1, sensor: 5 } });
		const [qft, add, iqft] = c.blocks;
		expect(run.blockBoundaries()).toEqual([0, qft.end, add.end, iqft.end]);
		expect(run.stepOver(0)).toBe(qft.end);
		expect(run.stepOver(add.start)).toBe(add.end);
		expect(run.stepInto(add.start)).toBe(add.start + 1);
		// inside the adder, step over skips one lowered ccp (5 gates for no-ancilla)
		expect(run.stepOver(add.start + 1)).toBe(add.start + 5);
		expect(run.stepOut(add.start + 3)).toBe(add.end);
		expect(run.nextBoundary(add.start + 3)).toBe(add.end);
		expect(run.previousBoundary(add.start + 3)).toBe(add.start);
	});
});

describe('replay checksums', () => {
	it('cover the last frame even when the run is shorter than one keyframe interval', () => {
		const c = lowerCircuit({
			format: 'orrery.circuit',
			version: 1,
			title: 'short',
			registers: [{ name: 'b', size: 3 }],
			body: [{ id: 'q', type: 'qft', register: 'b', swaps: false }]
		});
		const r = new Run(c, { values: { b: 5 } });
		const last = r.keyframeChecksums[r.keyframeChecksums.length - 1];
		expect(last.step).toBe(r.lastStep);
		expect(last.checksum).toBe(r.frameAt(r.lastStep).checksum);
		// A different input changes the final checksum (and so a replay of the wrong input fails).
		const other = new Run(c, { values: { b: 6 } });
		expect(other.keyframeChecksums.at(-1)!.checksum).not.toBe(last.checksum);
	});
});
