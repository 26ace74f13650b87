/**
 * What every lowering pass shares: the placed registers, the document's defaults, the gate sink,
 * the call budget and the angle caches, plus the lookups that resolve an item's references in
 * the current call environment (a register, an int, a qubit, an angle, an ancilla). Qubits are
 * flat indices (register offset + index, index 0 = LSB); angles in turns.
 */
import { parseAngle } from '../angle.js';
import type { Angle, AngleScope } from '../angle.js';
import type { CcpLowering, FourierLayout, IntRef, LoweringLimits, PlacedRegister, QubitRef, UserBlock, ValueExpr } from '../circuit.js';
import { GateSink, LoweringError } from './sink.js';

/** The names a call binds: parameter → register name, int or angle; `prefix` makes item ids unique per call. */
export interface Env {
	/** parameter → actual register name */
	regs: Map<string, string>;
	ints: Map<string, number>;
	angles: Map<string, Angle>;
	prefix: string;
	depth: number;
}

/** State of one lowering run, passed to every pass. */
export interface LowerContext {
	readonly sink: GateSink;
	readonly registers: PlacedRegister[];
	readonly regByName: Map<string, PlacedRegister>;
	readonly userBlocks: Map<string, UserBlock>;
	readonly defaultCcp: CcpLowering;
	readonly defaultLayout: FourierLayout;
	/** The first register with role "ancilla", the default ancilla of a ccp lowered with one. */
	readonly ancillaReg: PlacedRegister | undefined;
	readonly limits: LoweringLimits;
	/** Block calls so far (bounded by limits.maxCalls). */
	calls: number;
	/** Angle-table ids of θ, θ/2, −θ/2, θ/4, −θ/4 per θ: the multiplier emits ~n³ ccp with few distinct angles. */
	readonly ccpAngles: Map<string, number[]>;
	/** 1/2^e turn by e, made once. */
	readonly unitAngles: Angle[];
}

/** The top-level environment (no parameters bound). */
export const rootEnv = (): Env => ({ regs: new Map(), ints: new Map(), angles: new Map(), prefix: '', depth: 0 });

export const reg = (name: string): ValueExpr => ({ op: 'reg', name });

export const inReg = (q: number, r: PlacedRegister): boolean => q >= r.offset && q < r.offset + r.size;

export function regOf(ctx: LowerContext, name: string, env: Env, path: string): PlacedRegister {
	const actual = env.regs.get(name) ?? name;
	const r = ctx.regByName.get(actual);
	if (!r) throw new LoweringError(`unknown register "${name}"`, path);
	return r;
}

export function intOf(v: IntRef | undefined, dflt: number, env: Env, path: string): number {
	if (v === undefined) return dflt;
	if (typeof v === 'number') return v;
	const x = env.ints.get(v);
	if (x === undefined) throw new LoweringError(`"${v}" is not an int parameter here`, path);
	return x;
}

export function qubitOf(ctx: LowerContext, q: QubitRef, env: Env, path: string): number {
	const r = regOf(ctx, q.register, env, `${path}.register`);
	const i = intOf(q.index, 0, env, `${path}.index`);
	if (i < 0 || i >= r.size) throw new LoweringError(`index ${i} out of range for register "${r.name}" of size ${r.size}`, `${path}.index`);
	return r.offset + i;
}

function scopeOf(env: Env): AngleScope {
	const s: AngleScope = {};
	for (const [k, v] of env.ints) s[k] = { int: BigInt(v) };
	for (const [k, v] of env.angles) s[k] = { angle: v };
	return s;
}

export function angleOf(text: string, env: Env, path: string): Angle {
	try {
		return parseAngle(text, scopeOf(env));
	} catch (e) {
		throw new LoweringError((e as Error).message, path);
	}
}

/** The ancilla of a ccp lowered with `lowering` (null unless "ancilla"): the item's own, else the ancilla register's first qubit. */
export function ancillaOf(ctx: LowerContext, q: QubitRef | undefined, lowering: CcpLowering, env: Env, path: string): number | null {
	if (lowering !== 'ancilla') return null;
	if (q) return qubitOf(ctx, q, env, `${path}.ancilla`);
	if (!ctx.ancillaReg) throw new LoweringError('ccp lowering "ancilla" needs an ancilla qubit: set `ancilla` or add a register with role "ancilla"', path);
	return ctx.ancillaReg.offset;
}

/** Flat qubit q as a value expression (bit `index` of its register). */
export function bitExpr(ctx: LowerContext, q: number): ValueExpr {
	for (const r of ctx.registers) if (q >= r.offset && q < r.offset + r.size) return { op: 'bit', register: r.name, index: q - r.offset };
	throw new Error(`qubit ${q} outside every register`);
}
