/**
 * One pass per body-item kind: each resolves the item's references in the call environment,
 * checks what the kind requires (distinct registers, controls outside the registers, a known
 * block), then emits through the sink or the part emitters. `lowerBody` walks a body in order.
 * Qubits are flat indices (register offset + index, index 0 = LSB); angles in turns.
 */
import { GateCode, type AddConstItem, type AddItem, type BodyItem, type CallItem, type CcpItem, type GateItem, type IntRef, type MultiplyItem, type QftItem, type UserBlock } from '../circuit.js';
import { ancillaOf, angleOf, inReg, intOf, qubitOf, regOf, type Env, type LowerContext } from './context.js';
import { emitAdd, emitAddConst, emitMultiply } from './adders.js';
import { emitCcp } from './ccp.js';
import { lowerModular } from './modular-parts.js';
import { emitQft } from './qft.js';
import { LoweringError } from './sink.js';

/** Lower every item of `body` in order; `at` is the body's JSON path. */
export function lowerBody(ctx: LowerContext, body: BodyItem[], env: Env, at: string): void {
	body.forEach((item, i) => {
		const path = `${at}[${i}]`;
		ctx.sink.path = path;
		lowerItem(ctx, item, env, path);
	});
}

function lowerItem(ctx: LowerContext, item: BodyItem, env: Env, path: string): void {
	const sink = ctx.sink;
	const id = env.prefix + item.id;
	sink.item = sink.itemIds.length;
	sink.itemIds.push(id);
	sink.itemSources.push(item.source ?? null);
	switch (item.type) {
		case 'gate':
			return lowerGate(ctx, item, env, path);
		case 'qft':
		case 'iqft':
			return lowerQft(ctx, item, id, env, path);
		case 'add':
			return lowerAdd(ctx, item, id, env, path);
		case 'add-const':
			return lowerAddConst(ctx, item, id, env, path);
		case 'mod-add':
		case 'mod-mul':
		case 'mod-mul-inplace':
		case 'mod-exp':
			return lowerModular(ctx, item, id, env, path);
		case 'multiply':
			return lowerMultiply(ctx, item, id, env, path);
		case 'ccp':
			return lowerCcp(ctx, item, id, env, path);
		case 'call':
			return lowerCall(ctx, item, id, env, path);
	}
}

function lowerGate(ctx: LowerContext, item: GateItem, env: Env, path: string): void {
	const sink = ctx.sink;
	const qs = item.qubits.map((q, j) => qubitOf(ctx, q, env, `${path}.qubits[${j}]`));
	const ang = item.angle !== undefined ? sink.angleId(angleOf(item.angle, env, `${path}.angle`)) : -1;
	switch (item.gate) {
		case 'h':
			return sink.g1(GateCode.h, qs[0]);
		case 'x':
			return sink.g1(GateCode.x, qs[0]);
		case 'reset':
			return sink.g1(GateCode.reset, qs[0]);
		case 'p':
			return sink.g1(GateCode.p, qs[0], ang);
		case 'rz':
			return sink.g1(GateCode.rz, qs[0], ang);
		case 'u': {
			const mi = sink.matrices.length;
			sink.matrices.push(item.matrix!);
			return sink.g1(GateCode.u, qs[0], -1, mi);
		}
		case 'cx':
			return sink.g2(GateCode.cx, 1, qs[0], qs[1]);
		case 'cp':
			return sink.g2(GateCode.cp, 1, qs[0], qs[1], ang);
		case 'swap':
			return sink.g2(GateCode.swap, 0, qs[0], qs[1]);
		case 'ccx':
			return sink.g3(GateCode.ccx, qs[0], qs[1], qs[2]);
		case 'mcp':
			return sink.gN(GateCode.mcp, qs.slice(0, -1), qs[qs.length - 1], ang);
	}
}

function lowerQft(ctx: LowerContext, item: QftItem, id: string, env: Env, path: string): void {
	const r = regOf(ctx, item.register, env, `${path}.register`);
	const swaps = item.swaps ?? true;
	const approx = intOf(item.approx, r.size, env, `${path}.approx`);
	if (approx < 1) throw new LoweringError('approx must be at least 1', `${path}.approx`);
	emitQft(ctx, item.type, id, item.label, r, swaps, approx, item.source);
}

function lowerAdd(ctx: LowerContext, item: AddItem, id: string, env: Env, path: string): void {
	const src = regOf(ctx, item.addend, env, `${path}.addend`);
	const tgt = regOf(ctx, item.target, env, `${path}.target`);
	if (src === tgt) throw new LoweringError('addend and target must differ', `${path}.target`);
	const shift = intOf(item.shift, 0, env, `${path}.shift`);
	const control = item.control ? qubitOf(ctx, item.control, env, `${path}.control`) : null;
	if (control !== null && (inReg(control, src) || inReg(control, tgt))) throw new LoweringError('control must not be a qubit of addend or target', `${path}.control`);
	const lowering = item.ccpLowering ?? ctx.defaultCcp;
	const anc = control !== null ? ancillaOf(ctx, item.ancilla, lowering, env, path) : null;
	if (anc !== null && (inReg(anc, src) || inReg(anc, tgt) || anc === control)) throw new LoweringError('ancilla must be distinct from the adder qubits', `${path}.ancilla`);
	emitAdd(ctx, id, item.label, src, tgt, shift, control, item.layout ?? ctx.defaultLayout, lowering, anc, item.source);
}

function lowerAddConst(ctx: LowerContext, item: AddConstItem, id: string, env: Env, path: string): void {
	const tgt = regOf(ctx, item.target, env, `${path}.target`);
	const shift = intOf(item.shift, 0, env, `${path}.shift`);
	const control = item.control ? qubitOf(ctx, item.control, env, `${path}.control`) : null;
	if (control !== null && inReg(control, tgt)) throw new LoweringError('control must not be a qubit of the target', `${path}.control`);
	emitAddConst(ctx, id, item.label, tgt, BigInt(item.value), shift, control !== null ? [control] : [], item.layout ?? ctx.defaultLayout, ctx.defaultCcp, null, item.source);
}

function lowerMultiply(ctx: LowerContext, item: MultiplyItem, id: string, env: Env, path: string): void {
	const a = regOf(ctx, item.a, env, `${path}.a`);
	const b = regOf(ctx, item.b, env, `${path}.b`);
	const p = regOf(ctx, item.product, env, `${path}.product`);
	if (new Set([a, b, p]).size !== 3) throw new LoweringError('a, b and product must be distinct registers', `${path}.product`);
	const lowering = item.ccpLowering ?? ctx.defaultCcp;
	const anc = ancillaOf(ctx, item.ancilla, lowering, env, path);
	if (anc !== null && (inReg(anc, a) || inReg(anc, b) || inReg(anc, p))) throw new LoweringError('ancilla must be distinct from the multiplier qubits', `${path}.ancilla`);
	emitMultiply(ctx, id, item.label, a, b, p, lowering, anc, item.source);
}

function lowerCcp(ctx: LowerContext, item: CcpItem, id: string, env: Env, path: string): void {
	const sink = ctx.sink;
	const c1 = qubitOf(ctx, item.controls[0], env, `${path}.controls[0]`);
	const c2 = qubitOf(ctx, item.controls[1], env, `${path}.controls[1]`);
	const t = qubitOf(ctx, item.target, env, `${path}.target`);
	const theta = angleOf(item.angle, env, `${path}.angle`);
	const lowering = item.lowering ?? ctx.defaultCcp;
	const anc = ancillaOf(ctx, item.ancilla, lowering, env, path);
	if (new Set([c1, c2, t, ...(anc !== null ? [anc] : [])]).size !== (anc !== null ? 4 : 3)) throw new LoweringError('ccp qubits (controls, target, ancilla) must be distinct', path);
	const b = sink.open(
		'ccp',
		id,
		item.label ?? `ccp(${item.angle})`,
		{ kind: 'ccp', controls: [c1, c2], target: t, angle: theta, lowering, ancilla: anc },
		{ text: `phase e^{iθ} on |111⟩ of (q${c1}, q${c2}, q${t}), θ = ${item.angle}; lowering ${lowering}`, writes: [], requires: [] },
		[],
		item.source
	);
	emitCcp(ctx, c1, c2, t, theta, lowering, anc);
	sink.close(b);
}

function lowerCall(ctx: LowerContext, item: CallItem, id: string, env: Env, path: string): void {
	const ub = ctx.userBlocks.get(item.block);
	if (!ub) throw new LoweringError(`unknown block "${item.block}"`, `${path}.block`);
	if (env.depth >= 32) throw new LoweringError('user blocks nested deeper than 32 (recursive call?)', path);
	// Count calls as work: blocks that call each other without making gates multiply without bound.
	if (++ctx.calls > ctx.limits.maxCalls) throw new LoweringError(`more than ${ctx.limits.maxCalls} block calls after expansion (limit); block "${ub.name}" is called too often`, path);
	const inner = bindCall(ctx, ub, item.args, env, path, id);
	const b = ctx.sink.open('call', id, item.label ?? ub.name, { kind: 'call', block: ub.name, args: item.args }, undefined, [], item.source);
	lowerBody(ctx, ub.body, inner, `${path}→${ub.name}.body`);
	ctx.sink.close(b);
}

/** The environment inside a call of `ub`: each parameter bound to its argument, resolved in the caller's `env`. */
function bindCall(ctx: LowerContext, ub: UserBlock, args: Record<string, string | number>, env: Env, path: string, callId: string): Env {
	const inner: Env = { regs: new Map(), ints: new Map(), angles: new Map(), prefix: `${callId}/`, depth: env.depth + 1 };
	for (const p of ub.params) {
		const v = args[p.name];
		const ap = `${path}.args.${p.name}`;
		if (v === undefined) throw new LoweringError(`missing argument for parameter "${p.name}"`, ap);
		if (p.kind === 'register') {
			if (typeof v !== 'string') throw new LoweringError('expected a register name', ap);
			inner.regs.set(p.name, regOf(ctx, v, env, ap).name);
		} else if (p.kind === 'int') {
			inner.ints.set(p.name, intOf(v as IntRef, 0, env, ap));
		} else {
			if (typeof v !== 'string') throw new LoweringError('expected an angle string', ap);
			inner.angles.set(p.name, angleOf(v, env, ap));
		}
	}
	return inner;
}
