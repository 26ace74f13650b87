/**
 * zod schema of the circuit document (format `orrery.circuit`, version 1) and its parser.
 * Qubit order: {register, index} with index 0 = LSB. Angle units: strings, radian expressions or
 * `"<expr> turn"`. Every error names the JSON path of the offending field (`body[2].qubits[0].index`).
 */
import { z } from 'zod';
import { MAX_ANGLE_TEXT, parseAngle } from './angle.js';
import { CIRCUIT_FORMAT, CIRCUIT_VERSION, DEFAULT_LIMITS, MAX_BODY_ITEMS } from './circuit.js';
import { upgradeLegacyDocument } from './legacy.js';
import type { BodyItem, CircuitDocument, UserBlock } from './circuit.js';

const name = z.string().regex(/^[A-Za-z_][A-Za-z0-9_]*$/, 'must be an identifier (letters, digits, _; not starting with a digit)');
const intRef = z.union([z.number().int().min(0), name]);
const qubitRef = z.strictObject({ register: name, index: intRef });
const source = z.strictObject({ line: z.number().int().min(1), column: z.number().int().min(1) });
const layout = z.enum(['swapped', 'unswapped']);
const ccpLowering = z.enum(['native', 'ancilla', 'no-ancilla', 'quarter']);
const angleText = z.string().min(1, 'angle must not be empty').max(MAX_ANGLE_TEXT, `angle must be at most ${MAX_ANGLE_TEXT} characters`);
const complexPair = z.tuple([z.number(), z.number()]);
const matrix2 = z.tuple([z.tuple([complexPair, complexPair]), z.tuple([complexPair, complexPair])]);

const base = {
	id: z.string().min(1).max(128),
	label: z.string().max(200).optional(),
	source: source.optional()
};

const gateItem = z.strictObject({
	...base,
	type: z.literal('gate'),
	gate: z.enum(['h', 'x', 'cx', 'ccx', 'swap', 'p', 'cp', 'mcp', 'rz', 'u', 'reset']),
	qubits: z.array(qubitRef).min(1).max(64),
	angle: angleText.optional(),
	matrix: matrix2.optional()
});
const qftItem = z.strictObject({
	...base,
	type: z.enum(['qft', 'iqft']),
	register: name,
	swaps: z.boolean().optional(),
	approx: intRef.optional()
});
const addItem = z.strictObject({
	...base,
	type: z.literal('add'),
	addend: name,
	target: name,
	shift: intRef.optional(),
	control: qubitRef.optional(),
	layout: layout.optional(),
	ccpLowering: ccpLowering.optional(),
	ancilla: qubitRef.optional()
});
const addConstItem = z.strictObject({
	...base,
	type: z.literal('add-const'),
	target: name,
	// 4096 qubits hold at most 1234 decimal digits; longer values are refused before BigInt reads them.
	value: z.string().max(1300, 'must be at most 1300 digits').regex(/^-?\d+$/, 'must be a decimal integer string'),
	shift: intRef.optional(),
	control: qubitRef.optional(),
	layout: layout.optional()
});
const multiplyItem = z.strictObject({
	...base,
	type: z.literal('multiply'),
	a: name,
	b: name,
	product: name,
	ccpLowering: ccpLowering.optional(),
	ancilla: qubitRef.optional()
});
const ccpItem = z.strictObject({
	...base,
	type: z.literal('ccp'),
	controls: z.tuple([qubitRef, qubitRef]),
	target: qubitRef,
	angle: angleText,
	lowering: ccpLowering.optional(),
	ancilla: qubitRef.optional()
});
const callItem = z.strictObject({
	...base,
	type: z.literal('call'),
	block: name,
	args: z.record(z.string().max(64), z.union([z.string().max(MAX_ANGLE_TEXT), z.number().int().min(-1_000_000).max(1_000_000)]))
});

const decimal = z.string().regex(/^\d{1,30}$/, 'must be a non-negative decimal integer');
const modular = {
	...base,
	value: decimal,
	modulus: decimal,
	ancilla: qubitRef,
	ccpLowering: ccpLowering.optional(),
	ccpAncilla: qubitRef.optional(),
	approx: intRef.optional()
};
const modAddItem = z.strictObject({ ...modular, type: z.literal('mod-add'), target: name, controls: z.array(qubitRef).max(2, 'at most two controls').optional(), layout: layout.optional() });
const modMulItem = z.strictObject({ ...modular, type: z.literal('mod-mul'), x: name, target: name, control: qubitRef.optional() });
const modMulInPlaceItem = z.strictObject({ ...modular, type: z.literal('mod-mul-inplace'), x: name, work: name, control: qubitRef.optional() });
const modExpItem = z.strictObject({ ...modular, type: z.literal('mod-exp'), exponent: name, y: name, work: name });

/** zod schema of one body item (discriminated by `type`). */
export const bodyItemSchema = z.discriminatedUnion('type', [gateItem, qftItem, addItem, addConstItem, multiplyItem, ccpItem, callItem, modAddItem, modMulItem, modMulInPlaceItem, modExpItem]);

const userBlock = z.strictObject({
	name,
	description: z.string().max(2000).optional(),
	params: z.array(z.strictObject({ name, kind: z.enum(['register', 'int', 'angle']) })).max(32),
	body: z.array(bodyItemSchema).max(10_000)
});

/** zod schema of the whole circuit document (structure only; see {@link parseCircuitDocument} for reference checks). */
export const circuitDocumentSchema = z.strictObject({
	format: z.literal(CIRCUIT_FORMAT),
	version: z.literal(CIRCUIT_VERSION),
	title: z.string().max(200),
	description: z.string().max(10_000).optional(),
	registers: z
		.array(
			z.strictObject({
				name,
				size: z.number().int().min(1).max(DEFAULT_LIMITS.maxQubits),
				role: z.enum(['input', 'output', 'ancilla', 'work']).optional()
			})
		)
		.min(1)
		.max(256),
	body: z.array(bodyItemSchema).max(MAX_BODY_ITEMS),
	blocks: z.array(userBlock).max(256).optional(),
	defaults: z.strictObject({ ccpLowering: ccpLowering.optional(), layout: layout.optional() }).optional(),
	specs: z.array(z.string().min(1).max(500)).max(16).optional(),
	assume: z.array(z.string().min(1).max(500)).max(16).optional(),
	registerMap: z.array(z.strictObject({ name, qubits: z.string().min(1).max(2000) })).max(256).optional()
});

/** One validation problem, with the JSON path of the bad field (`body[2].angle`). */
export interface DocumentIssue {
	path: string;
	message: string;
}

/** Result of {@link parseCircuitDocument}. */
export type DocumentParseResult = { ok: true; document: CircuitDocument } | { ok: false; issues: DocumentIssue[] };

/** Render a path array as `body[2].qubits[0].index`. */
export function formatPath(path: readonly PropertyKey[]): string {
	let out = '';
	for (const p of path) {
		if (typeof p === 'number') out += `[${p}]`;
		else out += out === '' ? String(p) : `.${String(p)}`;
	}
	return out || '(document)';
}

const GATE_ARITY: Record<string, { qubits: number | 'any'; angle: boolean; matrix: boolean; minQubits?: number }> = {
	h: { qubits: 1, angle: false, matrix: false },
	x: { qubits: 1, angle: false, matrix: false },
	cx: { qubits: 2, angle: false, matrix: false },
	ccx: { qubits: 3, angle: false, matrix: false },
	swap: { qubits: 2, angle: false, matrix: false },
	p: { qubits: 1, angle: true, matrix: false },
	cp: { qubits: 2, angle: true, matrix: false },
	mcp: { qubits: 'any', angle: true, matrix: false, minQubits: 1 },
	rz: { qubits: 1, angle: true, matrix: false },
	u: { qubits: 1, angle: false, matrix: true },
	reset: { qubits: 1, angle: false, matrix: false }
};

/**
 * Validate an unknown JSON value as a circuit document: structure (zod), then references
 * (unique ids, known registers and blocks, qubit indices in range, gate arity, parseable
 * angles, unitary matrices). Returns every issue found, each with its JSON path.
 */
export function parseCircuitDocument(json: unknown): DocumentParseResult {
	const parsed = circuitDocumentSchema.safeParse(upgradeLegacyDocument(json));
	if (!parsed.success) {
		return {
			ok: false,
			issues: parsed.error.issues.map((i) => ({ path: formatPath(i.path), message: i.message }))
		};
	}
	const doc = parsed.data as CircuitDocument;
	const issues = checkReferences(doc);
	return issues.length ? { ok: false, issues } : { ok: true, document: doc };
}

/** Like {@link parseCircuitDocument} but throws one Error listing every issue. */
export function readCircuitDocument(json: unknown): CircuitDocument {
	const r = parseCircuitDocument(json);
	if (!r.ok) throw new Error(`invalid circuit document:\n${r.issues.map((i) => `  ${i.path}: ${i.message}`).join('\n')}`);
	return r.document;
}

/** Serialise a document to JSON text; angles are kept as the user's strings, so parse∘serialise is the identity. */
export function serializeCircuitDocument(doc: CircuitDocument): string {
	return JSON.stringify(doc, null, 2);
}

function checkReferences(doc: CircuitDocument): DocumentIssue[] {
	const issues: DocumentIssue[] = [];
	const regs = new Map<string, number>();
	doc.registers.forEach((r, i) => {
		if (regs.has(r.name)) issues.push({ path: `registers[${i}].name`, message: `duplicate register name "${r.name}"` });
		regs.set(r.name, r.size);
	});
	const total = doc.registers.reduce((s, r) => s + r.size, 0);
	if (total > DEFAULT_LIMITS.maxQubits)
		issues.push({ path: 'registers', message: `${total} qubits exceeds the limit of ${DEFAULT_LIMITS.maxQubits}` });
	const blocks = new Map<string, UserBlock>();
	(doc.blocks ?? []).forEach((b, i) => {
		if (blocks.has(b.name)) issues.push({ path: `blocks[${i}].name`, message: `duplicate block name "${b.name}"` });
		blocks.set(b.name, b);
		const pnames = new Set<string>();
		b.params.forEach((p, j) => {
			if (pnames.has(p.name)) issues.push({ path: `blocks[${i}].params[${j}].name`, message: `duplicate parameter "${p.name}"` });
			pnames.add(p.name);
		});
	});
	checkBody(doc.body, 'body', regs, blocks, null, issues);
	(doc.blocks ?? []).forEach((b, i) => checkBody(b.body, `blocks[${i}].body`, regs, blocks, b, issues));
	return issues;
}

function checkBody(
	body: BodyItem[],
	at: string,
	regs: Map<string, number>,
	blocks: Map<string, UserBlock>,
	inBlock: UserBlock | null,
	issues: DocumentIssue[]
): void {
	const ids = new Set<string>();
	const params = new Map((inBlock?.params ?? []).map((p) => [p.name, p.kind]));
	const regOk = (r: string, path: string): boolean => {
		if (regs.has(r) || params.get(r) === 'register') return true;
		issues.push({ path, message: `unknown register "${r}"` });
		return false;
	};
	const intOk = (v: number | string, path: string) => {
		if (typeof v === 'string' && params.get(v) !== 'int') issues.push({ path, message: `"${v}" is not an int parameter` });
	};
	const qubitOk = (q: { register: string; index: number | string }, path: string) => {
		if (!regOk(q.register, `${path}.register`)) return;
		intOk(q.index, `${path}.index`);
		const size = regs.get(q.register);
		if (size !== undefined && !params.has(q.register) && typeof q.index === 'number' && q.index >= size)
			issues.push({ path: `${path}.index`, message: `index ${q.index} out of range for register "${q.register}" of size ${size}` });
	};
	const angleOk = (a: string, path: string) => {
		if (inBlock) return; // may refer to parameters; checked when the call is lowered
		try {
			parseAngle(a);
		} catch (e) {
			issues.push({ path, message: (e as Error).message });
		}
	};
	body.forEach((item, i) => {
		const p = `${at}[${i}]`;
		if (ids.has(item.id)) issues.push({ path: `${p}.id`, message: `duplicate item id "${item.id}"` });
		ids.add(item.id);
		switch (item.type) {
			case 'gate': {
				const ar = GATE_ARITY[item.gate];
				if (ar.qubits !== 'any' && item.qubits.length !== ar.qubits)
					issues.push({ path: `${p}.qubits`, message: `gate ${item.gate} takes ${ar.qubits} qubits, got ${item.qubits.length}` });
				item.qubits.forEach((q, j) => qubitOk(q, `${p}.qubits[${j}]`));
				const seen = new Set(item.qubits.map((q) => `${q.register}:${q.index}`));
				if (seen.size !== item.qubits.length) issues.push({ path: `${p}.qubits`, message: 'a gate cannot use the same qubit twice' });
				if (ar.angle && item.angle === undefined) issues.push({ path: `${p}.angle`, message: `gate ${item.gate} needs an angle` });
				if (!ar.angle && item.angle !== undefined) issues.push({ path: `${p}.angle`, message: `gate ${item.gate} takes no angle` });
				if (item.angle !== undefined) angleOk(item.angle, `${p}.angle`);
				if (ar.matrix && !item.matrix) issues.push({ path: `${p}.matrix`, message: 'gate u needs a 2×2 matrix' });
				if (!ar.matrix && item.matrix) issues.push({ path: `${p}.matrix`, message: `gate ${item.gate} takes no matrix` });
				if (item.matrix) {
					const err = unitarityError(item.matrix);
					if (err > 1e-9) issues.push({ path: `${p}.matrix`, message: `matrix is not unitary (‖U†U − I‖ = ${err.toExponential(2)})` });
				}
				break;
			}
			case 'qft':
			case 'iqft':
				regOk(item.register, `${p}.register`);
				if (item.approx !== undefined) intOk(item.approx, `${p}.approx`);
				break;
			case 'add':
				regOk(item.addend, `${p}.addend`);
				regOk(item.target, `${p}.target`);
				if (item.addend === item.target) issues.push({ path: `${p}.target`, message: 'addend and target must differ' });
				if (item.shift !== undefined) intOk(item.shift, `${p}.shift`);
				if (item.control) qubitOk(item.control, `${p}.control`);
				if (item.ancilla) qubitOk(item.ancilla, `${p}.ancilla`);
				break;
			case 'add-const':
				regOk(item.target, `${p}.target`);
				if (item.shift !== undefined) intOk(item.shift, `${p}.shift`);
				if (item.control) qubitOk(item.control, `${p}.control`);
				break;
			case 'multiply':
				regOk(item.a, `${p}.a`);
				regOk(item.b, `${p}.b`);
				regOk(item.product, `${p}.product`);
				if (new Set([item.a, item.b, item.product]).size !== 3) issues.push({ path: `${p}.product`, message: 'a, b and product must be distinct registers' });
				if (item.ancilla) qubitOk(item.ancilla, `${p}.ancilla`);
				break;
			case 'ccp':
				item.controls.forEach((q, j) => qubitOk(q, `${p}.controls[${j}]`));
				qubitOk(item.target, `${p}.target`);
				angleOk(item.angle, `${p}.angle`);
				if (item.ancilla) qubitOk(item.ancilla, `${p}.ancilla`);
				break;
			case 'mod-add':
			case 'mod-mul':
			case 'mod-mul-inplace':
			case 'mod-exp': {
				const regFields = item.type === 'mod-add' ? ['target'] : item.type === 'mod-mul' ? ['x', 'target'] : item.type === 'mod-mul-inplace' ? ['x', 'work'] : ['exponent', 'y', 'work'];
				const rec = item as unknown as Record<string, string>;
				for (const f of regFields) regOk(rec[f], `${p}.${f}`);
				if (new Set(regFields.map((f) => rec[f])).size !== regFields.length) issues.push({ path: `${p}.${regFields[regFields.length - 1]}`, message: `${regFields.join(', ')} must be distinct registers` });
				qubitOk(item.ancilla, `${p}.ancilla`);
				if (item.ccpAncilla) qubitOk(item.ccpAncilla, `${p}.ccpAncilla`);
				if (item.approx !== undefined) intOk(item.approx, `${p}.approx`);
				if (item.type === 'mod-add') (item.controls ?? []).forEach((q, j) => qubitOk(q, `${p}.controls[${j}]`));
				else if (item.type !== 'mod-exp' && item.control) qubitOk(item.control, `${p}.control`);
				break;
			}
			case 'call': {
				const b = blocks.get(item.block);
				if (!b) {
					issues.push({ path: `${p}.block`, message: `unknown block "${item.block}"` });
					break;
				}
				for (const prm of b.params) {
					const v = item.args[prm.name];
					if (v === undefined) {
						issues.push({ path: `${p}.args.${prm.name}`, message: `missing argument for parameter "${prm.name}" (${prm.kind})` });
						continue;
					}
					const ap = `${p}.args.${prm.name}`;
					if (prm.kind === 'register') {
						if (typeof v !== 'string') issues.push({ path: ap, message: 'expected a register name' });
						else regOk(v, ap);
					} else if (prm.kind === 'int') {
						if (typeof v === 'number') {
							if (v < 0) issues.push({ path: ap, message: 'expected a non-negative integer' });
						} else intOk(v, ap);
					} else if (typeof v !== 'string') issues.push({ path: ap, message: 'expected an angle string' });
					else angleOk(v, ap);
				}
				for (const k of Object.keys(item.args))
					if (!b.params.some((prm) => prm.name === k)) issues.push({ path: `${p}.args.${k}`, message: `block "${b.name}" has no parameter "${k}"` });
				break;
			}
		}
	});
}

/** ‖U†U − I‖ (max entry) of a 2×2 complex matrix. */
export function unitarityError(m: [[[number, number], [number, number]], [[number, number], [number, number]]]): number {
	let worst = 0;
	for (let i = 0; i < 2; i++)
		for (let j = 0; j < 2; j++) {
			let re = 0;
			let im = 0;
			for (let k = 0; k < 2; k++) {
				const [ar, ai] = m[k][i]; // conj(U[k][i])
				const [br, bi] = m[k][j];
				re += ar * br + ai * bi;
				im += ar * bi - ai * br;
			}
			worst = Math.max(worst, Math.hypot(re - (i === j ? 1 : 0), im));
		}
	return worst;
}
