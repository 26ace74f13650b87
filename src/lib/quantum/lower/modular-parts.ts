/**
 * The modular parts (Beauregard 2003, quant-ph/0205095, Figs. 5–7): the doubly controlled modular
 * adder in the Fourier basis, the controlled modular multiplier, its in-place form and modular
 * exponentiation. `lowerModular` checks an item's registers, controls and ancillas, then emits.
 * Qubits are flat indices (register offset + index, index 0 = LSB); angles in turns.
 */
import { qubitLabel, GateCode, type BlockEffect, type BlockSpec, type CcpLowering, type FourierLayout, type ModularItem, type PlacedRegister, type SourcePosition, type ValueExpr } from '../circuit.js';
import { checkModularParameters, modInverse, multiplierConstants, powMod } from '../modular.js';
import { bitExpr, inReg, intOf, qubitOf, reg, regOf, type Env, type LowerContext } from './context.js';
import { emitAddConst } from './adders.js';
import { emitQft } from './qft.js';
import { LoweringError } from './sink.js';

/** Lower a modular item: resolve and check its registers, controls and ancillas, then emit the part. */
export function lowerModular(ctx: LowerContext, item: ModularItem, id: string, env: Env, path: string): void {
	const regField = (field: string): PlacedRegister => regOf(ctx, (item as unknown as Record<string, string>)[field], env, `${path}.${field}`);
	const sizeOf = (name: string): number | undefined => {
		const actual = env.regs.get(name) ?? name;
		return ctx.regByName.get(actual)?.size;
	};
	for (const issue of checkModularParameters(item, sizeOf)) if (issue.blocking) throw new LoweringError(issue.message, `${path}.${issue.field}`);
	const a = BigInt(item.value);
	const N = BigInt(item.modulus);
	const anc = qubitOf(ctx, item.ancilla, env, `${path}.ancilla`);
	const lowering = item.ccpLowering ?? ctx.defaultCcp;
	const fourier = regField(item.type === 'mod-add' || item.type === 'mod-mul' ? 'target' : 'work');
	const approx = intOf(item.approx, fourier.size, env, `${path}.approx`);
	if (approx < 1) throw new LoweringError('approx must be at least 1', `${path}.approx`);
	const used: PlacedRegister[] = [fourier];
	const controls: number[] = [];
	if (item.type === 'mod-add') (item.controls ?? []).forEach((q, j) => controls.push(qubitOf(ctx, q, env, `${path}.controls[${j}]`)));
	else if (item.type !== 'mod-exp' && item.control) controls.push(qubitOf(ctx, item.control, env, `${path}.control`));
	if (item.type === 'mod-mul' || item.type === 'mod-mul-inplace') used.push(regField('x'));
	if (item.type === 'mod-exp') used.push(regField('y'), regField('exponent'));
	if (new Set(used).size !== used.length) throw new LoweringError('the part needs distinct registers', path);
	if (used.some((r) => inReg(anc, r))) throw new LoweringError('the ancilla must not be a qubit of the part’s registers', `${path}.ancilla`);
	controls.forEach((c, j) => {
		const field = item.type === 'mod-add' ? `controls[${j}]` : 'control';
		if (c === anc || used.some((r) => inReg(c, r))) throw new LoweringError('a control must be distinct from the part’s registers and its ancilla', `${path}.${field}`);
	});
	if (new Set(controls).size !== controls.length) throw new LoweringError('the two controls must differ', `${path}.controls`);
	// Doubly controlled rotations appear whenever an adder has two controls.
	const needsCcp = item.type === 'mod-exp' || (item.type === 'mod-add' ? controls.length === 2 : controls.length === 1);
	const spare = needsCcp && lowering === 'ancilla' ? spareAncilla(ctx, item, env, path, anc, controls, used) : null;
	const opts: ModOpts = { lowering, spare, approx, source: item.source };
	switch (item.type) {
		case 'mod-add':
			emitModAdd(ctx, id, item.label, fourier, a, N, controls, anc, item.layout ?? ctx.defaultLayout, false, opts);
			return;
		case 'mod-mul':
			emitModMul(ctx, id, item.label, regField('x'), fourier, a, N, controls[0] ?? null, anc, false, opts);
			return;
		case 'mod-mul-inplace':
			emitModMulInPlace(ctx, id, item.label, regField('x'), fourier, a, N, controls[0] ?? null, anc, opts);
			return;
		case 'mod-exp':
			emitModExp(ctx, id, item.label, regField('exponent'), regField('y'), fourier, a, N, anc, opts);
			return;
	}
}

/** The second ancilla a ccp lowered with "ancilla" needs inside a modular part: the item's ccpAncilla, else a free qubit of an ancilla register. */
function spareAncilla(ctx: LowerContext, item: ModularItem, env: Env, path: string, anc: number, controls: number[], used: PlacedRegister[]): number {
	let spare: number | null = null;
	if (item.ccpAncilla) spare = qubitOf(ctx, item.ccpAncilla, env, `${path}.ccpAncilla`);
	else {
		for (const r of ctx.registers) {
			if (r.role !== 'ancilla') continue;
			for (let i = 0; i < r.size && spare === null; i++) if (r.offset + i !== anc && !controls.includes(r.offset + i)) spare = r.offset + i;
		}
		if (spare === null) throw new LoweringError('ccp lowering "ancilla" needs a second ancilla qubit besides the comparison ancilla: set ccpAncilla', `${path}.ccpAncilla`);
	}
	const s = spare;
	if (s === anc || controls.includes(s) || used.some((r) => inReg(s, r))) throw new LoweringError('ccpAncilla must be distinct from the part’s registers, controls and ancilla', `${path}.ccpAncilla`);
	return s;
}

interface ModOpts {
	lowering: CcpLowering;
	spare: number | null;
	approx: number;
	source: SourcePosition | undefined;
}

const modOf = (of: ValueExpr, N: bigint): ValueExpr => ({ op: 'mod', of, modulus: String(N) });

/**
 * Fig. 5: φ(b) → φ((b + a) mod N) when every control is 1 (time order): add a, subtract N,
 * inverse QFT, CNOT(top → ancilla), QFT, add N controlled by the ancilla, subtract a, inverse QFT,
 * X·CNOT·X (top → ancilla) clearing it, QFT, add a. `inverse`: the exact reverse (b − a mod N).
 */
function emitModAdd(ctx: LowerContext, id: string, label: string | undefined, b: PlacedRegister, a: bigint, N: bigint, controls: number[], anc: number, layout: FourierLayout, inverse: boolean, o: ModOpts): number {
	const sink = ctx.sink;
	const ctl = controls.map((q) => `${qubitLabel(ctx.registers, q)}·`).join('');
	const sign = inverse ? '−' : '+';
	const change: ValueExpr = { op: 'mul', factors: [{ op: 'const', value: String(inverse ? -a : a) }, ...controls.map((q) => bitExpr(ctx, q))] };
	const effect: BlockEffect = {
		text: `${b.name} ← (${b.name} ${sign} ${ctl}${a}) mod ${N} (Fourier basis, ${layout}; needs ${b.name} < ${N}; ancilla ${qubitLabel(ctx.registers, anc)} back to 0)`,
		writes: [{ register: b.name, basis: 'fourier', layout, value: modOf({ op: 'add', terms: [reg(b.name), change] }, N) }],
		requires: [{ register: b.name, basis: 'fourier', layout }]
	};
	const spec: BlockSpec = { kind: 'mod-add', target: b.name, value: String(a), modulus: String(N), controls, ancilla: anc, layout, inverse, compareGate: -1, clearGate: -1 };
	const blk = sink.open('mod-add', id, label ?? `${b.name} ← ${b.name} ${sign} ${ctl}${a} mod ${N}`, spec, effect, [], o.source);
	const top = b.offset + b.size - 1;
	const swaps = layout === 'swapped';
	type Step = { k: 'add'; v: bigint; ctl: number[]; name: string; holds: string } | { k: 'qft' | 'iqft' } | { k: 'copy' } | { k: 'clear' };
	// Words for what b holds after each add, with ctl-a written "a" (0 when a control is off).
	const steps: Step[] = [
		{ k: 'add', v: a, ctl: controls, name: 'add a', holds: 'b + a' },
		{ k: 'add', v: -N, ctl: [], name: 'subtract N', holds: 'b + a − N' },
		{ k: 'iqft' },
		{ k: 'copy' },
		{ k: 'qft' },
		{ k: 'add', v: N, ctl: [anc], name: 'add N back if b + a < N', holds: '(b + a) mod N' },
		{ k: 'add', v: -a, ctl: controls, name: 'subtract a', holds: '(b + a) mod N − a' },
		{ k: 'iqft' },
		{ k: 'clear' },
		{ k: 'qft' },
		{ k: 'add', v: a, ctl: controls, name: 'add a', holds: '(b + a) mod N' }
	];
	const run: Step[] = inverse
		? steps
				.slice()
				.reverse()
				.map((s) => (s.k === 'add' ? { ...s, v: -s.v, name: s.name.startsWith('add') ? s.name.replace(/^add/, 'subtract') : s.name.replace(/^subtract/, 'add') } : s.k === 'qft' ? { k: 'iqft' } : s.k === 'iqft' ? { k: 'qft' } : s))
		: steps;
	let n = 0;
	for (const s of run) {
		const local = `${id}/${n++}`;
		if (s.k === 'add') {
			emitAddConst(ctx, local, s.name, b, s.v, 0, s.ctl, layout, o.lowering, s.ctl.length > 1 ? o.spare : null, o.source, inverse ? undefined : s.holds);
		} else if (s.k === 'qft' || s.k === 'iqft') {
			emitQft(ctx, s.k, local, s.k === 'qft' ? `QFT(${b.name})` : `inverse QFT(${b.name})`, b, swaps, o.approx, o.source);
		} else if (s.k === 'copy') {
			spec.compareGate = sink.count;
			sink.g2(GateCode.cx, 1, top, anc);
		} else {
			sink.g1(GateCode.x, top);
			spec.clearGate = sink.count;
			sink.g2(GateCode.cx, 1, top, anc);
			sink.g1(GateCode.x, top);
		}
	}
	sink.close(blk);
	return blk;
}

/** Fig. 6: b ← (b + c·a·x) mod N, b computational (QFT without swaps inside), adds of 2^j·a mod N controlled by (c, x_j). */
function emitModMul(ctx: LowerContext, id: string, label: string | undefined, x: PlacedRegister, b: PlacedRegister, a: bigint, N: bigint, control: number | null, anc: number, inverse: boolean, o: ModOpts): void {
	const sink = ctx.sink;
	const ctl = control !== null ? [bitExpr(ctx, control)] : [];
	const sign = inverse ? '−' : '+';
	const effect: BlockEffect = {
		text: `${b.name} ← (${b.name} ${sign} ${control !== null ? `${qubitLabel(ctx.registers, control)}·` : ''}${a}·${x.name}) mod ${N} (computational basis before and after; needs ${b.name} < ${N})`,
		writes: [{ register: b.name, basis: 'computational', value: modOf({ op: 'add', terms: [reg(b.name), { op: 'mul', factors: [{ op: 'const', value: String(inverse ? -a : a) }, ...ctl, reg(x.name)] }] }, N) }],
		requires: [
			{ register: b.name, basis: 'computational' },
			{ register: x.name, basis: 'computational' }
		]
	};
	const blk = sink.open('mod-mul', id, label ?? `${b.name} ← ${b.name} ${sign} ${a}·${x.name} mod ${N}`, { kind: 'mod-mul', x: x.name, target: b.name, value: String(a), modulus: String(N), control, inverse }, effect, [], o.source);
	const consts = multiplierConstants(a, N, x.size);
	emitQft(ctx, 'qft', `${id}/qft`, `QFT(${b.name})`, b, false, o.approx, o.source);
	const order = inverse ? consts.map((_, j) => x.size - 1 - j) : consts.map((_, j) => j);
	for (const j of order) {
		const ctls = control !== null ? [control, x.offset + j] : [x.offset + j];
		const bi = emitModAdd(ctx, `${id}/add[${j}]`, `${inverse ? '−' : '+'}${consts[j]} mod ${N} if ${ctls.map((q) => qubitLabel(ctx.registers, q)).join('·')}`, b, consts[j], N, ctls, anc, 'unswapped', inverse, o);
		sink.blocks[bi].loopContext = { j };
	}
	emitQft(ctx, 'iqft', `${id}/iqft`, `inverse QFT(${b.name})`, b, false, o.approx, o.source);
	sink.close(blk);
}

/** Fig. 7: x ← a·x mod N when c: multiply into work, swap x with work's low n qubits (controlled), un-multiply by a⁻¹. */
function emitModMulInPlace(ctx: LowerContext, id: string, label: string | undefined, x: PlacedRegister, w: PlacedRegister, a: bigint, N: bigint, control: number | null, anc: number, o: ModOpts): number {
	const sink = ctx.sink;
	const inv = modInverse(a % N, N)!;
	const prod: ValueExpr = modOf({ op: 'mul', factors: [{ op: 'const', value: String(a) }, reg(x.name)] }, N);
	const value: ValueExpr =
		control === null ? prod : { op: 'add', terms: [reg(x.name), { op: 'mul', factors: [bitExpr(ctx, control), { op: 'add', terms: [prod, { op: 'mul', factors: [{ op: 'const', value: '-1' }, reg(x.name)] }] }] }] };
	const effect: BlockEffect = {
		text: `${x.name} ← ${a}·${x.name} mod ${N}${control !== null ? ` if ${qubitLabel(ctx.registers, control)}` : ''} (needs ${x.name} < ${N}; ${w.name} and the ancilla back to 0; a⁻¹ = ${inv})`,
		writes: [
			{ register: x.name, basis: 'computational', value },
			{ register: w.name, basis: 'computational', value: { op: 'const', value: '0' } }
		],
		requires: [
			{ register: x.name, basis: 'computational' },
			{ register: w.name, basis: 'computational' }
		]
	};
	const blk = sink.open(
		'mod-mul-inplace',
		id,
		label ?? `${x.name} ← ${a}·${x.name} mod ${N}${control !== null ? ` if ${qubitLabel(ctx.registers, control)}` : ''}`,
		{ kind: 'mod-mul-inplace', x: x.name, work: w.name, value: String(a), inverseValue: String(inv), modulus: String(N), control },
		effect,
		['j'],
		o.source
	);
	emitModMul(ctx, `${id}/mul`, undefined, x, w, a, N, control, anc, false, o);
	for (let j = 0; j < x.size; j++) {
		sink.l0 = j;
		const p = x.offset + j;
		const q = w.offset + j;
		if (control === null) sink.g2(GateCode.swap, 0, p, q);
		else {
			sink.g2(GateCode.cx, 1, q, p);
			sink.g3(GateCode.ccx, control, p, q);
			sink.g2(GateCode.cx, 1, q, p);
		}
	}
	sink.l0 = -1;
	emitModMul(ctx, `${id}/unmul`, undefined, x, w, inv, N, control, anc, true, o);
	sink.close(blk);
	return blk;
}

/** y ← a^e·y mod N: controlled in-place multipliers by a^(2^i) mod N for each exponent bit e_i. */
function emitModExp(ctx: LowerContext, id: string, label: string | undefined, e: PlacedRegister, y: PlacedRegister, w: PlacedRegister, a: bigint, N: bigint, anc: number, o: ModOpts): void {
	const sink = ctx.sink;
	const effect: BlockEffect = {
		text: `${y.name} ← ${a}^${e.name}·${y.name} mod ${N} (needs ${y.name} < ${N}; ${w.name} and the ancilla back to 0)`,
		writes: [
			{ register: y.name, basis: 'computational', value: modOf({ op: 'mul', factors: [{ op: 'powmod', base: String(a), exp: reg(e.name), modulus: String(N) }, reg(y.name)] }, N) },
			{ register: w.name, basis: 'computational', value: { op: 'const', value: '0' } }
		],
		requires: [
			{ register: y.name, basis: 'computational' },
			{ register: w.name, basis: 'computational' },
			{ register: e.name, basis: 'computational' }
		]
	};
	const blk = sink.open('mod-exp', id, label ?? `${y.name} ← ${a}^${e.name}·${y.name} mod ${N}`, { kind: 'mod-exp', exponent: e.name, y: y.name, work: w.name, value: String(a), modulus: String(N) }, effect, [], o.source);
	for (let i = 0; i < e.size; i++) {
		const ai = powMod(a, 1n << BigInt(i), N);
		const bi = emitModMulInPlace(ctx, `${id}/pow[${i}]`, `${y.name} ← ${ai}·${y.name} mod ${N} if ${e.name}[${i}]`, y, w, ai, N, e.offset + i, anc, o);
		sink.blocks[bi].loopContext = { i };
	}
	sink.close(blk);
}
