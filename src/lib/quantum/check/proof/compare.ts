/**
 * Comparison for the Fourier-form prover: at an inverse QFT, each Fourier qubit's phase polynomial
 * against the value the register must hold (the spec's, the starting value, or for an intermediate
 * section the value its top qubit implies); at the end, every register against the spec or
 * "unchanged", and the global phase against a constant. Qubit order: flat; angles in turns.
 */
import { dyadic, isZeroSigned, reduceSigned, subtractAngles, ZERO_ANGLE } from '../../angle.js';
import type { PlacedRegister } from '../../circuit.js';
import { registerPoly, type IntPoly } from '../spec.js';
import type { SectionInfo } from '../proof.js';
import { Outside, polyEqualMod, polyText } from './poly.js';
import { lineOf, pushWrong, qname, termName, valueOf, type FourierQubit, type Prover, type QState } from './state.js';

/**
 * The value r must hold when its inverse QFT (levels by position) is the last on r: the spec's,
 * or the starting value (registers not named come back unchanged). For an intermediate section,
 * the value its top-level qubit implies (and the section is marked inferred).
 */
export function requiredValue(p: Prover, r: PlacedRegister, levels: number[], last: boolean, sec: SectionInfo | undefined, g: number): IntPoly {
	// The spec's value, or (no spec) the starting value: registers not named come back unchanged.
	if (last) return p.goal.outputs.get(r.name) ?? (p.goal.inputs.has(r.name) ? registerPoly(r) : new Map());
	// An intermediate section: infer the value from the top-level qubit (level n).
	if (sec) sec.required = 'inferred';
	const top = levels.indexOf(r.size);
	const st = p.state[r.offset + top] as FourierQubit;
	const want: IntPoly = new Map();
	for (const [key, t] of st.phase) {
		if (!t.angle.exact) throw new Outside(`the phase of ${qname(p, r.offset + top)} is inexact; the prover needs dyadic angles`, g);
		if (t.angle.num === 0n || t.angle.exp > r.size) continue; // a finer term is reported below
		want.set(key, t.angle.num << BigInt(r.size - t.angle.exp));
	}
	return want;
}

/** Every Fourier qubit j of r (level m) must hold want/2^m turn, term by term; a missing term is attributed to its neighbours. */
export function compareSection(p: Prover, r: PlacedRegister, want: IntPoly): void {
	for (let j = 0; j < r.size; j++) {
		const st = p.state[r.offset + j] as FourierQubit;
		const m = st.level;
		const keys = new Set([...st.phase.keys(), ...want.keys()]);
		for (const key of keys) {
			p.termsChecked++;
			const expected = dyadic(want.get(key) ?? 0n, m);
			const got = st.phase.get(key) ?? { angle: ZERO_ANGLE, from: [] };
			const d = reduceSigned(subtractAngles(got.angle, expected));
			if (isZeroSigned(d)) continue;
			const near = got.from.length === 0 ? neighboursOf(p, r, j, st, key) : [];
			pushWrong(p, qname(p, r.offset + j), termName(p, key), expected, got.angle, got.from, 'section', d, near, key === '' ? [] : key.split('.').map(Number));
		}
	}
}

/** Gates next to where a term nothing added belongs: the same term on other qubits of r, then gates on this qubit (at most 9). */
function neighboursOf(p: Prover, r: PlacedRegister, j: number, st: FourierQubit, key: string): number[] {
	const near: number[] = [];
	for (let i = 0; i < r.size && near.length < 6; i++) {
		const o = p.state[r.offset + i];
		if (i !== j && o.kind === 'f') for (const [gg] of o.phase.get(key)?.from ?? []) if (near.length < 6) near.push(gg);
	}
	for (const t of st.phase.values()) for (const [gg] of t.from) if (near.length < 9 && !near.includes(gg)) near.push(gg);
	return near;
}

/** At the end: no qubit left in the Fourier basis, and every register as the spec (or "unchanged", or 0) requires. */
export function compareRegistersAtEnd(p: Prover): void {
	const { c, goal, state } = p;
	for (let q = 0; q < c.qubitCount; q++) if (state[q].kind === 'f') throw new Outside(`${qname(p, q)} ends in the Fourier basis (no inverse QFT)`, c.gateCount - 1);
	const name = (k: string) => termName(p, k);
	for (const r of c.registers) {
		const st = state.slice(r.offset, r.offset + r.size);
		if (st.every((s, j) => s.kind === 'v' && s.reg === r.name && s.bit === j)) {
			const spec = goal.outputs.get(r.name);
			const want = spec ?? (goal.inputs.has(r.name) ? registerPoly(r) : new Map());
			const got = p.regValue.get(r.name)!;
			if (!polyEqualMod(got, want, r.size)) p.registerMismatches.push({ register: r.name, qubit: `${r.name}[*]`, holds: polyText(got, name), expected: polyText(want, name), gates: [], lines: [] });
			continue;
		}
		if (st.some((s) => s.kind !== 'c')) throw new Outside(`register ${r.name} ends partly moved to other positions; the prover cannot compare it`, c.gateCount - 1);
		const spec = goal.outputs.get(r.name);
		if (spec) {
			const got = valueOf(p, r, c.gateCount - 1);
			if (!polyEqualMod(got, spec, r.size)) p.registerMismatches.push({ register: r.name, qubit: `${r.name}[*]`, holds: polyText(got, name), expected: polyText(spec, name), gates: [], lines: [] });
			continue;
		}
		compareBitsUnchanged(p, r, st as Extract<QState, { kind: 'c' }>[]);
	}
}

/** A register without a spec: each bit must hold its own starting bit (input registers) or 0. */
function compareBitsUnchanged(p: Prover, r: PlacedRegister, st: Extract<QState, { kind: 'c' }>[]): void {
	st.forEach((s, j) => {
		const q = r.offset + j;
		const anf = s.anf;
		const wantKey = p.goal.inputs.has(r.name) ? String(q) : null;
		const extra = [...anf.keys()].filter((key) => key !== wantKey);
		const missing = wantKey !== null && !anf.has(wantKey);
		if (extra.length || missing) {
			const gates = extra.flatMap((key) => anf.get(key)!);
			p.registerMismatches.push({
				register: r.name,
				qubit: qname(p, q),
				holds: anf.size ? [...anf.keys()].map((k) => termName(p, k)).join(' ⊕ ') : '0',
				expected: wantKey !== null ? qname(p, q) + ' (unchanged)' : '0',
				gates,
				lines: [...new Set(gates.map((g) => lineOf(p, g)))]
			});
		}
	});
}

/** The global phase may not depend on the input: every non-constant term must vanish mod 1 turn. */
export function compareGlobalPhase(p: Prover): void {
	for (const [key, t] of p.global) {
		p.termsChecked++;
		const d = reduceSigned(t.angle);
		if (isZeroSigned(d)) continue;
		if (!d.exact) throw new Outside(`the global phase holds an inexact term on ${termName(p, key)}`, p.c.gateCount - 1);
		pushWrong(p, 'global phase', termName(p, key), ZERO_ANGLE, t.angle, t.from, 'phase', d, [], key.split('.').map(Number));
	}
}
