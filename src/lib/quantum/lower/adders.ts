/**
 * The Fourier adders and the multiplier built from them. Fourier add b += 2^t·a: for each target
 * qubit j (level m) and each source bit k with k + t < m, a rotation by 1/2^(m−k−t) turn
 * controlled by a_k (and by the add's control, which makes it a doubly controlled phase lowered by
 * `ccpLowering`). Adding a constant c rotates target qubit j (level m) by c/2^m turn. Qubits are
 * flat indices (register offset + index, index 0 = LSB); angles in turns.
 */
import { dyadic, ZERO_ANGLE } from '../angle.js';
import { GateCode, fourierLevel, qubitLabel, type BlockEffect, type CcpLowering, type FourierLayout, type PlacedRegister, type SourcePosition, type ValueExpr } from '../circuit.js';
import { bitExpr, reg, type LowerContext } from './context.js';
import { emitCcp, unitAngle } from './ccp.js';
import { emitQft } from './qft.js';

/** tgt += (control·) 2^shift·src mod 2^|tgt| in the Fourier basis (`layout`). */
export function emitAdd(
	ctx: LowerContext,
	id: string,
	label: string | undefined,
	src: PlacedRegister,
	tgt: PlacedRegister,
	shift: number,
	control: number | null,
	layout: FourierLayout,
	lowering: CcpLowering,
	anc: number | null,
	source: SourcePosition | undefined
): void {
	const sink = ctx.sink;
	const added: ValueExpr = shift ? { op: 'shl', of: reg(src.name), by: shift } : reg(src.name);
	const ctlName = control !== null ? qubitLabel(ctx.registers, control) : null;
	const term: ValueExpr = control !== null ? { op: 'mul', factors: [bitExpr(ctx, control), added] } : added;
	const effect: BlockEffect = {
		text: `${tgt.name} ← ${tgt.name} + ${ctlName ? `${ctlName}·` : ''}${shift ? `2^${shift}·` : ''}${src.name} mod 2^${tgt.size} (Fourier basis, ${layout})`,
		writes: [{ register: tgt.name, basis: 'fourier', layout, value: { op: 'add', terms: [reg(tgt.name), term] } }],
		requires: [
			{ register: tgt.name, basis: 'fourier', layout },
			{ register: src.name, basis: 'computational' }
		]
	};
	const b = sink.open(
		'add',
		id,
		label ?? `${tgt.name} += ${ctlName ? `${ctlName}·` : ''}${shift ? `2^${shift}·` : ''}${src.name}`,
		{ kind: 'add', addend: src.name, target: tgt.name, shift, control, layout },
		effect,
		['j', 'k'],
		source
	);
	for (let j = 0; j < tgt.size; j++) {
		const m = fourierLevel(layout, tgt.size, j);
		sink.l0 = j;
		for (let k = 0; k < src.size; k++) {
			const e = m - k - shift;
			if (e <= 0) break;
			sink.l1 = k;
			const ang = unitAngle(ctx, e);
			if (control === null) sink.g2(GateCode.cp, 1, src.offset + k, tgt.offset + j, sink.angleId(ang));
			else emitCcp(ctx, control, src.offset + k, tgt.offset + j, ang, lowering, anc);
		}
	}
	sink.close(b);
}

/**
 * tgt += (product of `controls`)·value·2^shift mod 2^|tgt| in the Fourier basis (`layout`); two
 * controls make doubly controlled phases (`anc` for the "ancilla" lowering). `holds` names what
 * the target holds afterwards, for a step inside a modular adder.
 */
export function emitAddConst(
	ctx: LowerContext,
	id: string,
	label: string | undefined,
	tgt: PlacedRegister,
	value: bigint,
	shift: number,
	controls: number[],
	layout: FourierLayout,
	lowering: CcpLowering,
	anc: number | null,
	source: SourcePosition | undefined,
	holds?: string
): void {
	const sink = ctx.sink;
	const ctlText = controls.map((q) => `${qubitLabel(ctx.registers, q)}·`).join('');
	const added: ValueExpr = { op: 'const', value: String(value << BigInt(shift)) };
	const term: ValueExpr = controls.length ? { op: 'mul', factors: [...controls.map((q) => bitExpr(ctx, q)), added] } : added;
	const effect: BlockEffect = {
		text: `${tgt.name} ← ${tgt.name} + ${ctlText}${value}${shift ? `·2^${shift}` : ''} mod 2^${tgt.size} (Fourier basis, ${layout})`,
		writes: [{ register: tgt.name, basis: 'fourier', layout, value: { op: 'add', terms: [reg(tgt.name), term] } }],
		requires: [{ register: tgt.name, basis: 'fourier', layout }]
	};
	const control = controls.length ? controls[0] : null;
	const b = sink.open(
		'add-const',
		id,
		label ?? `${tgt.name} += ${controls.length === 1 ? `${qubitLabel(ctx.registers, controls[0])}·` : controls.length ? `${ctlText}` : ''}${value}${shift ? `·2^${shift}` : ''}`,
		{ kind: 'add-const', target: tgt.name, value: String(value), shift, control, layout, ...(controls.length > 1 ? { controls } : {}), ...(holds ? { holds } : {}) },
		effect,
		['j'],
		source
	);
	const c = value << BigInt(shift);
	for (let j = 0; j < tgt.size; j++) {
		const m = fourierLevel(layout, tgt.size, j);
		const ang = dyadic(c, m);
		if (ang === ZERO_ANGLE || (ang.exact && ang.num === 0n)) continue;
		sink.l0 = j;
		if (controls.length === 0) sink.g1(GateCode.p, tgt.offset + j, sink.angleId(ang));
		else if (controls.length === 1) sink.g2(GateCode.cp, 1, controls[0], tgt.offset + j, sink.angleId(ang));
		else emitCcp(ctx, controls[0], controls[1], tgt.offset + j, ang, lowering, anc);
	}
	sink.close(b);
}

/** p += a·b mod 2^|p|, computational basis before and after: QFT(p) without swaps, p += 2^i·b controlled by a_i, inverse QFT. */
export function emitMultiply(
	ctx: LowerContext,
	id: string,
	label: string | undefined,
	a: PlacedRegister,
	bReg: PlacedRegister,
	p: PlacedRegister,
	lowering: CcpLowering,
	anc: number | null,
	source: SourcePosition | undefined
): void {
	const sink = ctx.sink;
	const effect: BlockEffect = {
		text: `${p.name} ← ${p.name} + ${a.name}·${bReg.name} mod 2^${p.size} (computational basis before and after; QFT without swaps inside)`,
		writes: [{ register: p.name, basis: 'computational', value: { op: 'add', terms: [reg(p.name), { op: 'mul', factors: [reg(a.name), reg(bReg.name)] }] } }],
		requires: [
			{ register: p.name, basis: 'computational' },
			{ register: a.name, basis: 'computational' },
			{ register: bReg.name, basis: 'computational' }
		]
	};
	const blk = sink.open('multiply', id, label ?? `${p.name} += ${a.name}·${bReg.name}`, { kind: 'multiply', a: a.name, b: bReg.name, product: p.name }, effect, [], source);
	emitQft(ctx, 'qft', `${id}/qft`, undefined, p, false, p.size, source);
	for (let i = 0; i < a.size; i++) {
		emitAdd(ctx, `${id}/add[${i}]`, undefined, bReg, p, i, a.offset + i, 'unswapped', lowering, anc, source);
		sink.blocks[sink.blocks.length - 1].loopContext = { i };
	}
	emitQft(ctx, 'iqft', `${id}/iqft`, undefined, p, false, p.size, source);
	sink.close(blk);
}
