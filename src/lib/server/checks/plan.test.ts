import { describe, expect, it } from 'vitest';
import { makeTemplate } from '../../quantum/templates';
import { lowerCircuit } from '../../quantum/lower';
import { checkCircuit } from '../../quantum/check/index';
import { engineName, mergeShards, nextChunkSize, planShards, rateAndEstimate, type ShardOutcome } from './plan';

// Shards of a sweep, merged, must equal the core's own single sweep over every input. The circuit
// is invented test data: a 4-bit Fourier adder with a planted controlled phase of pi from a[0] onto
// b[3], which adds 8 whenever a is odd, so exactly the odd-a inputs fail (probability 0).
function faultyAdder() {
	const d = makeTemplate('adder', 'faulty', 4);
	d.body.splice(2, 0, { id: 'planted', type: 'gate', gate: 'cp', qubits: [{ register: 'a', index: 0 }, { register: 'b', index: 3 }], angle: 'pi' });
	return d;
}

describe('planShards', () => {
	it('cuts [0, total) into consecutive ranges, the last one shorter', () => {
		expect(planShards(10, 4)).toEqual([
			{ start: 0, end: 4 },
			{ start: 4, end: 8 },
			{ start: 8, end: 10 }
		]);
		expect(planShards(2 ** 20, 2 ** 16)).toHaveLength(16);
		expect(() => planShards(8, 0)).toThrow(/positive integer/);
	});
});

describe('mergeShards', () => {
	const doc = faultyAdder();
	const c = lowerCircuit(doc);
	const whole = checkCircuit(c, doc.specs!, { inputs: { mode: 'all' }, proof: false });
	const shards: ShardOutcome[] = planShards(256, 48).map((r, shard) => {
		const x = checkCircuit(c, doc.specs!, { inputs: { mode: 'range', start: r.start, end: r.end }, proof: false });
		return { shard, ...r, cases: x.cases, failed: x.failed, worstProbability: x.worstSuccessProbability, failures: x.failures, engines: x.engines, phaseReferences: x.phaseReference ? [x.phaseReference] : [] };
	});

	it('gives the single-process sweep: counts, worst probability, first failing inputs, engines', () => {
		// Odd a fails: 8 of 16 a values × 16 b values = 128 of 256 (the planted fault, by construction).
		expect([whole.cases, whole.failed, whole.worstSuccessProbability]).toEqual([256, 128, 0]);
		const m = mergeShards(shards, 256);
		expect(m.missing).toEqual([]);
		expect([m.cases, m.failed, m.worstProbability]).toEqual([whole.cases, whole.failed, whole.worstSuccessProbability]);
		expect(m.failures).toEqual(whole.failures);
		expect(m.engines).toEqual(whole.engines);
		expect(engineName(m.engines)).toBe('ledger');
		// Every part met the same global phase as the one sweep did, so no input was judged against another reference.
		expect(whole.phaseReference).not.toBeNull();
		expect(m.phaseReferences).toEqual([whole.phaseReference]);
	});

	it('keeps every distinct phase reference, so parts that disagree can be failed', () => {
		const odd = { ...shards[2], phaseReferences: ['1/4 turn'] };
		expect(mergeShards([shards[0], shards[1], odd, ...shards.slice(3)], 256).phaseReferences).toEqual([whole.phaseReference, '1/4 turn']);
	});

	it('counts a shard written twice once, in any order', () => {
		const m = mergeShards([...shards].reverse().concat(shards), 256);
		expect([m.cases, m.failed]).toEqual([256, 128]);
		expect(m.failures).toEqual(whole.failures);
	});

	it('names the ranges no shard covered', () => {
		const m = mergeShards(shards.filter((s) => s.shard !== 1), 256);
		expect(m.missing).toEqual([{ start: 48, end: 96 }]);
		expect(m.cases).toBe(256 - 48);
	});
});

describe('rateAndEstimate', () => {
	it('is inputs per second and the seconds left at that rate', () => {
		expect(rateAndEstimate(500, 2000, 1000)).toEqual({ inputsPerSecond: 500, etaSeconds: 3 });
		expect(rateAndEstimate(0, 2000, 1000)).toEqual({ inputsPerSecond: null, etaSeconds: null });
	});
});

describe('nextChunkSize', () => {
	// A check's time limit is looked at between calls into the core; these sizes bound each call.
	it('aims at the target from the last call\'s pace, within 1 and the maximum', () => {
		// 16 inputs in 4 ms: 0.25 ms each, so 1000 ms is 4000 inputs.
		expect(nextChunkSize({ inputs: 16, ms: 4 }, 60_000, 1000, 4096)).toBe(4000);
		// A fast circuit is held to the maximum.
		expect(nextChunkSize({ inputs: 16, ms: 0.01 }, 60_000, 1000, 4096)).toBe(4096);
		// A slow circuit (3 s per input) still moves one input at a time.
		expect(nextChunkSize({ inputs: 1, ms: 3000 }, 60_000, 1000, 4096)).toBe(1);
	});
	it('never plans past the deadline', () => {
		// 1 ms per input, 250 ms left: 250 inputs, not 1000.
		expect(nextChunkSize({ inputs: 100, ms: 100 }, 250, 1000, 4096)).toBe(250);
		// Past the deadline: one input (the caller stops at the check after it).
		expect(nextChunkSize({ inputs: 100, ms: 100 }, -5, 1000, 4096)).toBe(1);
	});
});
