// Register maps over an imported file's qubits (register-map.ts). Index syntax: OpenQASM 3
// specification, "Register concatenation and slicing" (inclusive ranges start:step:end, sets {…}).
import { describe, expect, it } from 'vitest';
import { applyRegisterMap, indexSetText, parseRegisterMapEntry, previewRegisterMap, resolveRegisterMapEntry, RegisterMapError, reverseRegisterMapEntry } from './register-map.js';
import { lowerCircuit } from '../lower.js';
import { checkCircuit } from '../check/index.js';
import { circuitUnitary } from '../testing/unitary.js';
import { flatFourierAdderQasm } from '../testing/arith.js';
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
	it('rewrites every gate into the mapped registers', () => {
		const r = applyRegisterMap(doc, [parseRegisterMapEntry('a=q[2:-1:0]'), parseRegisterMapEntry('b=q[{5}]'), parseRegisterMapEntry('work=q[3:4]')]);
		expect(r.document.registers).toEqual([{ name: 'a', size: 3 }, { name: 'b', size: 1 }, { name: 'work', size: 2 }]);
		const qs = (r.document.body as GateItem[]).map((g) => g.qubits.map((q) => `${q.register}[${q.index}]`).join(','));
		expect(qs).toEqual(['a[2]', 'a[2],b[0]', 'work[0]']);
		expect(r.document.registerMap).toEqual([
			{ name: 'a', qubits: 'q[2:-1:0]' },
			{ name: 'b', qubits: 'q[{5}]' },
			{ name: 'work', qubits: 'q[3:4]' }
		]);
	});
	it('refuses a map that leaves qubits of a mapped register unnamed, naming them and how to name them', () => {
		expect(() => applyRegisterMap(doc, [parseRegisterMapEntry('a=q[2:-1:0]'), parseRegisterMapEntry('b=q[{5}]')])).toThrow(
			'2 qubits of q (q[3:4]) are in no mapped register; name them too, for example work=q[3:4] for an ancilla or work register'
		);
		expect(() => applyRegisterMap(doc, [parseRegisterMapEntry('work=q[0:4]')])).toThrow('q[5] is in no mapped register; name it too, for example work2=q[5] for an ancilla or work register');
		expect(() => applyRegisterMap(doc, [parseRegisterMapEntry('a=q[{0,2,4}]')])).toThrow(/\(q\[1,3,5\]\) are in no mapped register; name them too, for example work=q\[1:2:5\]/);
		// OpenQASM 3 `let` aliases (the file's own names) keep the rest as REG_rest.
		const kept = applyRegisterMap(doc, [parseRegisterMapEntry('a=q[0:3]')], { unmapped: 'keep' });
		expect(kept.document.registers).toEqual([{ name: 'a', size: 4 }, { name: 'q_rest', size: 2 }]);
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

describe('the upload form’s helpers', () => {
	const file = [{ name: 'q', size: 6 }, { name: 'anc', size: 1 }];
	it('reverse bit order lists the same qubits the other way, as a range where it can', () => {
		const rev = (t: string) => reverseRegisterMapEntry(parseRegisterMapEntry(t), file).qubits;
		expect(rev('x=q[0:2]')).toBe('q[2:-1:0]');
		expect(rev('x=q[2:-1:0]')).toBe('q[0:2]');
		expect(rev('x=q')).toBe('q[5:-1:0]');
		expect(rev('x=q[{3,1,2}]')).toBe('q[{2,1,3}]');
		expect(rev('x=q[0:2:4]')).toBe('q[4:-2:0]');
		expect(rev('x=anc')).toBe('anc[0]');
		expect(indexSetText([7])).toBe('7');
		// Reversing twice gives the same qubits back.
		const idx = (q: string) => resolveRegisterMapEntry({ name: 'x', qubits: q }, file).indices;
		expect(idx(rev(`x=${rev('x=q[{4,0,5}]')}`))).toEqual([4, 0, 5]);
	});
	it('the preview names each file qubit’s register and bit, an error per entry, and the qubits left unnamed', () => {
		const p = previewRegisterMap(file, ['x=q[0:2]', 'y=q[5:-1:4]', '', 'z=q[2]', 'bad']);
		expect(p.rows).toEqual([
			{ file: 'q[0]', register: 'x', bit: 0 },
			{ file: 'q[1]', register: 'x', bit: 1 },
			{ file: 'q[2]', register: 'x', bit: 2 },
			{ file: 'q[3]', register: null, bit: null },
			{ file: 'q[4]', register: 'y', bit: 1 },
			{ file: 'q[5]', register: 'y', bit: 0 },
			{ file: 'anc[0]', register: 'anc', bit: 0 }
		]);
		expect(p.errors[0]).toBeNull();
		expect(p.errors[2]).toBeNull();
		expect(p.errors[3]).toBe('"z=q[2]": q[2] is already bit 2 of "x"; registers must not overlap');
		expect(p.errors[4]).toMatch(/expected NAME=QUBITS/);
		expect(p.unmapped).toBe('q[3] is in no mapped register; name it too, for example work=q[3] for an ancilla or work register');
		expect(previewRegisterMap(file, ['anc=q[0:5]']).errors[0]).toMatch(/register name "anc" is taken by the file's own anc\[1\]/);
		expect(previewRegisterMap(file, []).unmapped).toBeNull();
	});
});

describe('a mapped flat-register Fourier adder is proved only with the right map (cross-checked)', () => {
	// Our own flat-register adder (testing/arith.ts: Draper 2000, quant-ph/0008033, y written
	// most-significant bit first). The verdict must agree with the exhaustive sweep and with the
	// circuit's unitary built column by column (mathjs complex numbers): every basis input |x, y⟩
	// goes to |x, x + y mod 2^n⟩ times one global phase, values and phases.
	const n = 2;
	const imported = importQasm(flatFourierAdderQasm(n), { file: 'flat.qasm' }).document;
	const withMap = (y: string) => {
		const d = applyRegisterMap(imported, [parseRegisterMapEntry(`x=q[0:${n - 1}]`), parseRegisterMapEntry(`y=${y}`)]).document;
		return { ...d, specs: [`y = x + y mod ${2 ** n}`] };
	};
	/** Whether the unitary sends every |x, y⟩ to |x, x+y mod 2^n⟩ with one common phase (registers x then y, LSB first). */
	const unitaryAdds = (d: ReturnType<typeof withMap>) => {
		const c = lowerCircuit(d);
		expect(c.qubitCount).toBe(2 * n);
		const u = circuitUnitary(c);
		const size = 2 ** n;
		let phase: number | null = null;
		for (let x = 0; x < size; x++)
			for (let y = 0; y < size; y++) {
				const col = x + size * y;
				const row = x + size * ((x + y) % size);
				const a = u[row][col] as unknown as { re: number; im: number };
				if (Math.abs(Math.hypot(a.re, a.im) - 1) > 1e-9) return false;
				const arg = Math.atan2(a.im, a.re);
				if (phase === null) phase = arg;
				else if (Math.abs(Math.atan2(Math.sin(arg - phase), Math.cos(arg - phase))) > 1e-9) return false;
			}
		return true;
	};
	it(`y=q[${2 * n - 1}:-1:${n}] (the file's most-significant-bit-first y): proved, the sweep and the unitary agree`, () => {
		const d = withMap(`q[${2 * n - 1}:-1:${n}]`);
		expect(d.registers.map((r) => `${r.name}[${r.size}]`)).toEqual([`x[${n}]`, `y[${n}]`]);
		const r = checkCircuit(lowerCircuit(d), d.specs, {});
		expect(r.exhaustive).toBe(true);
		expect([r.ok, r.failed, r.proof.status]).toEqual([true, 0, 'proved']);
		expect(unitaryAdds(d)).toBe(true);
	});
	it(`y=q[${n}:${2 * n - 1}] (bit order not reversed): refuted, the sweep and the unitary agree`, () => {
		const d = withMap(`q[${n}:${2 * n - 1}]`);
		const r = checkCircuit(lowerCircuit(d), d.specs, {});
		expect(r.exhaustive).toBe(true);
		expect(r.proof.status).toBe('refuted');
		expect(r.failed).toBeGreaterThan(0);
		expect(unitaryAdds(d)).toBe(false);
	});
});
