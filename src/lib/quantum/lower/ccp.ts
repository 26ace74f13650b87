/**
 * The doubly controlled phase θ (turns) on flat qubits (c1, c2, t), lowered as the CcpLowering
 * docs in circuit.ts describe: native (one mcp), ancilla (Toffoli, cp, Toffoli), no-ancilla
 * (cp(θ/2) and CNOTs) or quarter (p(±θ/4) on parities).
 */
import { dyadic, halveAngle, negateAngle, angleKey } from '../angle.js';
import type { Angle } from '../angle.js';
import { GateCode, type CcpLowering } from '../circuit.js';
import type { LowerContext } from './context.js';

/** Angle-table ids of θ, θ/2, −θ/2, θ/4, −θ/4 (cached per θ). */
function ccpIds(ctx: LowerContext, theta: Angle): number[] {
	const key = angleKey(theta);
	let ids = ctx.ccpAngles.get(key);
	if (!ids) {
		const sink = ctx.sink;
		const h = halveAngle(theta);
		const q = halveAngle(theta, 2);
		ids = [sink.angleId(theta), sink.angleId(h), sink.angleId(negateAngle(h)), sink.angleId(q), sink.angleId(negateAngle(q))];
		ctx.ccpAngles.set(key, ids);
	}
	return ids;
}

/** 1/2^e turn, made once per e. */
export function unitAngle(ctx: LowerContext, e: number): Angle {
	return (ctx.unitAngles[e] ??= dyadic(1n, e));
}

/** Doubly controlled phase θ (turns) on (c1, c2, t); `anc` is the clean ancilla of the "ancilla" lowering. */
export function emitCcp(ctx: LowerContext, c1: number, c2: number, t: number, theta: Angle, lowering: CcpLowering, anc: number | null): void {
	const sink = ctx.sink;
	const [full, half, mhalf, q, mq] = ccpIds(ctx, theta);
	switch (lowering) {
		case 'native':
			sink.g3(GateCode.mcp, c1, c2, t, full);
			return;
		case 'ancilla': {
			const a = anc!;
			sink.g3(GateCode.ccx, c1, c2, a);
			sink.g2(GateCode.cp, 1, a, t, full);
			sink.g3(GateCode.ccx, c1, c2, a);
			return;
		}
		case 'no-ancilla': {
			// V = p(θ/2): phase θ/2·(c2 − (c1⊕c2) + c1)·t = θ·c1·c2·t.
			sink.g2(GateCode.cp, 1, c2, t, half);
			sink.g2(GateCode.cx, 1, c1, c2);
			sink.g2(GateCode.cp, 1, c2, t, mhalf);
			sink.g2(GateCode.cx, 1, c1, c2);
			sink.g2(GateCode.cp, 1, c1, t, half);
			return;
		}
		case 'quarter': {
			// 4·x1x2x3 = x1 + x2 + x3 − x1⊕x3 + x1⊕x2⊕x3 − x2⊕x3 − x1⊕x2: parities built with
			// CNOTs whose controls are c1/c2, so classical controls keep the ledger exact.
			sink.g1(GateCode.p, c1, q);
			sink.g1(GateCode.p, c2, q);
			sink.g1(GateCode.p, t, q);
			sink.g2(GateCode.cx, 1, c1, t);
			sink.g1(GateCode.p, t, mq);
			sink.g2(GateCode.cx, 1, c2, t);
			sink.g1(GateCode.p, t, q);
			sink.g2(GateCode.cx, 1, c1, t);
			sink.g1(GateCode.p, t, mq);
			sink.g2(GateCode.cx, 1, c2, t);
			sink.g2(GateCode.cx, 1, c1, c2);
			sink.g1(GateCode.p, c2, mq);
			sink.g2(GateCode.cx, 1, c1, c2);
			return;
		}
	}
}
