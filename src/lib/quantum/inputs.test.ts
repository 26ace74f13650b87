import { describe, expect, it } from 'vitest';
import { parseRegisterValue, parseRegisterValues } from './inputs';
import { qubitLabel } from './circuit';

// Expected values are plain positional notation (common practice): 0b101 = 5, 0x1f = 31.
describe('register values', () => {
	it('reads decimal, binary and hex, bounded by the register size when given', () => {
		expect(parseRegisterValue('0b101', 'a', 3)).toBe(5n);
		expect(parseRegisterValue('101b', 'a')).toBe(5n);
		expect(parseRegisterValue('0x1f', 'a')).toBe(31n);
		expect(parseRegisterValue('1_000', 'a')).toBe(1000n);
		expect(parseRegisterValue('', 'a', 2)).toBe(0n);
		expect(() => parseRegisterValue('8', 'a', 3)).toThrow(/a: 8 does not fit in 3 qubits/);
		expect(() => parseRegisterValue('-1', 'a')).toThrow(/not a whole number/);
	});
	it('reads name=value lists and names the part that is not one', () => {
		expect([...parseRegisterValues('a=5, b=0b11,c=0x10')]).toEqual([
			['a', 5n],
			['b', 3n],
			['c', 16n]
		]);
		expect(parseRegisterValues('').size).toBe(0);
		expect(() => parseRegisterValues('a=5,b')).toThrow('expected name=value pairs such as a=5,b=3, got "b"');
		expect(() => parseRegisterValues('a=five')).toThrow('got "a=five"');
		expect(() => parseRegisterValues('a=')).toThrow('got "a="');
	});
});

describe('qubit labels', () => {
	it('names a flat qubit reg[i] (registers one after another, index 0 = LSB)', () => {
		const regs = [
			{ name: 'a', size: 2, offset: 0 },
			{ name: 'b', size: 3, offset: 2 }
		];
		expect([0, 1, 2, 4].map((q) => qubitLabel(regs, q))).toEqual(['a[0]', 'a[1]', 'b[0]', 'b[2]']);
		expect(qubitLabel(regs, 5)).toBe('q5');
	});
});
