/**
 * Lowered circuit → OpenQASM 3.0 or 2.0 text. Registers are declared in layout order; q[0] is the
 * least-significant bit. Exact dyadic angles print as exact multiples of π (`3*pi/8`,
 * `pi/2**40`); float angles print with 17 significant digits (radians).
 *
 * 3.0: mcp with k ≥ 2 controls prints as `ctrl(k) @ p(θ)`, mcx as `ctrl(k) @ x`.
 * 2.0: there are no modifiers, so multi-controlled phases and X's are written as `gate`
 * definitions built from cp and cx (Barenco et al. 1995, Lemma 7.5, with V = p(θ/2)); the
 * re-imported circuit is then the decomposition, equal as a unitary.
 */
import { reduceSigned, type Angle } from '../angle.js';
import { gateAt, qubitLabels, type CircuitDocument, type LoweredCircuit } from '../circuit.js';
import { lowerCircuit } from '../lower.js';
import { u3Angles } from './matrix.js';

/** Options of {@link exportQasm}. */
export interface QasmExportOptions {
	version: 2 | 3;
	/** Write block labels as comments where a block starts (default true). */
	comments?: boolean;
}

/** Error for circuits that cannot be written in the requested version. */
export class QasmExportError extends Error {
	constructor(message: string) {
		super(message);
		this.name = 'QasmExportError';
	}
}

/** Exact angle (turns) as a radian expression in OpenQASM syntax; signed in (−π, π]. */
export function formatQasmAngle(a: Angle, version: 2 | 3): string {
	if (!a.exact) {
		const t = a.turns > 0.5 ? a.turns - 1 : a.turns;
		return (t * 2 * Math.PI).toPrecision(17).replace(/\.?0+$/, '') || '0';
	}
	const s = reduceSigned(a);
	if (!s.exact || s.num === 0n) return '0';
	// num/2^exp turn = num·π/2^(exp−1) rad.
	const neg = s.num < 0n;
	const abs = neg ? -s.num : s.num;
	const head = abs === 1n ? 'pi' : `${abs}*pi`;
	const den = s.exp - 1;
	const pow = version === 3 ? '**' : '^';
	const body = den === 0 ? head : den <= 30 ? `${head}/${1 << den}` : `${head}/2${pow}${den}`;
	return neg ? `-${body}` : body;
}

function fmtFloat(x: number): string {
	if (Math.abs(x) < 1e-15) return '0';
	return x.toPrecision(17).replace(/(\.\d*?)0+$/, '$1').replace(/\.$/, '');
}

/**
 * Write a circuit (document, lowered first; or already lowered) as OpenQASM text.
 * Qubit order: register[0] is the LSB; angles exact where dyadic.
 */
export function exportQasm(circuit: CircuitDocument | LoweredCircuit, options: QasmExportOptions): string {
	const c: LoweredCircuit = 'gateCount' in circuit ? circuit : lowerCircuit(circuit);
	const v = options.version;
	const comments = options.comments ?? true;
	// OpenQASM writes a qubit as reg[i], which is the product's label too
	const names = qubitLabels(c.registers);
	const lines: string[] = [];
	lines.push(`OPENQASM ${v}.0;`);
	lines.push(`include "${v === 3 ? 'stdgates.inc' : 'qelib1.inc'}";`);
	lines.push(`// ${c.title || 'circuit'}: written by Orrery from the lowered circuit (${c.gateCount} gates).`);
	lines.push('// Registers read little-endian: name[0] is the least-significant bit.');
	for (const r of c.registers) lines.push(v === 3 ? `qubit[${r.size}] ${r.name};` : `qreg ${r.name}[${r.size}];`);
	const defs: string[] = [];
	const defined = new Set<string>();
	const ensureMcp = (k: number): string => {
		const name = `orr_mcp${k}`;
		if (defined.has(name)) return name;
		const cs = Array.from({ length: k }, (_, i) => `c${i}`);
		const last = cs[k - 1];
		const rest = cs.slice(0, -1);
		const xRest = k - 1 === 1 ? `cx ${rest[0]}, ${last};` : k - 1 === 2 ? `ccx ${rest.join(', ')}, ${last};` : `${ensureMcx(k - 1)} ${rest.join(', ')}, ${last};`;
		const vRest = k - 1 === 1 ? `cu1(theta/2) ${rest[0]}, t;` : `${ensureMcp(k - 1)}(theta/2) ${rest.join(', ')}, t;`;
		defs.push(`gate ${name}(theta) ${cs.join(', ')}, t {\n  cu1(theta/2) ${last}, t;\n  ${xRest}\n  cu1(-theta/2) ${last}, t;\n  ${xRest}\n  ${vRest}\n}`);
		defined.add(name);
		return name;
	};
	const ensureMcx = (k: number): string => {
		const name = `orr_mcx${k}`;
		if (defined.has(name)) return name;
		const cs = Array.from({ length: k }, (_, i) => `c${i}`);
		const p = ensureMcp(k);
		defs.push(`gate ${name} ${cs.join(', ')}, t {\n  h t;\n  ${p}(pi) ${cs.join(', ')}, t;\n  h t;\n}`);
		defined.add(name);
		return name;
	};
	const body: string[] = [];
	let lastBlock = -2;
	for (let g = 0; g < c.gateCount; g++) {
		const gv = gateAt(c, g);
		if (comments && c.blockOf[g] !== lastBlock) {
			lastBlock = c.blockOf[g];
			if (lastBlock >= 0) body.push(`// ${c.blocks[lastBlock].label.replace(/[\r\n]/g, ' ')}`);
		}
		const qs = [...gv.controls, ...gv.targets].map((q) => names[q]).join(', ');
		const ang = gv.angle ? formatQasmAngle(gv.angle, v) : '';
		const k = gv.controls.length;
		switch (gv.kind) {
			case 'h':
			case 'x':
			case 'cx':
			case 'ccx':
			case 'swap':
				body.push(`${gv.kind} ${qs};`);
				break;
			case 'reset':
				body.push(`reset ${qs};`);
				break;
			case 'p':
				body.push(`${v === 3 ? 'p' : 'u1'}(${ang}) ${qs};`);
				break;
			case 'cp':
				body.push(`${v === 3 ? 'cp' : 'cu1'}(${ang}) ${qs};`);
				break;
			case 'rz':
				body.push(`rz(${ang}) ${qs};`);
				break;
			case 'mcp':
				if (k === 0) body.push(`${v === 3 ? 'p' : 'u1'}(${ang}) ${qs};`);
				else if (k === 1) body.push(`${v === 3 ? 'cp' : 'cu1'}(${ang}) ${qs};`);
				else if (v === 3) body.push(`ctrl(${k}) @ p(${ang}) ${qs};`);
				else body.push(`${ensureMcp(k)}(${ang}) ${qs};`);
				break;
			case 'mcx':
				if (k === 0) body.push(`x ${qs};`);
				else if (k === 1) body.push(`cx ${qs};`);
				else if (k === 2) body.push(`ccx ${qs};`);
				else if (v === 3) body.push(`ctrl(${k}) @ x ${qs};`);
				else body.push(`${ensureMcx(k)} ${qs};`);
				break;
			case 'u': {
				const m = gv.matrix;
				if (!m) throw new QasmExportError(`gate ${g}: u gate without a matrix`);
				const { theta, phi, lambda } = u3Angles(m);
				body.push(`${v === 3 ? 'U' : 'u3'}(${fmtFloat(theta)}, ${fmtFloat(phi)}, ${fmtFloat(lambda)}) ${qs};`);
				break;
			}
			default:
				throw new QasmExportError(`gate ${g}: kind ${gv.kind as string} cannot be written as OpenQASM`);
		}
	}
	return [...lines, ...defs, ...body, ''].join('\n');
}
