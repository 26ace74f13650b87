/**
 * Expansion of one gate call into semantic ops: modifiers (`ctrl`, `negctrl`, `inv`, `pow`,
 * OpenQASM 3 specification, "Quantum gate modifiers") applied from the outside in, and `gate`
 * definitions expanded at the call with their parameters bound. Every expanded definition call
 * and every leaf gate is counted against the file's limits.
 *
 * Qubit order: `qs` lists the call's flat qubits in argument order (controls first).
 * Angles: `Num` in radians.
 */
import type { Token } from './lexer.js';
import { mul, numToFloat, numToInteger, type Num, type NumScope } from './expr.js';
import { matDagger } from './matrix.js';
import { neg, op, withCtrl, type Builtin, type Op } from './gates.js';
import type { WorkBudget } from '../budget.js';
import type { GateOrigin, QasmLimits } from './types.js';

/** A gate modifier (`ctrl(2) @`, `negctrl @`, `inv @`, `pow(k) @`) as written. */
export interface Modifier {
	kind: 'ctrl' | 'negctrl' | 'inv' | 'pow';
	count: number;
	exponent?: Num;
	tok: Token;
}
/** A gate call as written: modifiers, name, parameter expressions (tokens), qubit arguments. */
export interface GateCall {
	mods: Modifier[];
	name: string;
	nameTok: Token;
	params: Token[][];
	qargs: { name: string; index: Token[] | null; tok: Token }[];
}
/** A `gate` definition: its body is expanded at every call. */
export interface GateDef {
	/** Lower bound on the gate items one call produces (for an early size check). */
	leaves: number;
	name: string;
	params: string[];
	qubits: string[];
	body: GateCall[];
	tok: Token;
}

/** inv @: the ops in reverse order, each inverted. */
export function invertOps(ops: Op[]): Op[] {
	const out: Op[] = [];
	for (let i = ops.length - 1; i >= 0; i--) {
		const o = ops[i];
		if (o.kind === 'phase' || o.kind === 'rz' || o.kind === 'gphase') out.push({ ...o, angle: neg(o.angle!) });
		else if (o.kind === 'u') out.push({ ...o, matrix: matDagger(o.matrix!) });
		else out.push(o);
	}
	return out;
}


/** What expansion needs from the reader: limits, positioned errors, gate lookup, parameter evaluation. */
export interface ExpandHost {
	readonly limits: QasmLimits;
	readonly work: WorkBudget;
	readonly consts: NumScope;
	err(at: { line: number; column: number }, msg: string): never;
	resolveGate(call: GateCall, defining: string | null): { def?: GateDef; builtin?: Builtin };
	angleParam(tokens: Token[], scope: NumScope): Num;
}

/** Expands top-level gate calls into ops (see the module comment). */
export class Expander {
	/** Leaf gates made by the current top-level call. */
	private budget = 0;
	/** Gates already made before the current top-level call. */
	private gatesBefore = 0;

	constructor(private readonly host: ExpandHost) {}

	/** Ops of one top-level call with evaluated `params` on flat qubits `qs`; `gatesBefore` gates exist already. */
	expandCall(call: GateCall, params: Num[], qs: number[], origin: GateOrigin, gatesBefore: number): Op[] {
		this.budget = 0;
		this.gatesBefore = gatesBefore;
		return this.expand(call, params, qs, origin, 0);
	}

	private expand(call: GateCall, params: Num[], qs: number[], origin: GateOrigin, depth: number): Op[] {
		if (depth > this.host.limits.maxDepth) this.host.err(origin.call, `gate calls nested deeper than ${this.host.limits.maxDepth} (limit)`);
		return this.applyMods(call, 0, params, qs, origin, depth);
	}

	private applyMods(call: GateCall, mi: number, params: Num[], qs: number[], origin: GateOrigin, depth: number): Op[] {
		if (mi < call.mods.length) {
			const m = call.mods[mi];
			if (m.kind === 'ctrl' || m.kind === 'negctrl') {
				const cs = qs.slice(0, m.count);
				const inner = this.applyMods(call, mi + 1, params, qs.slice(m.count), origin, depth);
				const ctl = withCtrl(inner, cs);
				if (m.kind === 'ctrl') return ctl;
				const flips = cs.map((c) => op('x', [c], origin));
				return [...flips, ...ctl, ...flips];
			}
			const inner = this.applyMods(call, mi + 1, params, qs, origin, depth);
			if (m.kind === 'inv') return invertOps(inner);
			const k = m.exponent!;
			const diagonal = inner.every((o) => o.kind === 'phase' || o.kind === 'rz' || o.kind === 'gphase');
			if (diagonal) return inner.map((o) => ({ ...o, angle: mul(k, o.angle!) }));
			const ki = numToInteger(k);
			if (ki === null) this.host.err(m.tok, `pow(${numToFloat(k)}) @ ${call.name}: a non-integer power is supported on phase gates only`);
			const reps = ki < 0n ? -ki : ki;
			if (reps * BigInt(inner.length) > BigInt(this.host.limits.maxGates)) this.host.err(m.tok, `pow(${ki}) @ ${call.name} exceeds the limit of ${this.host.limits.maxGates} gates`);
			const base = ki < 0n ? invertOps(inner) : inner;
			const out: Op[] = [];
			for (let r = 0n; r < reps; r++) out.push(...base);
			return out;
		}
		const g = this.host.resolveGate(call, null);
		if (g.builtin) {
			// Count leaf ops as they are made, so an exploding chain of definitions stops early.
			this.budget++;
			if (this.budget + this.gatesBefore > this.host.limits.maxGates) this.host.err(origin.call, `more than ${this.host.limits.maxGates} gates after expanding gate definitions (limit)`);
			return g.builtin.build(params, qs, origin);
		}
		const def = g.def!;
		// Every expanded call costs work, also one whose body makes no gate.
		if (this.host.work.wouldExceed('calls', 1)) this.host.err(origin.call, `more than ${this.host.limits.maxCalls} gate calls after expanding gate definitions (limit); "${def.name}" is called too often`);
		this.host.work.charge('calls', 1);
		const scope: NumScope = new Map(this.host.consts);
		def.params.forEach((p, i) => scope.set(p, params[i]));
		const qmap = new Map(def.qubits.map((q, i) => [q, qs[i]]));
		const out: Op[] = [];
		const inner: GateOrigin = { ...origin, definitions: [...origin.definitions, { gate: def.name, line: def.tok.line, column: def.tok.column }] };
		for (const c of def.body) {
			const ps = c.params.map((ex) => this.host.angleParam(ex, scope));
			const bodyOrigin: GateOrigin = { ...inner, definitions: [...inner.definitions.slice(0, -1), { gate: def.name, line: c.nameTok.line, column: c.nameTok.column }] };
			const ops = this.expand(c, ps, c.qargs.map((q) => qmap.get(q.name)!), bodyOrigin, depth + 1);
			for (const o of ops) out.push(o);
			if (out.length > this.host.limits.maxGates) this.host.err(origin.call, `more than ${this.host.limits.maxGates} gates after expanding gate definitions (limit)`);
		}
		return out;
	}
}
