import { describe, expect, it } from 'vitest';
import { groupByRegister, layoutDials, shortestTurn, visibleTickCount, type DialQubit } from './dial-model';

const q = (register: string, index: number, qubit: number): DialQubit => ({ qubit, register, index, kind: 'classical', bit: 0 });

describe('dial board model', () => {
	it('keeps every tick while they are 3 px apart and thins by powers of two after', () => {
		// Plain geometry: radius 30 px → circumference 2π·30 ≈ 188.5 px; 32 ticks are 5.9 px apart, 64 would be 2.9 px (< 3).
		expect(visibleTickCount(3, 30)).toBe(8);
		expect(visibleTickCount(5, 30)).toBe(32);
		expect(visibleTickCount(8, 30)).toBe(32);
	});

	it('takes the short way round the dial (arithmetic on turns)', () => {
		expect(shortestTurn(0.9, 0.1)).toBeCloseTo(0.2);
		expect(shortestTurn(0.1, 0.9)).toBeCloseTo(-0.2);
		expect(shortestTurn(0, 0.5)).toBeCloseTo(0.5);
	});

	it('groups by register and draws the most significant bit first', () => {
		const groups = groupByRegister([q('a', 1, 1), q('b', 0, 2), q('a', 0, 0)]);
		expect(groups.map((g) => g.register)).toEqual(['a', 'b']);
		const layout = layoutDials(groups, 400);
		const a0 = layout.positions.find((p) => p.qubit === 0)!;
		const a1 = layout.positions.find((p) => p.qubit === 1)!;
		expect(a1.x).toBeLessThan(a0.x);
	});
});
