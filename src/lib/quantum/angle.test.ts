import { describe, expect, it } from 'vitest';
import { addAngles, compareAngles, divergence, dyadic, formatRadians, formatTurns, negateAngle, parseAngle, parseRadians, parseTurns, serializeAngle } from './angle.js';

// Parsing/printing rules are our own format (common practice: 1 turn = 2π rad).
describe('angles', () => {
	it('parses dyadic multiples of pi exactly', () => {
		expect(parseRadians('pi/4')).toEqual(dyadic(1n, 3));
		expect(parseRadians('2*pi*5/2^4')).toEqual(dyadic(5n, 4));
		expect(parseRadians('-pi/2^7')).toEqual(dyadic(255n, 8));
		expect(parseRadians('tau/8')).toEqual(dyadic(1n, 3));
		expect(parseRadians('2*pi*5/2^40')).toEqual({ exact: true, num: 5n, exp: 40 });
		expect(parseRadians('3*pi')).toEqual(dyadic(1n, 1));
		expect(parseRadians('0.5*pi')).toEqual(dyadic(1n, 2));
		expect(parseTurns('5/32')).toEqual(dyadic(5n, 5));
		expect(parseAngle('3/2^70 turn')).toEqual({ exact: true, num: 3n, exp: 70 });
	});
	it('marks non-dyadic angles inexact', () => {
		const a = parseRadians('pi/3');
		expect(a.exact).toBe(false);
		if (!a.exact) expect(a.turns).toBeCloseTo(1 / 6, 15);
		const b = parseRadians('0.1');
		expect(b.exact).toBe(false);
		if (!b.exact) expect(b.turns).toBeCloseTo(0.1 / (2 * Math.PI), 15);
		expect(parseRadians('sqrt(2)*pi').exact).toBe(false);
		expect(() => parseRadians('pi/')).toThrow(/cannot parse/);
	});
	it('prints turns and radian expressions', () => {
		expect(formatTurns(dyadic(5n, 3))).toBe('5/8 turn');
		expect(formatRadians(dyadic(5n, 3))).toBe('5*pi/4');
		expect(formatRadians(dyadic(1n, 1))).toBe('pi');
		expect(formatRadians(dyadic(1n, 41))).toBe('pi/2^40');
		expect(serializeAngle(dyadic(5n, 5))).toBe('5/2^5');
		expect(parseAngle(serializeAngle(dyadic(5n, 5)) + ' turn')).toEqual(dyadic(5n, 5));
	});
	it('adds, negates, compares and reduces divergence to (−½, ½]', () => {
		expect(addAngles(dyadic(3n, 2), dyadic(1n, 1))).toEqual(dyadic(1n, 2));
		expect(negateAngle(dyadic(1n, 3))).toEqual(dyadic(7n, 3));
		expect(compareAngles(dyadic(1n, 3), dyadic(1n, 2))).toBeLessThan(0);
		expect(divergence(dyadic(1n, 3), dyadic(1n, 2))).toEqual({ exact: true, num: -1n, exp: 3 });
		expect(divergence(dyadic(1n, 2), dyadic(3n, 2))).toEqual({ exact: true, num: 1n, exp: 1 }); // exactly ½ stays +½
	});
});
