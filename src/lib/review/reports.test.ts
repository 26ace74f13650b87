import { describe, expect, it } from 'vitest';
import { canMove, REPORT_STATUSES, STATUS_MOVES } from './reports';

// The status graph is the product's own rule (DESIGN.md: open, confirmed, fixed, verified, won't fix).
describe('report status moves', () => {
	it('goes forward open → confirmed → fixed → verified', () => {
		expect([canMove('open', 'confirmed'), canMove('confirmed', 'fixed'), canMove('fixed', 'verified')]).toEqual([true, true, true]);
	});
	it('does not skip the fix: open → verified and open → fixed are refused', () => {
		expect([canMove('open', 'verified'), canMove('open', 'fixed')]).toEqual([false, false]);
	});
	it('never moves to the same status, and every target is a status', () => {
		for (const s of REPORT_STATUSES) {
			expect(canMove(s, s)).toBe(false);
			for (const t of STATUS_MOVES[s]) expect(REPORT_STATUSES).toContain(t);
		}
	});
});
