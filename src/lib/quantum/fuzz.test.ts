import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { importQasm } from './qasm/import.js';
import { QasmError } from './qasm/lexer.js';
import { lowerCircuit, LoweringError } from './lower.js';
import { parseCircuitDocument } from './schema.js';
import { mulberry32 } from './testing/rng.js';

// Seeded fuzzing (issue 10): mutated OpenQASM 2/3 files and circuit documents must each end in a
// result or a positioned message (file:line:column, or a JSON path) within their work budget;
// never another exception, never a hang (the test timeout would catch one). The seed and the
// number of cases are fixed, so every run tries the same inputs.

const SEED = 0x0a11e10;
const QASM_CASES = 360;
const DOC_CASES = 240;


const fixtures = new URL('./qasm/fixtures/', import.meta.url);
const hostile = new URL('../../../tests/fixtures/hostile/', import.meta.url);
const qasmSeeds = [
	...readdirSync(fixtures)
		.filter((f) => /\.qasm3?$/.test(f))
		.map((f) => readFileSync(new URL(f, fixtures), 'utf8')),
	...readdirSync(hostile)
		.filter((f) => /\.qasm3?$/.test(f))
		.map((f) => readFileSync(new URL(f, hostile), 'utf8'))
];
// Pieces an attacker (or a typo) would put in: numbers that grow, nesting, modifiers, broadcasts.
const PIECES = ['(', ')', ';', '**', '**4096', '(2**4096)', '4096', '1e308', '/0', 'q[', ']', '{', '}', 'gate g a { g a; }', 'ctrl @ ', 'pow(1000) @ ', 'inv @ ', 'h q;', 'qreg r[1000];', 'cx q, q;', 'pi', '-', ',', '"', '\n', 'OPENQASM 3.0;', 'for int i in [0:1000] { h q[0]; }', 'def f(qubit a) { h a; }', 'let x = q;', '0.1234567890123'];

function mutate(text: string, r: () => number): string {
	let t = text;
	const steps = 1 + Math.floor(r() * 4);
	for (let s = 0; s < steps; s++) {
		const at = Math.floor(r() * (t.length + 1));
		const kind = Math.floor(r() * 5);
		if (kind === 0) t = t.slice(0, at) + t.slice(at + 1 + Math.floor(r() * 20)); // delete a run
		else if (kind === 1) t = t.slice(0, at) + PIECES[Math.floor(r() * PIECES.length)] + t.slice(at); // insert a piece
		else if (kind === 2) {
			const lines = t.split('\n'); // duplicate a line many times
			const i = Math.floor(r() * lines.length);
			lines.splice(i, 0, ...Array(1 + Math.floor(r() * 50)).fill(lines[i]));
			t = lines.join('\n');
		} else if (kind === 3) t = t.slice(0, at); // truncate
		else t = t.slice(0, at) + String.fromCharCode(32 + Math.floor(r() * 95)) + t.slice(at); // one stray character
	}
	return t;
}

function positioned(e: unknown, text: string): string | null {
	if (!(e instanceof QasmError)) return `not a positioned message: ${e instanceof Error ? `${e.name}: ${e.message}` : String(e)}`;
	const lines = text.split('\n').length;
	if (!Number.isInteger(e.line) || e.line < 1 || e.line > lines + 1) return `line ${e.line} outside the file (${lines} lines): ${e.message}`;
	if (!Number.isInteger(e.column) || e.column < 1) return `column ${e.column}: ${e.message}`;
	if (e.message.length > 2000) return `message of ${e.message.length} characters`;
	return null;
}

const LIMITS = { maxGates: 20_000, maxCalls: 20_000 };

describe('fuzz: mutated OpenQASM files', () => {
	it(`${QASM_CASES} mutants (seed ${SEED}) each end in a document or a positioned message`, () => {
		const r = mulberry32(SEED);
		const problems: string[] = [];
		let accepted = 0;
		for (let k = 0; k < QASM_CASES; k++) {
			const text = mutate(qasmSeeds[k % qasmSeeds.length], r);
			try {
				const out = importQasm(text, { file: `case${k}.qasm`, limits: { maxGates: LIMITS.maxGates, maxCalls: LIMITS.maxCalls } });
				accepted++;
				try {
					lowerCircuit(out.document, { limits: { maxGates: 50_000, maxCalls: LIMITS.maxCalls } });
				} catch (e) {
					if (!(e instanceof LoweringError)) problems.push(`case ${k}: lowering an imported document threw ${(e as Error).message}`);
				}
			} catch (e) {
				const p = positioned(e, text);
				if (p) problems.push(`case ${k}: ${p}`);
			}
		}
		expect(problems).toEqual([]);
		// Not every mutant is broken: some still import (the fuzzing reaches past the first error).
		expect(accepted).toBeGreaterThan(QASM_CASES / 20);
	});
});

// Documents: valid ones (imported fixtures, the hostile nested calls), then leaves replaced by
// hostile values, items duplicated, keys dropped.
const HOSTILE_VALUES: unknown[] = [-1, 0, 1e9, 2 ** 53, 1.5, '', 'q', '(3^4096)^64 turn', '2^8192/3^5000', 'x'.repeat(5000), '9'.repeat(2000), null, [], {}, true, 'b0', 'pi/0'];

function docSeeds(): unknown[] {
	const out: unknown[] = [JSON.parse(readFileSync(new URL('nested-calls.json', hostile), 'utf8'))];
	for (const f of ['adder3.qasm', 'constructs2.qasm']) out.push(importQasm(readFileSync(new URL(f, fixtures), 'utf8')).document);
	out.push({
		format: 'orrery.circuit',
		version: 1,
		title: 'blocks',
		registers: [
			{ name: 'a', size: 3 },
			{ name: 'b', size: 3 }
		],
		body: [
			{ id: 'q1', type: 'qft', register: 'b' },
			{ id: 'add', type: 'add', addend: 'a', target: 'b', shift: 0 },
			{ id: 'c1', type: 'call', block: 'twice', args: { r: 'b', k: 1, t: 'pi/4' } },
			{ id: 'ac', type: 'add-const', target: 'b', value: '5' },
			{ id: 'q2', type: 'iqft', register: 'b' }
		],
		blocks: [{ name: 'twice', params: [{ name: 'r', kind: 'register' }, { name: 'k', kind: 'int' }, { name: 't', kind: 'angle' }], body: [{ id: 'g', type: 'gate', gate: 'p', qubits: [{ register: 'r', index: 'k' }], angle: 't' }] }]
	});
	return out;
}

function mutateJson(doc: unknown, r: () => number): unknown {
	const copy = JSON.parse(JSON.stringify(doc));
	const steps = 1 + Math.floor(r() * 3);
	for (let s = 0; s < steps; s++) {
		// Walk to a random container.
		let node: unknown = copy;
		for (let d = 0; d < 6; d++) {
			const kids = node && typeof node === 'object' ? Object.keys(node as object) : [];
			if (!kids.length || r() < 0.2) break;
			const next = (node as Record<string, unknown>)[kids[Math.floor(r() * kids.length)]];
			if (!next || typeof next !== 'object') break;
			node = next;
		}
		if (!node || typeof node !== 'object') continue;
		const obj = node as Record<string, unknown>;
		const keys = Object.keys(obj);
		if (!keys.length) continue;
		const key = keys[Math.floor(r() * keys.length)];
		const kind = Math.floor(r() * 3);
		if (kind === 0) obj[key] = HOSTILE_VALUES[Math.floor(r() * HOSTILE_VALUES.length)];
		else if (kind === 1 && Array.isArray(obj)) obj.push(...Array(1 + Math.floor(r() * 30)).fill(obj[Number(key)]));
		else delete obj[key];
	}
	return copy;
}

describe('fuzz: mutated circuit documents', () => {
	it(`${DOC_CASES} mutants (seed ${SEED}) each end in a lowered circuit or a message naming a JSON path`, () => {
		const r = mulberry32(SEED ^ 0x5eed);
		const seeds = docSeeds();
		const problems: string[] = [];
		for (let k = 0; k < DOC_CASES; k++) {
			const doc = mutateJson(seeds[k % seeds.length], r);
			let parsed;
			try {
				parsed = parseCircuitDocument(doc);
			} catch (e) {
				problems.push(`case ${k}: validation threw ${(e as Error).message}`);
				continue;
			}
			if (!parsed.ok) {
				for (const i of parsed.issues) if (!i.path || i.message.length > 2000) problems.push(`case ${k}: issue without a path or too long: ${i.path}`);
				continue;
			}
			try {
				lowerCircuit(parsed.document, { trusted: true, limits: { maxGates: 50_000, maxCalls: LIMITS.maxCalls } });
			} catch (e) {
				if (!(e instanceof LoweringError) || !e.path) problems.push(`case ${k}: lowering threw ${e instanceof Error ? `${e.name}: ${e.message}` : String(e)}`);
			}
		}
		expect(problems).toEqual([]);
	});
});
