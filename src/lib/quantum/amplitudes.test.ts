import { describe, expect, it } from 'vitest';
import { createState, kernelDiag, kernelH, kernelMcx, kernelPhase, kernelSwap, kernelU, referenceApply, referenceSwap, registerDistribution, blochVector } from './amplitudes.js';

// Deterministic pseudo-random numbers (mulberry32, common practice) so failures reproduce.
function rng(seed: number) {
	return () => {
		seed = (seed + 0x6d2b79f5) | 0;
		let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
		t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

function randomState(n: number, r: () => number): Float64Array {
	const d = new Float64Array(2 * 2 ** n);
	let norm = 0;
	for (let i = 0; i < d.length; i++) {
		d[i] = r() - 0.5;
		norm += d[i] * d[i];
	}
	for (let i = 0; i < d.length; i++) d[i] /= Math.sqrt(norm);
	return d;
}

const maxDiff = (a: Float64Array, b: Float64Array) => {
	let m = 0;
	for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
	return m;
};

describe('fast kernels equal the reference kernel on random states', () => {
	const r = rng(20240611);
	const n = 7;
	const pick = (k: number) => {
		const all = Array.from({ length: n }, (_, i) => i);
		for (let i = all.length - 1; i > 0; i--) {
			const j = Math.floor(r() * (i + 1));
			[all[i], all[j]] = [all[j], all[i]];
		}
		return all.slice(0, k);
	};
	for (let trial = 0; trial < 20; trial++)
		it(`trial ${trial}`, () => {
			const s = randomState(n, r);
			const out = new Float64Array(s.length);
			// H
			{
				const [q] = pick(1);
				const f = s.slice();
				kernelH(f, n, q);
				referenceApply(s, out, n, [], q, [Math.SQRT1_2, 0, Math.SQRT1_2, 0, Math.SQRT1_2, 0, -Math.SQRT1_2, 0]);
				expect(maxDiff(f, out)).toBeLessThan(1e-14);
			}
			// controlled general U with 0–2 controls
			{
				const k = trial % 3;
				const qs = pick(k + 1);
				const [t, ...cs] = qs;
				const th = r() * 6;
				const ph = r() * 6;
				const m = [Math.cos(th), 0, -Math.sin(th) * Math.cos(ph), -Math.sin(th) * Math.sin(ph), Math.sin(th) * Math.cos(ph), -Math.sin(th) * Math.sin(ph), Math.cos(th), 0];
				const f = s.slice();
				let cm = 0;
				for (const c of cs) cm |= 1 << c;
				kernelU(f, n, t, cm, m[0], m[1], m[2], m[3], m[4], m[5], m[6], m[7]);
				referenceApply(s, out, n, cs, t, m);
				expect(maxDiff(f, out)).toBeLessThan(1e-14);
			}
			// mcp with 0–3 controls
			{
				const k = trial % 4;
				const [t, ...cs] = pick(k + 1);
				const th = r() * 6;
				const f = s.slice();
				let mask = 1 << t;
				for (const c of cs) mask |= 1 << c;
				kernelPhase(f, n, mask, Math.cos(th), Math.sin(th));
				referenceApply(s, out, n, cs, t, [1, 0, 0, 0, 0, 0, Math.cos(th), Math.sin(th)]);
				expect(maxDiff(f, out)).toBeLessThan(1e-14);
			}
			// mcx with 0–3 controls
			{
				const k = trial % 4;
				const [t, ...cs] = pick(k + 1);
				const f = s.slice();
				let cm = 0;
				for (const c of cs) cm |= 1 << c;
				kernelMcx(f, n, cm, t);
				referenceApply(s, out, n, cs, t, [0, 0, 1, 0, 1, 0, 0, 0]);
				expect(maxDiff(f, out)).toBeLessThan(1e-15);
			}
			// diag (rz)
			{
				const [q] = pick(1);
				const th = r() * 6;
				const f = s.slice();
				kernelDiag(f, n, q, Math.cos(-th / 2), Math.sin(-th / 2), Math.cos(th / 2), Math.sin(th / 2));
				referenceApply(s, out, n, [], q, [Math.cos(-th / 2), Math.sin(-th / 2), 0, 0, 0, 0, Math.cos(th / 2), Math.sin(th / 2)]);
				expect(maxDiff(f, out)).toBeLessThan(1e-14);
			}
			// swap
			{
				const [p, q] = pick(2);
				const f = s.slice();
				kernelSwap(f, n, p, q);
				referenceSwap(s, out, n, p, q);
				expect(maxDiff(f, out)).toBeLessThan(1e-15);
			}
		});
});

describe('read-outs and limits', () => {
	it('refuses states above the qubit limit with a clear message', () => {
		expect(() => createState(25)).toThrow(/limit here is 24 qubits/);
		expect(() => createState(27, 26)).toThrow(/26 qubits/);
	});
	it('Bloch vectors and marginals of a known state', () => {
		const s = createState(3);
		kernelH(s.data, 3, 1); // (|0⟩+|1⟩)/√2 on qubit 1
		kernelPhase(s.data, 3, 1 << 1, 0, 1); // phase i → Bloch (0, 1, 0)
		kernelMcx(s.data, 3, 0, 2); // qubit 2 = 1
		const b = blochVector(s, 1);
		expect(b[0]).toBeCloseTo(0, 14);
		expect(b[1]).toBeCloseTo(1, 14);
		expect(b[2]).toBeCloseTo(0, 14);
		expect(blochVector(s, 2)[2]).toBeCloseTo(-1, 14);
		const dist = registerDistribution(s, 1, 2); // qubits 1,2 as a 2-bit register
		expect(Array.from(dist).map((x) => +x.toFixed(12))).toEqual([0, 0, 0.5, 0.5]);
	});
});
