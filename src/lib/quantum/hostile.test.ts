import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { importQasm } from './qasm/import.js';
import { QasmError } from './qasm/lexer.js';
import { lowerCircuit, LoweringError } from './lower.js';
import { parseAngle } from './angle.js';
import { parseCircuitDocument } from './schema.js';
import { bitLength, BudgetExceeded, checkBits, MAX_NUMBER_BITS, shortInteger, WorkBudget } from './budget.js';
import type { CallItem } from './circuit.js';

// Issue 10: small inputs that froze or killed the server. Each is kept as a named file in
// tests/fixtures/hostile and must end in a positioned message (or a compact result) within its
// work budget. No timings here: a regression shows up as a hang, which the test timeout catches.
const hostile = (name: string) => readFileSync(new URL(`../../../tests/fixtures/hostile/${name}`, import.meta.url), 'utf8');

function qasmError(text: string, file: string): QasmError {
	try {
		importQasm(text, { file });
	} catch (e) {
		if (e instanceof QasmError) return e;
		throw e;
	}
	throw new Error(`${file} was accepted`);
}

describe('hostile OpenQASM files', () => {
	it('pow-fraction.qasm: (3**4096)**64 is refused from its estimated size, at the expression', () => {
		const e = qasmError(hostile('pow-fraction.qasm'), 'pow-fraction.qasm');
		expect([e.line, e.column]).toEqual([3, 7]);
		// 4096·log2(3) ≈ 6492 bits, times 64 ≈ 415 500 bits (from the operand sizes, before computing).
		expect(e.detail).toMatch(/^number too large: about 415,\d{3} bits; the limit is 8192 bits per number/);
	});
	it('huge-register.qasm: qreg q[(2**4096)**4096] is refused without writing the number out', () => {
		const e = qasmError(hostile('huge-register.qasm'), 'huge-register.qasm');
		expect([e.line, e.column]).toEqual([2, 8]);
		expect(e.message.length).toBeLessThan(200);
	});
	it('a register size that is big but computable is named by its digit count, not printed', () => {
		const e = qasmError('OPENQASM 2.0;\nqreg q[2**4000];\n', 'big.qasm');
		expect(e.detail).toBe('register size a 1205-digit number is out of range; expected 1..1024');
		expect([e.line, e.column]).toEqual([2, 8]);
	});
	it('a literal with thousands of digits is refused at the literal before it is read', () => {
		const e = qasmError(`OPENQASM 2.0;\nqreg q[1];\nU(0,0,1${'0'.repeat(3000)}) q[0];\n`, 'long.qasm');
		expect([e.line, e.column]).toEqual([3, 7]);
		expect(e.detail).toBe('number is too long');
	});
	it('nested-gates.qasm: definitions that call each other 30 times six deep with no gates stop at the call budget', () => {
		const e = qasmError(hostile('nested-gates.qasm'), 'nested-gates.qasm');
		expect(e.line).toBe(10);
		expect(e.column).toBe(1);
		expect(e.detail).toMatch(/more than 200000 gate calls after expanding gate definitions \(limit\)/);
	});
	it('broadcast-300.qasm: h q on 1000 qubits three hundred times stores 300 items and one block, lowering to 300 000 gates', () => {
		const r = importQasm(hostile('broadcast-300.qasm'), { file: 'broadcast-300.qasm' });
		expect(r.document.body).toHaveLength(300);
		expect(r.document.blocks).toHaveLength(1);
		expect(r.document.blocks![0].body).toHaveLength(1000);
		const first = r.document.body[0] as CallItem;
		expect([first.type, first.block, first.source]).toEqual(['call', 'each_h_q', { line: 4, column: 1 }]);
		// The stored document was 72 MB before; now about 120 KB.
		expect(JSON.stringify(r.document).length).toBeLessThan(200_000);
		expect(parseCircuitDocument(r.document).ok).toBe(true);
		expect(lowerCircuit(r.document).gateCount).toBe(300_000);
	});
});

describe('hostile circuit documents', () => {
	it('nested-calls.json: blocks calling the next 30 times, six deep, no gates, stop at the call budget with the JSON path', () => {
		const doc = JSON.parse(hostile('nested-calls.json'));
		expect(parseCircuitDocument(doc).ok).toBe(true); // valid structure: only expanding it is work
		let err: unknown;
		try {
			lowerCircuit(doc, { limits: { maxGates: 50_000, maxCalls: 20_000 } });
		} catch (e) {
			err = e;
		}
		expect(err).toBeInstanceOf(LoweringError);
		expect((err as LoweringError).path).toMatch(/^body\[0\]→b6\.body\[\d+\]→b5\.body/);
		expect((err as Error).message).toMatch(/more than 20000 block calls after expansion \(limit\); block "b0" is called too often/);
	});
	it('an angle text with huge powers falls back to a float (and is refused as not finite) instead of computing the number', () => {
		expect(() => parseAngle('(3^4096)^64 turn')).toThrow(/not a finite real number/);
		expect(() => parseAngle('x'.repeat(2000))).toThrow(/the limit is 1000/);
	});
	it('an add-const value longer than 1300 digits is refused by the schema with its field', () => {
		const doc = {
			format: 'orrery.circuit',
			version: 1,
			title: 't',
			registers: [{ name: 'b', size: 4 }],
			body: [{ id: 'a1', type: 'add-const', target: 'b', value: '9'.repeat(5000) }]
		};
		const r = parseCircuitDocument(doc);
		expect(r.ok).toBe(false);
		if (!r.ok) expect(r.issues[0]).toEqual({ path: 'body[0].value', message: 'must be at most 1300 digits' });
	});
});

describe('WorkBudget and number sizes', () => {
	it('bitLength matches the binary text length (from the definition of bit length)', () => {
		for (const x of [0n, 1n, 2n, 3n, 255n, 256n, 2n ** 52n - 1n, 2n ** 53n, 2n ** 53n + 1n, 3n ** 4096n, -(2n ** 100n)])
			expect(bitLength(x)).toBe(x === 0n ? 0 : (x < 0n ? -x : x).toString(2).length);
	});
	it('checkBits refuses above MAX_NUMBER_BITS and names the size', () => {
		expect(() => checkBits(MAX_NUMBER_BITS)).not.toThrow();
		expect(() => checkBits(MAX_NUMBER_BITS + 1)).toThrow(BudgetExceeded);
	});
	it('a budget stops at its limit, naming the kind and where', () => {
		const b = new WorkBudget({ calls: 3 });
		b.charge('calls', 3, { line: 1, column: 1 });
		let err: BudgetExceeded | null = null;
		try {
			b.charge('calls', 1, { path: 'body[4]' });
		} catch (e) {
			err = e as BudgetExceeded;
		}
		expect(err?.message).toBe('more than 3 calls after expanding definitions (limit)');
		expect(err?.where).toBe('body[4]');
	});
	it('shortInteger prints short numbers and sizes long ones', () => {
		expect(shortInteger(12345n)).toBe('12345');
		expect(shortInteger(10n ** 30n)).toBe('a 31-digit number');
	});
});
