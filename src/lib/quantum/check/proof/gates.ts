/**
 * One step per gate kind for the Fourier-form prover: a Hadamard opens a section (a whole QFT,
 * found and probed) or closes one (a whole inverse QFT, compared with the required value); an
 * X-type gate XORs a product into a classical qubit or flips a Fourier qubit's mask; a phase gate
 * adds to one Fourier qubit's polynomial or to the global phase. Qubit order: flat; angles turns.
 */
import { dyadic } from '../../angle.js';
import { GateCode, type PlacedRegister } from '../../circuit.js';
import type { IntPoly } from '../spec.js';
import { compareSection, requiredValue } from './compare.js';
import { anfToPoly, anfXorProduct, Mismatch, Outside, polyTimes } from './poly.js';
import { findSegment, laterHadamardOn, layoutName, probeSegment } from './sections.js';
import { addGlobal, addPhase, anfOf, lineOf, qname, termName, valueOf, type FourierQubit, type PhaseTerm, type Prover } from './state.js';

/** A QFT on r from gate g: each qubit j of level m starts with phase value/2^m. Returns true when the QFT itself is wrong (refuted). */
export function enterSection(p: Prover, g: number, r: PlacedRegister): boolean {
	const seg = findSegment(p.c, g, r, 'qft');
	const levels = probeSegment(p, seg, r, false, 'qft');
	const v = valueOf(p, r, g);
	for (const x of seg) p.consumed[x] = 1;
	for (let j = 0; j < r.size; j++) {
		const phase = new Map<string, PhaseTerm>();
		for (const [key, coef] of v) {
			const a = dyadic(coef, levels[j]);
			if (a.exact && a.num !== 0n) phase.set(key, { angle: a, from: [] });
		}
		p.state[r.offset + j] = { kind: 'f', phase, mask: new Map(), level: levels[j], reg: r.name };
	}
	p.sections.push({ register: r.name, qftGates: [seg[0], seg[seg.length - 1]], iqftGates: [-1, -1], levels, layout: layoutName(levels), required: 'spec' });
	return p.wrongTerms.length > 0;
}

/** An inverse QFT on r from gate g: check levels and masks, compare with the required value, then r holds it. Returns true when refuted. */
export function leaveSection(p: Prover, g: number, r: PlacedRegister): boolean {
	const seg = findSegment(p.c, g, r, 'iqft');
	const levels = probeSegment(p, seg, r, true, 'iqft');
	if (p.wrongTerms.length) return true;
	const sec = [...p.sections].reverse().find((x) => x.register === r.name && x.iqftGates[0] < 0);
	checkLevelsAndMasks(p, g, r, levels);
	const last = !laterHadamardOn(p.c, r, seg[seg.length - 1] + 1);
	const want = requiredValue(p, r, levels, last, sec, g);
	compareSection(p, r, want);
	if (sec) sec.iqftGates = [seg[0], seg[seg.length - 1]];
	for (const x of seg) p.consumed[x] = 1;
	if (p.wrongTerms.length || p.registerMismatches.length) return true;
	p.regValue.set(r.name, want);
	for (let j = 0; j < r.size; j++) p.state[r.offset + j] = { kind: 'v', reg: r.name, bit: j };
	return false;
}

/** Every qubit the inverse QFT meets must be a Fourier qubit of r at the level it expects; a qubit still flipped is a mismatch. */
function checkLevelsAndMasks(p: Prover, g: number, r: PlacedRegister, levels: number[]): void {
	for (let j = 0; j < r.size; j++) {
		const st = p.state[r.offset + j];
		if (st.kind !== 'f' || st.reg !== r.name) throw new Outside(`the inverse QFT on ${r.name} at gate ${g} meets ${qname(p, r.offset + j)}, which is not a Fourier qubit of ${r.name}`, g);
		if (st.level !== levels[j]) {
			throw new Mismatch(`the QFT and the inverse QFT on ${r.name} are not exact inverses: ${qname(p, r.offset + j)} carries level ${st.level} but the inverse QFT expects level ${levels[j]} (qubit order / swaps differ)`, g);
		}
		if (st.mask.size) {
			const gates = [...st.mask.values()].flat();
			p.registerMismatches.push({ register: r.name, qubit: qname(p, r.offset + j), holds: `flipped by ${[...st.mask.keys()].map((k) => termName(p, k)).join(' ⊕ ')}`, expected: 'not flipped at the inverse QFT', gates, lines: gates.map((x) => lineOf(p, x)) });
		}
	}
}

/** X, CX, CCX, MCX at gate g: qs are the qubits (nc controls, then the target). */
export function flip(p: Prover, g: number, qs: number[], nc: number): void {
	const ctl = qs.slice(0, nc).map((q) => anfOf(p, q, g, 'control'));
	const t = p.state[qs[nc]];
	if (t.kind === 'c') anfXorProduct(t.anf, ctl, g);
	// A Fourier qubit only records the flip: the whole-state phase it moves is paid by addPhase.
	else if (t.kind === 'f') anfXorProduct(t.mask, ctl, g);
	else throw new Outside(`gate ${g} flips ${qname(p, qs[nc])} after an inverse QFT; the prover does not expand computed sums bit by bit`, g);
}

/** P, RZ, CP, MCP at gate g (kind k) on qubits qs: at most one may be a Fourier qubit (else entangling). */
export function phaseGate(p: Prover, g: number, k: number, qs: number[]): void {
	const theta = p.c.angles[p.c.angleIndex[g]];
	const fs = qs.filter((q) => p.state[q].kind === 'f');
	if (fs.length > 1) throw new Outside(`gate ${g} couples ${fs.map((q) => qname(p, q)).join(' and ')}, two qubits in the Fourier basis (entangling)`, g);
	if (k === GateCode.rz && !p.goal.ignorePhase && qs.length > 1) throw new Outside(`gate ${g} is a controlled rz; the Fourier form handles rz without controls`, g);
	if (fs.length === 0) {
		// classical qubits only: a phase per basis input, θ·∏ bits, on the global phase
		if (!p.goal.ignorePhase) {
			let poly: IntPoly = new Map([['', 1n]]);
			for (const q of qs) poly = polyTimes(poly, anfToPoly(anfOf(p, q, g, 'qubit of a phase gate'), g), g);
			addGlobal(p, poly, theta, g);
		}
		return;
	}
	const f = p.state[fs[0]] as FourierQubit;
	addPhase(
		p,
		f,
		theta,
		qs.filter((q) => q !== fs[0]).map((q) => anfOf(p, q, g, 'control of a phase')),
		g
	);
}
