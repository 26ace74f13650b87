// Printed angles: decimals written by other tools for exact angles (expr.ts readPrintedAngle).
import { describe, expect, it } from 'vitest';
import { create, all } from 'mathjs';
import { readPrintedAngle, numToAngle } from './expr.js';
import { importQasm } from './import.js';
import type { GateItem } from '../circuit.js';

const turns = (text: string, neg = false) => {
	const p = readPrintedAngle(text, neg);
	if (!p) return null;
	const a = numToAngle(p.value);
	return a.exact ? `${a.num}/2^${a.exp}` : 'inexact';
};

describe('readPrintedAngle', () => {
	it('uses π to 68 places; a 60-place π from mathjs bignumber with mathjs bignumber pi (independent reference)', () => {
		const big = create(all, { number: 'BigNumber', precision: 90 });
		const pi = (big.pi as unknown as { toFixed: (d: number) => string }).toFixed(60); // rounded to 60 places
		// 0.785398163397448309615660845819875721049292349843776... = π/4 (mathjs, 90 digits)
		const r = readPrintedAngle(String(pi), false);
		expect(r && numToAngle(r.value)).toEqual({ exact: true, num: 1n, exp: 1 });
		expect(r!.differenceRadians).toBeLessThan(1e-60);
		expect(readPrintedAngle(String(pi).slice(0, 61) + String((Number(String(pi)[61]) + 5) % 10), false)).toBeNull(); // last digit off by 5 units
	});
	it('6-digit decimals of π/4, π/2, π/16, −π/8 (as exporters print them) are exact', () => {
		expect(turns('0.785398')).toBe('1/2^3');
		expect(turns('1.570796')).toBe('1/2^2');
		expect(turns('0.196350')).toBe('1/2^5');
		expect(turns('0.392699', true)).toBe('15/2^4');
		expect(turns('3.141593')).toBe('1/2^1');
	});
	it('full-precision floats (shortest round-trip of the double, as JavaScript and Python print them) are exact', () => {
		for (let m = 1; m <= 30; m++) {
			const printed = String((2 * Math.PI) / 2 ** m);
			expect(turns(printed), printed).toBe(`1/2^${m}`);
			expect(turns(String((3 * 2 * Math.PI) / 2 ** m))).toBe(m === 1 ? '1/2^1' : `3/2^${m}`);
		}
	});
	it('a decimal off by more than half a unit of its last digit stays inexact', () => {
		expect(turns('0.785397')).toBeNull(); // π/4 = 0.7853981…, off by 1.2 units of the 6th digit
		expect(turns('0.7854')).toBe('1/2^3'); // within half a unit of the 4th digit
		expect(turns('0.785')).toBe('1/2^3'); // 0.4 units of its 3rd digit from π/4
		expect(turns('0.78')).toBeNull(); // 0.54 units of its 2nd digit away
		expect(turns('1.0')).toBeNull();
		expect(turns('0.5')).toBeNull();
		expect(turns('0.3')).toBeNull();
	});
	it('the grid is bounded: a 6-digit decimal never snaps to a grid finer than 1000× its tolerance', () => {
		// 0.000767 rad is 2π/8192 = 0.000766990… (m = 13, spacing 7.7e-4 > 1000 · 5e-7): exact.
		expect(turns('0.000767')).toBe('1/2^13');
		// 0.000384 would be 2π/16384 (m = 14): the grid is too fine for 6 digits, so inexact.
		expect(turns('0.000384')).toBeNull();
	});
});

describe('importer with printed angles', () => {
	const text = 'OPENQASM 2.0;\ninclude "qelib1.inc";\nqreg q[2];\nu1(0.785398) q[0];\ncu1(-1.5707963267948966) q[0],q[1];\nrz(0.3) q[1];\n';
	it('reads them as exact turns, with a note counting them and the largest difference', () => {
		const r = importQasm(text);
		const b = r.document.body as GateItem[];
		expect(b.map((g) => g.angle)).toEqual(['1/2^3 turn', '3/2^2 turn', expect.stringMatching(/^~/)]);
		expect(r.decimals.exact).toBe(2);
		expect(r.decimals.inexact).toBe(1);
		expect(r.decimals.largestDifferenceRadians).toBeGreaterThan(1.6e-7);
		expect(r.decimals.largestDifferenceRadians).toBeLessThan(1.7e-7); // |0.785398 − π/4| = 1.634e-7
		expect(r.notes[0]).toMatch(/2 printed angles read as exact k\/2\^m turn \(largest difference 1\.63e-7 rad\)/);
		expect(r.notes[1]).toMatch(/1 printed angle fit no k\/2\^m turn and stay inexact/);
	});
	it('can be turned off: then every decimal stays inexact', () => {
		const r = importQasm(text, { exactDecimals: false });
		expect((r.document.body as GateItem[]).every((g) => g.angle!.startsWith('~'))).toBe(true);
		expect(r.notes.join(' ')).toMatch(/3 printed angles fit no k\/2\^m turn \(exact reading of decimals is off\)/);
	});
	it('applies inside gate definitions and to expressions only when the parameter is a lone decimal', () => {
		const r = importQasm('OPENQASM 2.0;\ngate g(l) a { U(0,0,l) a; U(0,0,0.392699) a; }\nqreg q[1];\ng(0.785398) q[0];\nU(0,0,0.785398*2) q[0];\n');
		const b = r.document.body as GateItem[];
		expect(b.map((g) => g.angle)).toEqual(['1/2^3 turn', '1/2^4 turn', expect.stringMatching(/^~/)]);
	});
});
