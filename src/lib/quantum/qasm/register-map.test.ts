// Register maps over an imported file's qubits (register-map.ts). Index syntax: OpenQASM 3
// specification, "Register concatenation and slicing" (inclusive ranges start:step:end, sets {…}).
import { describe, expect, it } from 'vitest';
import { applyRegisterMap, parseRegisterMapEntry, resolveRegisterMapEntry, RegisterMapError } from './register-map.js';
import { importQasm } from './import.js';
import type { GateItem } from '../circuit.js';

const regs = [{ name: 'q', size: 16 }, { name: 'anc', size: 1 }];
const idx = (t: string) => resolveRegisterMapEntry(parseRegisterMapEntry(t), regs).indices;

describe('index sets (listed from the new register’s least-significant bit)', () => {
	it('ranges include their end; a step walks backwards for most-significant-bit-first files', () => {
		expect(idx('x=q[0:3]')).toEqual([0, 1, 2, 3]);
		expect(idx('x=q[15:-1:12]')).toEqual([15, 14, 13, 12]);
		expect(idx('x=q[0:2:6]')).toEqual([0, 2, 4, 6]);
		expect(idx('x=q[{3,1,2,0}]')).toEqual([3, 1, 2, 0]);
		expect(idx('x=q[7]')).toEqual([7]);
		expect(idx('x=anc')).toEqual([0]);
		expect(idx('x=q')).toHaveLength(16);
	});
	it('bad entries say what and where', () => {
		const msg = (t: string) => {
			try {
				idx(t);
			} catch (e) {
				expect(e).toBeInstanceOf(RegisterMapError);
				return (e as Error).message;
			}
			return 'no error';
		};
		expect(msg('x')).toMatch(/expected NAME=QUBITS/);
		expect(msg('1x=q[0]')).toMatch(/must be an identifier/);
		expect(msg('x=r[0:3]')).toMatch(/the file has no register "r"; it has q\[16\], anc\[1\]/);
		expect(msg('x=q[0:16]')).toMatch(/index 16 is out of range for q\[16\]; expected 0\.\.15/);
		expect(msg('x=q[15:1:0]')).toMatch(/range 15:1:0 is empty; for most-significant bit first write 15:-1:0/);
		expect(msg('x=q[{1,2,1}]')).toMatch(/q\[1\] is listed twice/);
		expect(msg('x=q[a]')).toMatch(/index "a" is not an integer/);
		expect(msg('x=q[0:0:3]')).toMatch(/step must not be 0/);
	});
});

describe('applyRegisterMap', () => {
	const text = 'OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[6];\nx q[0];\ncx q[0],q[5];\nh q[3];\n';
	const doc = importQasm(text).document;
	it('rewrites every gate into the mapped registers; the rest of a partly mapped register becomes REG_rest', () => {
		const r = applyRegisterMap(doc, [parseRegisterMapEntry('a=q[2:-1:0]'), parseRegisterMapEntry('b=q[{5}]')]);
		expect(r.document.registers).toEqual([{ name: 'a', size: 3 }, { name: 'b', size: 1 }, { name: 'q_rest', size: 2 }]);
		const qs = (r.document.body as GateItem[]).map((g) => g.qubits.map((q) => `${q.register}[${q.index}]`).join(','));
		expect(qs).toEqual(['a[2]', 'a[2],b[0]', 'q_rest[0]']);
		expect(r.notes).toEqual(['2 qubits of q in no mapped register (q[3:4]) kept as q_rest[2]']);
		expect(r.document.registerMap).toEqual([{ name: 'a', qubits: 'q[2:-1:0]' }, { name: 'b', qubits: 'q[{5}]' }]);
	});
	it('refuses overlaps and twice-used names, naming both entries', () => {
		expect(() => applyRegisterMap(doc, [parseRegisterMapEntry('a=q[0:2]'), parseRegisterMapEntry('b=q[2:4]', 1)])).toThrow(/"b=q\[2:4\]": q\[2\] is already bit 2 of "a" \(a=q\[0:2\]\); registers must not overlap/);
		expect(() => applyRegisterMap(doc, [parseRegisterMapEntry('a=q[0]'), parseRegisterMapEntry('a=q[1]', 1)])).toThrow(/register "a" is mapped twice/);
	});
	it('x=x keeps a register as it is', () => {
		const r = applyRegisterMap(doc, [parseRegisterMapEntry('q=q')]);
		expect(r.document.registers).toEqual([{ name: 'q', size: 6 }]);
		expect(r.document.body).toEqual(doc.body);
	});
});

describe('with the importer’s compact broadcasts', () => {
	it('relabels the gates inside a broadcast block too (h q; then a map that reverses q)', () => {
		const d = importQasm('OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[3];\nh q;\ncx q[0],q[2];\n').document;
		expect(d.body[0].type).toBe('call');
		const r = applyRegisterMap(d, [parseRegisterMapEntry('x=q[2:-1:0]')]);
		expect(r.document.body[0]).toEqual(d.body[0]);
		expect((r.document.blocks![0].body as GateItem[]).map((g) => `${g.qubits[0].register}[${g.qubits[0].index}]`)).toEqual(['x[2]', 'x[1]', 'x[0]']);
		expect((r.document.body[1] as GateItem).qubits).toEqual([{ register: 'x', index: 2 }, { register: 'x', index: 0 }]);
	});
});
